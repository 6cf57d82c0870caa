import { describe, expect, it } from 'vitest';
import { csvNumber, csvText, METRIC_COLUMNS, metricsCsv, metricsJson } from '@/src/lib/metrics-export';

describe('metricsCsv', () => {
  const series = { index: [0, 5], time: [0, null], tv: [2, 2.5], extrema: [2, 6] };

  it('writes a header and one row per variable and step, empty cells for missing values', () => {
    const csv = metricsCsv([{ name: 'u', series }]);
    const lines = csv.trimEnd().split('\r\n');
    expect(lines[0]).toBe(['variable', 'step', 'time', ...METRIC_COLUMNS].join(','));
    expect(lines).toHaveLength(3);
    const row = lines[2]!.split(',');
    expect(row.slice(0, 4)).toEqual(['u', '5', '', '2.5']);
    expect(row[3 + METRIC_COLUMNS.indexOf('extrema')]).toBe('6');
    expect(row[3 + METRIC_COLUMNS.indexOf('massDrift')]).toBe('');
  });

  it('writes numbers that read back to the same float64', () => {
    const x = 0.1 + 0.2;
    expect(Number(csvNumber(x))).toBe(x);
    expect(csvNumber(Number.NaN)).toBe('');
  });

  it('quotes variable names that hold separators or quotes', () => {
    expect(csvText('a,b')).toBe('"a,b"');
    expect(csvText('say "hi"')).toBe('"say ""hi"""');
    expect(csvText('rho')).toBe('rho');
  });
});

describe('metricsJson', () => {
  it('keeps step, time and the exported columns only', () => {
    const out = metricsJson({ index: [0], time: [null], tv: [1], ...{ argMax: [3] } } as never);
    expect(Object.keys(out)).toEqual(['step', 'time', 'tv']);
  });
});
