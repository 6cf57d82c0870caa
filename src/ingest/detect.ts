import { ReadError } from './types';

/**
 * Deciding what a file is. The bytes win over what the uploader claims: the HDF5 signature and
 * the gzip magic number are unambiguous, a declared format or a file name is only a hint, and
 * a hint that contradicts the bytes is reported rather than followed.
 */

export type Container = 'hdf5' | 'csv' | 'csv-gzip';

/** `\x89HDF\r\n\x1a\n`: the 8-byte signature that opens an HDF5 superblock. */
export const HDF5_SIGNATURE = Uint8Array.from([0x89, 0x48, 0x44, 0x46, 0x0d, 0x0a, 0x1a, 0x0a]);

/**
 * Byte offsets where an HDF5 superblock may start: 0, then 512 and every doubling (a user block
 * of 512, 1024, 2048... bytes may precede it), below `fileSize`.
 */
export function hdf5SignatureOffsets(fileSize: number): number[] {
  const offsets = [0];
  for (let offset = 512; offset + HDF5_SIGNATURE.length <= fileSize; offset *= 2) {
    offsets.push(offset);
  }
  return offsets;
}

export function hasHdf5Signature(bytes: Uint8Array, at = 0): boolean {
  if (bytes.length < at + HDF5_SIGNATURE.length) return false;
  for (let i = 0; i < HDF5_SIGNATURE.length; i++) {
    if (bytes[at + i] !== HDF5_SIGNATURE[i]) return false;
  }
  return true;
}

export function hasGzipMagic(bytes: Uint8Array): boolean {
  return bytes.length >= 2 && bytes[0] === 0x1f && bytes[1] === 0x8b;
}

type Hint = 'hdf5' | 'csv' | 'csv-gzip' | 'unknown';

/** Maps what an uploader may send as a format (name, extension or MIME type) to a hint. */
export function hintFromDeclaredFormat(declared: string | undefined): Hint {
  if (!declared) return 'unknown';
  const d = declared.trim().toLowerCase();
  if (
    [
      'hdf5',
      'h5',
      'hdf',
      'netcdf',
      'netcdf4',
      'netcdf-4',
      'nc',
      'nc4',
      'application/x-hdf5',
      'application/x-hdf',
      'application/x-netcdf',
      'application/netcdf',
    ].includes(d)
  ) {
    return 'hdf5';
  }
  if (['csv.gz', 'csv-gzip', 'application/gzip', 'application/x-gzip'].includes(d)) {
    return 'csv-gzip';
  }
  if (['csv', 'csv-long', 'csv-wide', 'text/csv', 'text/plain', 'application/csv'].includes(d)) {
    return 'csv';
  }
  return 'unknown';
}

export function hintFromFileName(fileName: string | undefined): Hint {
  if (!fileName) return 'unknown';
  const f = fileName.trim().toLowerCase();
  if (/\.(h5|hdf5|hdf|he5|nc|nc4)$/.test(f)) return 'hdf5';
  if (/\.(csv|txt|dat)\.gz$/.test(f) || /\.gz$/.test(f)) return 'csv-gzip';
  if (/\.(csv|txt|dat|tsv)$/.test(f)) return 'csv';
  return 'unknown';
}

export interface DetectInput {
  /** The first bytes of the file (at least 8; 4 KiB recommended). */
  head: Uint8Array;
  /** Offset where an HDF5 signature was found, or null. */
  hdf5SignatureOffset: number | null;
  declaredFormat?: string;
  fileName?: string;
}

/** Picks the container; throws ReadError when the bytes contradict the hints or say nothing. */
export function detectContainer(input: DetectInput): Container {
  const { head } = input;
  if (input.hdf5SignatureOffset !== null) return 'hdf5';
  if (hasGzipMagic(head)) return 'csv-gzip';

  refuseKnownForeignFormats(head);

  const declared = hintFromDeclaredFormat(input.declaredFormat);
  const named = hintFromFileName(input.fileName);
  const claimsHdf5 = declared === 'hdf5' || (declared === 'unknown' && named === 'hdf5');
  if (claimsHdf5) {
    const source =
      declared === 'hdf5'
        ? `declared as ${JSON.stringify(input.declaredFormat)}`
        : `named ${JSON.stringify(input.fileName)}`;
    throw new ReadError(
      `The file is ${source} but is not HDF5: no HDF5 signature (\\x89HDF\\r\\n\\x1a\\n) at byte 0, ` +
        `512, 1024, 2048 or any later doubling; it begins with ${describeBytes(head)}.`,
      'byte 0',
      'format',
    );
  }
  // Text, or something declared or named CSV: the CSV reader checks the bytes and says
  // precisely what is wrong with them (a NUL byte, UTF-16).
  if (looksLikeText(head) || declared === 'csv' || (declared === 'unknown' && named === 'csv')) {
    return 'csv';
  }
  throw new ReadError(
    `Unrecognised file format: not HDF5, not gzip, and not text (it begins with ` +
      `${describeBytes(head)}). Varigate reads CSV (optionally gzip-compressed) and HDF5/NetCDF-4.`,
    'byte 0',
    'format',
  );
}

/** Formats people upload by mistake, named so the answer says what to do instead. */
function refuseKnownForeignFormats(head: Uint8Array): void {
  const startsWith = (...bytes: number[]) => bytes.every((b, i) => head[i] === b);
  if (startsWith(0x43, 0x44, 0x46) && [1, 2, 5].includes(head[3] ?? -1)) {
    throw new ReadError(
      'This is a classic NetCDF file (CDF-1/2/5), which is not HDF5-based; write NetCDF-4 ' +
        '(format NETCDF4) or CSV.',
      'byte 0',
      'unsupported',
    );
  }
  if (startsWith(0x50, 0x4b, 0x03, 0x04)) {
    throw new ReadError(
      'This is a zip archive; upload the CSV or HDF5 file itself (gzip compression of a CSV is ' + 'accepted).',
      'byte 0',
      'unsupported',
    );
  }
  if (startsWith(0xff, 0xfe) || startsWith(0xfe, 0xff)) {
    throw new ReadError(
      'The file is UTF-16 text (it starts with a UTF-16 byte-order mark); save the CSV as UTF-8.',
      'byte 0',
      'encoding',
    );
  }
}

/** Text, for the purpose of choosing the CSV reader: no NUL byte in the head. */
export function looksLikeText(head: Uint8Array): boolean {
  return !head.includes(0);
}

/** `68 65 6c 6c 6f ("hello")`: hex of the first bytes and their printable rendering. */
export function describeBytes(bytes: Uint8Array, count = 8): string {
  const first = bytes.subarray(0, count);
  const hex = Array.from(first, (b) => b.toString(16).padStart(2, '0')).join(' ');
  const printable = Array.from(first, (b) => (b >= 32 && b < 127 ? String.fromCharCode(b) : '.'));
  return first.length === 0 ? 'nothing' : `bytes ${hex} (${JSON.stringify(printable.join(''))})`;
}
