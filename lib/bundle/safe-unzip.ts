/**
 * Defensive reading of zip archives received from outside (hand-off bundles).
 *
 * Bundles are written with JSZip. Reading one that somebody uploads is a
 * different matter: the archive may be truncated, forged or a decompression
 * bomb. This module therefore reads the central directory itself, refuses
 * anything suspicious before a single byte is inflated, and then inflates each
 * entry with node:zlib under a hard output cap equal to the size the directory
 * declared, checking the CRC-32 afterwards. A header that lies about its size
 * cannot make us allocate more than the declared (already limited) amount.
 *
 * Format facts used here (PKWARE APPNOTE.TXT, sections 4.3.7, 4.3.12, 4.3.16):
 * the end-of-central-directory record (signature 0x06054b50) sits in the last
 * 22 + 65535 bytes; each central header (0x02014b50) carries sizes, CRC, the
 * local header offset and, in the upper 16 bits of the external attributes
 * when "version made by" names Unix (3), the st_mode of the entry, from which
 * a symbolic link (S_IFLNK = 0o120000) is recognised.
 */
import { crc32, inflateRawSync } from 'node:zlib';

export interface UnzipLimits {
  /** Most entries an archive may hold (directories included). */
  maxEntries: number;
  /** Largest uncompressed size of one entry, in bytes. */
  maxEntryBytes: number;
  /** Largest uncompressed size of all entries together, in bytes. */
  maxTotalBytes: number;
  /** Largest uncompressed/compressed ratio for entries above `ratioFloorBytes`. */
  maxCompressionRatio: number;
  /** Entries smaller than this are exempt from the ratio rule (tiny files compress oddly). */
  ratioFloorBytes: number;
}

export const DEFAULT_UNZIP_LIMITS: UnzipLimits = {
  maxEntries: 500,
  maxEntryBytes: 256 * 1024 * 1024,
  maxTotalBytes: 512 * 1024 * 1024,
  maxCompressionRatio: 200,
  ratioFloorBytes: 64 * 1024,
};

export type UnzipErrorCode =
  | 'not-a-zip'
  | 'truncated'
  | 'zip64-unsupported'
  | 'too-many-entries'
  | 'entry-too-large'
  | 'total-too-large'
  | 'compression-ratio'
  | 'unsafe-path'
  | 'duplicate-name'
  | 'symlink'
  | 'encrypted'
  | 'unsupported-compression'
  | 'corrupt-entry';

export class UnzipError extends Error {
  readonly code: UnzipErrorCode;
  /** The entry name the problem concerns, when there is one. */
  readonly entry?: string;
  constructor(code: UnzipErrorCode, message: string, entry?: string) {
    super(message);
    this.name = 'UnzipError';
    this.code = code;
    this.entry = entry;
  }
}

export interface ZipEntryInfo {
  name: string;
  isDirectory: boolean;
  compressedSize: number;
  uncompressedSize: number;
  crc32: number;
  method: number;
  localHeaderOffset: number;
}

const EOCD_SIGNATURE = 0x06054b50;
const CENTRAL_SIGNATURE = 0x02014b50;
const LOCAL_SIGNATURE = 0x04034b50;
const S_IFMT = 0o170000;
const S_IFLNK = 0o120000;

/** Reads and vets the central directory; inflates nothing. */
export function inspectZip(buffer: Uint8Array, limits: UnzipLimits = DEFAULT_UNZIP_LIMITS): ZipEntryInfo[] {
  const view = new DataView(buffer.buffer, buffer.byteOffset, buffer.byteLength);
  if (buffer.byteLength < 22)
    throw new UnzipError('not-a-zip', `file is ${buffer.byteLength} bytes, too short to be a zip archive`);
  const eocd = findEndOfCentralDirectory(view);
  if (eocd < 0) {
    const startsLikeZip = buffer.byteLength >= 4 && view.getUint32(0, true) === LOCAL_SIGNATURE;
    throw startsLikeZip
      ? new UnzipError('truncated', 'zip archive is truncated: its central directory is missing')
      : new UnzipError('not-a-zip', 'file is not a zip archive (no end-of-central-directory record)');
  }
  const diskNumber = view.getUint16(eocd + 4, true);
  const entryCount = view.getUint16(eocd + 10, true);
  const directorySize = view.getUint32(eocd + 12, true);
  const directoryOffset = view.getUint32(eocd + 16, true);
  if (entryCount === 0xffff || directorySize === 0xffffffff || directoryOffset === 0xffffffff) {
    throw new UnzipError('zip64-unsupported', 'ZIP64 archives are not accepted for bundles');
  }
  if (diskNumber !== 0) throw new UnzipError('not-a-zip', 'multi-part (spanned) zip archives are not accepted');
  if (entryCount > limits.maxEntries) {
    throw new UnzipError(
      'too-many-entries',
      `archive has ${entryCount} entries; at most ${limits.maxEntries} are allowed`,
    );
  }
  if (directoryOffset + directorySize > eocd) {
    throw new UnzipError(
      'truncated',
      'zip archive is truncated or corrupt: the central directory lies outside the file',
    );
  }

  const entries: ZipEntryInfo[] = [];
  const seen = new Set<string>();
  let total = 0;
  let pos = directoryOffset;
  for (let index = 0; index < entryCount; index++) {
    if (pos + 46 > eocd || view.getUint32(pos, true) !== CENTRAL_SIGNATURE) {
      throw new UnzipError('truncated', `zip central directory is corrupt at entry ${index + 1}`);
    }
    const madeBy = view.getUint16(pos + 4, true);
    const flags = view.getUint16(pos + 8, true);
    const method = view.getUint16(pos + 10, true);
    const crc = view.getUint32(pos + 16, true);
    const compressedSize = view.getUint32(pos + 20, true);
    const uncompressedSize = view.getUint32(pos + 24, true);
    const nameLength = view.getUint16(pos + 28, true);
    const extraLength = view.getUint16(pos + 30, true);
    const commentLength = view.getUint16(pos + 32, true);
    const externalAttributes = view.getUint32(pos + 38, true);
    const localHeaderOffset = view.getUint32(pos + 42, true);
    if (pos + 46 + nameLength > eocd)
      throw new UnzipError('truncated', `zip central directory is corrupt at entry ${index + 1}`);
    const rawName = buffer.subarray(pos + 46, pos + 46 + nameLength);
    const name = new TextDecoder('utf-8', { fatal: false }).decode(rawName);
    pos += 46 + nameLength + extraLength + commentLength;

    if (compressedSize === 0xffffffff || uncompressedSize === 0xffffffff || localHeaderOffset === 0xffffffff) {
      throw new UnzipError('zip64-unsupported', `entry '${name}' uses ZIP64 sizes, which bundles never need`, name);
    }
    checkEntryName(name);
    const isUnix = madeBy >>> 8 === 3;
    if (isUnix && ((externalAttributes >>> 16) & S_IFMT) === S_IFLNK) {
      throw new UnzipError('symlink', `entry '${name}' is a symbolic link; bundles may hold only plain files`, name);
    }
    if (flags & 0x1) throw new UnzipError('encrypted', `entry '${name}' is encrypted`, name);
    if (method !== 0 && method !== 8) {
      throw new UnzipError(
        'unsupported-compression',
        `entry '${name}' uses compression method ${method}; only stored (0) and deflate (8) are accepted`,
        name,
      );
    }
    const key = name.normalize('NFC');
    if (seen.has(key)) throw new UnzipError('duplicate-name', `the name '${name}' appears twice in the archive`, name);
    seen.add(key);
    if (uncompressedSize > limits.maxEntryBytes) {
      throw new UnzipError(
        'entry-too-large',
        `entry '${name}' expands to ${uncompressedSize} bytes; the limit is ${limits.maxEntryBytes}`,
        name,
      );
    }
    total += uncompressedSize;
    if (total > limits.maxTotalBytes) {
      throw new UnzipError('total-too-large', `archive expands to more than ${limits.maxTotalBytes} bytes in total`);
    }
    if (uncompressedSize >= limits.ratioFloorBytes) {
      const ratio = uncompressedSize / Math.max(1, compressedSize);
      if (ratio > limits.maxCompressionRatio) {
        throw new UnzipError(
          'compression-ratio',
          `entry '${name}' has a compression ratio of ${ratio.toFixed(0)}:1, above the limit of ${limits.maxCompressionRatio}:1 (possible zip bomb)`,
          name,
        );
      }
    }
    if (method === 0 && compressedSize !== uncompressedSize) {
      throw new UnzipError(
        'corrupt-entry',
        `stored entry '${name}' declares different compressed and uncompressed sizes`,
        name,
      );
    }
    if (localHeaderOffset + 30 > directoryOffset) {
      throw new UnzipError('truncated', `entry '${name}' points outside the archive data`, name);
    }
    entries.push({
      name,
      isDirectory: name.endsWith('/'),
      compressedSize,
      uncompressedSize,
      crc32: crc,
      method,
      localHeaderOffset,
    });
  }
  return entries;
}

/**
 * Vets the archive, then returns every file entry's bytes keyed by name.
 * Directory entries are skipped. Throws UnzipError on the first problem.
 */
export function safeUnzip(buffer: Uint8Array, limits: UnzipLimits = DEFAULT_UNZIP_LIMITS): Map<string, Uint8Array> {
  const entries = inspectZip(buffer, limits);
  const view = new DataView(buffer.buffer, buffer.byteOffset, buffer.byteLength);
  const files = new Map<string, Uint8Array>();
  for (const entry of entries) {
    if (entry.isDirectory) continue;
    const at = entry.localHeaderOffset;
    if (view.getUint32(at, true) !== LOCAL_SIGNATURE) {
      throw new UnzipError('corrupt-entry', `entry '${entry.name}' has no valid local header`, entry.name);
    }
    const dataStart = at + 30 + view.getUint16(at + 26, true) + view.getUint16(at + 28, true);
    const dataEnd = dataStart + entry.compressedSize;
    if (dataEnd > buffer.byteLength)
      throw new UnzipError('truncated', `entry '${entry.name}' is cut short`, entry.name);
    const raw = buffer.subarray(dataStart, dataEnd);
    let data: Uint8Array;
    if (entry.method === 0) {
      data = raw;
    } else {
      try {
        // maxOutputLength caps the allocation at the declared size (+1 to detect a lie).
        data = inflateRawSync(raw, { maxOutputLength: entry.uncompressedSize + 1 });
      } catch (err) {
        const tooBig = err instanceof RangeError || (err as { code?: string }).code === 'ERR_BUFFER_TOO_LARGE';
        throw new UnzipError(
          tooBig ? 'entry-too-large' : 'corrupt-entry',
          tooBig
            ? `entry '${entry.name}' inflates to more than the ${entry.uncompressedSize} bytes it declares`
            : `entry '${entry.name}' could not be inflated: the data is corrupt`,
          entry.name,
        );
      }
    }
    if (data.byteLength !== entry.uncompressedSize) {
      throw new UnzipError(
        'corrupt-entry',
        `entry '${entry.name}' holds ${data.byteLength} bytes but declares ${entry.uncompressedSize}`,
        entry.name,
      );
    }
    if (crc32(data) >>> 0 !== entry.crc32) {
      throw new UnzipError('corrupt-entry', `entry '${entry.name}' fails its CRC-32 check`, entry.name);
    }
    files.set(entry.name, new Uint8Array(data));
  }
  return files;
}

/** Refuses absolute paths, drive letters, backslashes, parent segments and control characters. */
function checkEntryName(name: string): void {
  const refuse = (why: string) => {
    throw new UnzipError('unsafe-path', `entry name '${name}' is refused: ${why}`, name);
  };
  if (name.length === 0) refuse('it is empty');
  if (/[\u0000-\u001f]/.test(name)) refuse('it contains a control character');
  if (name.includes('\\')) refuse('it contains a backslash');
  if (name.startsWith('/')) refuse('it is an absolute path');
  if (/^[A-Za-z]:/.test(name)) refuse('it starts with a drive letter');
  const segments = name.split('/');
  if (segments.some((s) => s === '..')) refuse("it climbs out of the archive with '..'");
  if (segments.slice(0, -1).some((s) => s === '' || s === '.')) refuse('it has an empty or "." path segment');
}

function findEndOfCentralDirectory(view: DataView): number {
  const last = view.byteLength - 22;
  const first = Math.max(0, last - 0xffff);
  for (let at = last; at >= first; at--) {
    if (view.getUint32(at, true) === EOCD_SIGNATURE) {
      const commentLength = view.getUint16(at + 20, true);
      if (at + 22 + commentLength === view.byteLength) return at;
    }
  }
  return -1;
}
