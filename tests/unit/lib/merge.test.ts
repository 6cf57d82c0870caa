import { describe, expect, it } from 'vitest';
import { mergeDeep } from '@/src/lib/merge';

describe('mergeDeep', () => {
  it('lets later layers win key by key at any depth, replacing arrays whole', () => {
    const project = { tvGrowth: { failRelative: 1e-6, warnRelative: 1e-8 }, list: [1, 2] };
    const kase = { tvGrowth: { failRelative: 1e-3 }, list: [3] };
    expect(mergeDeep(project, kase)).toEqual({ tvGrowth: { failRelative: 1e-3, warnRelative: 1e-8 }, list: [3] });
  });

  it('ignores layers that are not objects and never mutates its inputs', () => {
    const a = { x: { y: 1 } };
    const merged = mergeDeep(a, null, 'text', { x: { z: 2 } });
    expect(merged).toEqual({ x: { y: 1, z: 2 } });
    expect(a).toEqual({ x: { y: 1 } });
  });
});
