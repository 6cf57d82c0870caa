import { spawnSync } from 'node:child_process';
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import request from 'supertest';
import { createTestProject } from '../support/api';
import { appUrl } from '../support/env';

function tokenCli(args: string[]) {
  return spawnSync(
    path.join(process.cwd(), 'node_modules', '.bin', 'tsx'),
    ['--conditions=react-server', 'scripts/token.ts', ...args],
    {
      encoding: 'utf8',
      env: { ...process.env, LOG_LEVEL: 'silent' },
    },
  );
}

describe('npm run token', () => {
  it('prints a new token once, which then authenticates against its project', async () => {
    const project = await createTestProject('heronmoor');
    const result = tokenCli(['--project', 'heronmoor', '--workspace', project.workspaceSlug, '--name', 'nightly CI']);
    expect(result.status).toBe(0);
    const token = /vgt_[0-9a-f]{8}_[A-Za-z0-9_-]{43}/.exec(result.stdout)?.[0];
    expect(token).toBeDefined();
    const res = await request(appUrl()).get('/api/v1/builds/no-such-build').set('Authorization', `Bearer ${token}`);
    // Authenticated (not 401): the build simply does not exist.
    expect(res.status).toBe(404);
    expect(res.body.error.code).toBe('not_found:build');
  });

  it('exits 3 with its usage line when an argument is missing, and 1 for an unknown project', () => {
    const usage = tokenCli(['--project', 'heronmoor']);
    expect(usage.status).toBe(3);
    expect(usage.stderr).toMatch(/usage: npm run token/);
    const unknown = tokenCli(['--project', 'no-such-project-anywhere', '--name', 'x']);
    expect(unknown.status).toBe(1);
    expect(unknown.stderr).toMatch(/No project "no-such-project-anywhere"/);
  });
});
