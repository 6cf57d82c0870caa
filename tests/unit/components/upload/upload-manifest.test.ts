import { describe, expect, it } from 'vitest';
import {
  EMPTY_MANIFEST_FORM,
  buildManifest,
  contentTypeFor,
  defaultBuildKey,
  formatBytes,
  isAcceptedFile,
} from '@/src/components/upload/upload-manifest';

describe('upload manifest form', () => {
  it('sends no manifest when nothing is set', () => {
    expect(buildManifest(EMPTY_MANIFEST_FORM)).toEqual({ errors: {} });
  });

  it('names the variables to read', () => {
    expect(buildManifest({ ...EMPTY_MANIFEST_FORM, variables: 'rho, u  v' }).manifest).toEqual({
      variables: ['rho', 'u', 'v'],
    });
  });

  it('applies the options to each named variable', () => {
    const { manifest, errors } = buildManifest({
      variables: 'c',
      periodicAxes: 'x, y',
      lowerBound: '0',
      upperBound: '1',
      velocitySign: '-1',
      system: true,
      conservative: false,
    });
    expect(errors).toEqual({});
    expect(manifest).toEqual({
      variables: ['c'],
      variableOptions: {
        c: {
          periodic: { x: true, y: true },
          bounds: { lower: 0, upper: 1 },
          velocitySign: -1,
          system: true,
          conservative: false,
        },
      },
    });
  });

  it('refuses options without a variable name, bad numbers and crossed bounds', () => {
    expect(buildManifest({ ...EMPTY_MANIFEST_FORM, system: true }).errors.variables).toMatch(/Name the variable/);
    expect(buildManifest({ ...EMPTY_MANIFEST_FORM, variables: 'c', lowerBound: 'zero' }).errors.lowerBound).toMatch(
      /number/,
    );
    expect(
      buildManifest({ ...EMPTY_MANIFEST_FORM, variables: 'c', lowerBound: '2', upperBound: '1' }).errors.upperBound,
    ).toMatch(/below the lower/);
  });

  it('refuses a repeated variable name with the readers own schema', () => {
    expect(buildManifest({ ...EMPTY_MANIFEST_FORM, variables: 'c, c' }).errors.variables).toMatch(/repeat/);
  });
});

describe('upload helpers', () => {
  it('defaults the build key to the day in UTC', () => {
    expect(defaultBuildKey(new Date('2031-05-06T23:30:00Z'))).toBe('manual-2031-05-06');
  });

  it('accepts the formats the readers take and nothing else', () => {
    for (const n of ['a.csv', 'a.CSV.gz', 'b.h5', 'b.hdf5', 'c.nc']) expect(isAcceptedFile(n), n).toBe(true);
    for (const n of ['a.zip', 'a.xlsx', 'csv']) expect(isAcceptedFile(n), n).toBe(false);
  });

  it('signs a content type matching the file', () => {
    expect(contentTypeFor('a.csv')).toBe('text/csv');
    expect(contentTypeFor('a.csv.gz')).toBe('application/gzip');
    expect(contentTypeFor('a.h5')).toBe('application/x-hdf5');
    expect(contentTypeFor('a.bin')).toBe('application/octet-stream');
  });

  it('prints sizes in binary units', () => {
    expect(formatBytes(512)).toBe('512 B');
    expect(formatBytes(72_751)).toBe('71 KiB');
    expect(formatBytes(3 * 1024 * 1024)).toBe('3.0 MiB');
  });
});
