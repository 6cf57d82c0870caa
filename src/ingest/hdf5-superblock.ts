import { HDF5_SIGNATURE } from './detect';

/**
 * The few superblock fields needed to tell a complete HDF5 file from a cut-off one before the
 * HDF5 library opens it. The library detects truncation too, but only after printing a
 * diagnostic trace; checking first gives a plain message and keeps logs quiet.
 *
 * Layout (HDF5 file format specification, superblock versions 0-3): after the 8-byte
 * signature comes a version byte; versions 0 and 1 then hold sizes of offsets/lengths at bytes
 * 13/14 and four addresses (base, free-space, end-of-file, driver) from byte 24 (v0) or 28
 * (v1); versions 2 and 3 hold the sizes at bytes 9/10 and the addresses (base, extension,
 * end-of-file, root) from byte 12. Addresses are little-endian, `sizeOfOffsets` bytes wide.
 */
export interface SuperblockSummary {
  version: number;
  /** Absolute offset of the superblock's base address (normally the signature offset). */
  baseAddress: number;
  /** Bytes the file must have: base address + end-of-file address; null when undefined. */
  expectedSize: number | null;
}

/** Parses from bytes starting at the signature; null when too short to hold the fields. */
export function readSuperblockSummary(bytes: Uint8Array): SuperblockSummary | null {
  if (bytes.length < 16) return null;
  for (let i = 0; i < HDF5_SIGNATURE.length; i++) if (bytes[i] !== HDF5_SIGNATURE[i]) return null;
  const version = bytes[8] ?? 0;
  let sizeOfOffsets: number;
  let addressStart: number;
  let eofSlot: number;
  if (version === 0 || version === 1) {
    sizeOfOffsets = bytes[13] ?? 0;
    addressStart = version === 0 ? 24 : 28;
    eofSlot = 2;
  } else if (version === 2 || version === 3) {
    sizeOfOffsets = bytes[9] ?? 0;
    addressStart = 12;
    eofSlot = 2;
  } else {
    return { version, baseAddress: 0, expectedSize: null };
  }
  if (![2, 4, 8].includes(sizeOfOffsets)) return { version, baseAddress: 0, expectedSize: null };
  const eofAt = addressStart + eofSlot * sizeOfOffsets;
  if (bytes.length < eofAt + sizeOfOffsets) return null;
  const base = readAddress(bytes, addressStart, sizeOfOffsets);
  const eof = readAddress(bytes, eofAt, sizeOfOffsets);
  if (base === null) return { version, baseAddress: 0, expectedSize: null };
  return { version, baseAddress: base, expectedSize: eof === null ? null : base + eof };
}

/** Little-endian unsigned address; null for the all-ones "undefined address". */
function readAddress(bytes: Uint8Array, at: number, size: number): number | null {
  let allOnes = true;
  let value = 0;
  for (let k = size - 1; k >= 0; k--) {
    const b = bytes[at + k] ?? 0;
    if (b !== 0xff) allOnes = false;
    value = value * 256 + b;
  }
  return allOnes ? null : value;
}
