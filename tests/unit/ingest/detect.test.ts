import { describe, expect, it } from 'vitest';
import {
  detectContainer,
  HDF5_SIGNATURE,
  hdf5SignatureOffsets,
  hintFromDeclaredFormat,
  hintFromFileName,
} from '@/src/ingest/detect';
import { readSuperblockSummary } from '@/src/ingest/hdf5-superblock';
import { ReadError } from '@/src/ingest/types';

const text = (s: string) => new TextEncoder().encode(s);

function errorOf(fn: () => unknown): ReadError {
  try {
    fn();
  } catch (error) {
    if (error instanceof ReadError) return error;
    throw error;
  }
  throw new Error('expected a ReadError');
}

describe('hdf5SignatureOffsets', () => {
  it('lists 0, 512 and each doubling that fits in the file', () => {
    expect(hdf5SignatureOffsets(100)).toEqual([0]);
    expect(hdf5SignatureOffsets(520)).toEqual([0, 512]);
    expect(hdf5SignatureOffsets(5000)).toEqual([0, 512, 1024, 2048, 4096]);
  });
});

describe('detectContainer', () => {
  it('trusts an HDF5 signature over the name and the declared format', () => {
    expect(
      detectContainer({ head: HDF5_SIGNATURE, hdf5SignatureOffset: 0, fileName: 'a.csv', declaredFormat: 'csv' }),
    ).toBe('hdf5');
    expect(detectContainer({ head: text('user block'), hdf5SignatureOffset: 512 })).toBe('hdf5');
  });

  it('treats gzip magic as compressed CSV', () => {
    expect(detectContainer({ head: Uint8Array.of(0x1f, 0x8b, 8, 0), hdf5SignatureOffset: null })).toBe('csv-gzip');
  });

  it('reads text as CSV whatever it is called, unless it claims to be HDF5', () => {
    expect(detectContainer({ head: text('step,time,x,u\n'), hdf5SignatureOffset: null })).toBe('csv');
    expect(detectContainer({ head: text('x,0,1\n'), hdf5SignatureOffset: null, fileName: 'a.dat' })).toBe('csv');
  });

  it('refuses a file declared HDF5 that has no signature', () => {
    const error = errorOf(() =>
      detectContainer({ head: text('hello world'), hdf5SignatureOffset: null, declaredFormat: 'hdf5' }),
    );
    expect(error.message).toBe(
      'The file is declared as "hdf5" but is not HDF5: no HDF5 signature (\\x89HDF\\r\\n\\x1a\\n) at byte 0, ' +
        '512, 1024, 2048 or any later doubling; it begins with bytes 68 65 6c 6c 6f 20 77 6f ("hello wo").',
    );
    expect(error.code).toBe('format');
  });

  it('refuses a file named .nc that has no signature', () => {
    const error = errorOf(() =>
      detectContainer({ head: text('abc'), hdf5SignatureOffset: null, fileName: 'ocean.nc' }),
    );
    expect(error.message).toContain('The file is named "ocean.nc" but is not HDF5');
  });

  it('names classic NetCDF, zip and UTF-16 instead of calling them garbage', () => {
    expect(
      errorOf(() => detectContainer({ head: Uint8Array.of(0x43, 0x44, 0x46, 1), hdf5SignatureOffset: null })).message,
    ).toBe(
      'This is a classic NetCDF file (CDF-1/2/5), which is not HDF5-based; write NetCDF-4 (format NETCDF4) or CSV.',
    );
    expect(
      errorOf(() => detectContainer({ head: Uint8Array.of(0x50, 0x4b, 3, 4), hdf5SignatureOffset: null })).code,
    ).toBe('unsupported');
    expect(
      errorOf(() => detectContainer({ head: Uint8Array.of(0xff, 0xfe, 0x73, 0), hdf5SignatureOffset: null })).code,
    ).toBe('encoding');
  });

  it('refuses binary data it does not know', () => {
    const error = errorOf(() => detectContainer({ head: Uint8Array.of(1, 0, 2, 0), hdf5SignatureOffset: null }));
    expect(error.message).toBe(
      'Unrecognised file format: not HDF5, not gzip, and not text (it begins with bytes 01 00 02 00 ("....")). ' +
        'Varigate reads CSV (optionally gzip-compressed) and HDF5/NetCDF-4.',
    );
  });

  it('maps declared formats and file names to hints', () => {
    expect(hintFromDeclaredFormat('application/x-netcdf')).toBe('hdf5');
    expect(hintFromDeclaredFormat('text/csv')).toBe('csv');
    expect(hintFromDeclaredFormat('parquet')).toBe('unknown');
    expect(hintFromFileName('run.CSV.GZ')).toBe('csv-gzip');
    expect(hintFromFileName('run.hdf5')).toBe('hdf5');
    expect(hintFromFileName(undefined)).toBe('unknown');
  });
});

describe('readSuperblockSummary', () => {
  it('reads the end-of-file address of a version 0 superblock', () => {
    const bytes = new Uint8Array(64);
    bytes.set(HDF5_SIGNATURE);
    bytes[8] = 0; // version
    bytes[13] = 8; // size of offsets
    bytes[14] = 8;
    // base address 0 at 24, free-space at 32 (undefined), end of file at 40
    bytes.fill(0xff, 32, 40);
    bytes[40] = 0x10;
    bytes[41] = 0x27; // 10000
    expect(readSuperblockSummary(bytes)).toEqual({ version: 0, baseAddress: 0, expectedSize: 10000 });
  });

  it('reads a version 2 superblock and gives up on short input', () => {
    const bytes = new Uint8Array(48);
    bytes.set(HDF5_SIGNATURE);
    bytes[8] = 2;
    bytes[9] = 8;
    bytes[10] = 8;
    bytes[28] = 0x00;
    bytes[29] = 0x02; // end of file 512 at offset 28
    expect(readSuperblockSummary(bytes)?.expectedSize).toBe(512);
    expect(readSuperblockSummary(bytes.subarray(0, 20))).toBeNull();
  });
});
