import { inflateRaw } from 'node:zlib';
import { promisify } from 'node:util';

/**
 * Checks an uploaded file is a real, harmless .xlsx package before any spreadsheet library sees it.
 *
 * An .xlsx is a zip package. Spreadsheet libraries unzip every part into memory, so a crafted file of
 * a few kilobytes could expand to gigabytes (a "zip bomb"). We therefore read the zip's central
 * directory ourselves, refuse absurd declared sizes, and then inflate each part with a hard output
 * limit, so a part that lies about its size is caught too. The file name and the browser's MIME type
 * are never consulted: a renamed .csv or .pdf fails on its content.
 */

export interface XlsxLimits {
  /** Largest upload accepted, in bytes. */
  maxBytes: number;
  /** Most parts (zip entries) a package may hold. */
  maxEntries: number;
  /** Largest total uncompressed size of all parts, in bytes. */
  maxTotalUncompressed: number;
  /** Highest compression ratio accepted for a part larger than `ratioAppliesAbove` bytes. */
  maxRatio: number;
  ratioAppliesAbove: number;
}

export const DEFAULT_XLSX_LIMITS: Readonly<XlsxLimits> = Object.freeze({
  maxBytes: 5 * 1024 * 1024,
  maxEntries: 2000,
  maxTotalUncompressed: 50 * 1024 * 1024,
  maxRatio: 200,
  ratioAppliesAbove: 1024 * 1024,
});

/** Why a file was refused; routes may map these to statuses (e.g. too-large → 413). */
export type XlsxRejection = 'too-large' | 'not-xlsx' | 'encrypted' | 'unsupported' | 'corrupt' | 'zip-bomb' | 'too-many-entries';

export interface ZipEntryInfo {
  name: string;
  method: number;
  compressedSize: number;
  uncompressedSize: number;
  localHeaderOffset: number;
}

export type XlsxCheck =
  | { ok: true; entries: ZipEntryInfo[] }
  | { ok: false; reason: XlsxRejection; message: string };

/** Thrown by {@link assertSafeXlsx}; `message` is written for the person who uploaded the file. */
export class UnsafeWorkbookError extends Error {
  constructor(readonly reason: XlsxRejection, message: string) {
    super(message);
    this.name = 'UnsafeWorkbookError';
  }
}

const SIG_LOCAL = 0x04034b50;
const SIG_CENTRAL = 0x02014b50;
const SIG_END = 0x06054b50;
const END_RECORD_SIZE = 22;
const MAX_COMMENT = 0xffff;
const ZIP64_MARK_32 = 0xffffffff;
const ZIP64_MARK_16 = 0xffff;
const METHOD_STORED = 0;
const METHOD_DEFLATE = 8;

const inflateRawAsync = promisify(inflateRaw);

/** Human-readable size for messages ("5 MB", "812 kB"). */
export function formatBytes(bytes: number): string {
  if (bytes >= 1024 * 1024) return `${(bytes / (1024 * 1024)).toFixed(1).replace(/\.0$/, '')} MB`;
  if (bytes >= 1024) return `${Math.round(bytes / 1024)} kB`;
  return `${bytes} bytes`;
}

/** True when the bytes start like a zip package (any zip: .xlsx, .docx, .ods…). */
export function looksLikeZip(buffer: Buffer): boolean {
  return buffer.length >= 4 && buffer.readUInt32LE(0) === SIG_LOCAL;
}

function refuse(reason: XlsxRejection, message: string): XlsxCheck {
  return { ok: false, reason, message };
}

/** Names what a non-zip file most likely is, so the message helps the person fix it. */
function describeNonZip(buffer: Buffer): string {
  const head = buffer.subarray(0, 8);
  if (head.equals(Buffer.from([0xd0, 0xcf, 0x11, 0xe0, 0xa1, 0xb1, 0x1a, 0xe1]))) {
    return 'The file is a password-protected workbook or an old .xls file. Save it as .xlsx without a password and upload it again.';
  }
  if (head.subarray(0, 5).toString('latin1') === '%PDF-') {
    return 'The file is a PDF, not an .xlsx workbook.';
  }
  return 'The file is not an .xlsx workbook (its content is not a zip package). Upload the .xlsx workbook itself, not a copy saved as CSV or another format.';
}

function findEndRecord(buffer: Buffer): number {
  const lowest = Math.max(0, buffer.length - END_RECORD_SIZE - MAX_COMMENT);
  for (let i = buffer.length - END_RECORD_SIZE; i >= lowest; i--) {
    if (buffer.readUInt32LE(i) === SIG_END) return i;
  }
  return -1;
}

/** Reads the central directory; checks structure and declared sizes only (no inflating). */
function readCentralDirectory(buffer: Buffer, limits: XlsxLimits): XlsxCheck {
  const end = findEndRecord(buffer);
  if (end < 0) return refuse('corrupt', 'The workbook is damaged: its zip directory is missing. Save it again as .xlsx.');

  const diskNumber = buffer.readUInt16LE(end + 4);
  const directoryDisk = buffer.readUInt16LE(end + 6);
  const totalEntries = buffer.readUInt16LE(end + 10);
  const directorySize = buffer.readUInt32LE(end + 12);
  const directoryOffset = buffer.readUInt32LE(end + 16);
  if (totalEntries === ZIP64_MARK_16 || directorySize === ZIP64_MARK_32 || directoryOffset === ZIP64_MARK_32) {
    // A workbook under 5 MB never needs ZIP64; accepting it would mean trusting extra size fields.
    return refuse('unsupported', 'The workbook uses ZIP64 packaging, which is not accepted. Save it again as a normal .xlsx.');
  }
  if (diskNumber !== 0 || directoryDisk !== 0) {
    return refuse('unsupported', 'The workbook is split across several files, which is not accepted.');
  }
  if (totalEntries > limits.maxEntries) {
    return refuse('too-many-entries', `The workbook has ${totalEntries} internal parts; at most ${limits.maxEntries} are accepted.`);
  }
  if (directoryOffset + directorySize > end) {
    return refuse('corrupt', 'The workbook is damaged: its zip directory points outside the file.');
  }

  const entries: ZipEntryInfo[] = [];
  const names = new Set<string>();
  let total = 0;
  let pos = directoryOffset;
  for (let i = 0; i < totalEntries; i++) {
    if (pos + 46 > end || buffer.readUInt32LE(pos) !== SIG_CENTRAL) {
      return refuse('corrupt', 'The workbook is damaged: its zip directory is unreadable.');
    }
    const flags = buffer.readUInt16LE(pos + 8);
    const method = buffer.readUInt16LE(pos + 10);
    const compressedSize = buffer.readUInt32LE(pos + 20);
    const uncompressedSize = buffer.readUInt32LE(pos + 24);
    const nameLength = buffer.readUInt16LE(pos + 28);
    const extraLength = buffer.readUInt16LE(pos + 30);
    const commentLength = buffer.readUInt16LE(pos + 32);
    const localHeaderOffset = buffer.readUInt32LE(pos + 42);
    const name = buffer.toString('utf8', pos + 46, pos + 46 + nameLength);
    pos += 46 + nameLength + extraLength + commentLength;

    if (flags & 0x1) return refuse('encrypted', 'The workbook is encrypted. Remove the password and upload it again.');
    if (compressedSize === ZIP64_MARK_32 || uncompressedSize === ZIP64_MARK_32 || localHeaderOffset === ZIP64_MARK_32) {
      return refuse('unsupported', 'The workbook uses ZIP64 packaging, which is not accepted. Save it again as a normal .xlsx.');
    }
    if (method !== METHOD_STORED && method !== METHOD_DEFLATE) {
      return refuse('unsupported', `The workbook part "${name}" uses an unusual compression (method ${method}). Save it again as .xlsx.`);
    }
    // Two parts with one name would let different readers see different content.
    if (names.has(name)) return refuse('corrupt', `The workbook is damaged: the part "${name}" appears twice.`);
    names.add(name);

    total += uncompressedSize;
    if (total > limits.maxTotalUncompressed) {
      return refuse('zip-bomb', `The workbook would expand to more than ${formatBytes(limits.maxTotalUncompressed)}; it is refused as unsafe.`);
    }
    if (uncompressedSize > limits.ratioAppliesAbove && uncompressedSize > compressedSize * limits.maxRatio) {
      return refuse('zip-bomb', `The workbook part "${name}" is compressed more than ${limits.maxRatio} to 1; it is refused as unsafe.`);
    }
    entries.push({ name, method, compressedSize, uncompressedSize, localHeaderOffset });
  }
  return { ok: true, entries };
}

/** Locates an entry's compressed bytes through its local header (whose lengths may differ from the directory's). */
function entryData(buffer: Buffer, entry: ZipEntryInfo): Buffer | null {
  const at = entry.localHeaderOffset;
  if (at + 30 > buffer.length || buffer.readUInt32LE(at) !== SIG_LOCAL) return null;
  const start = at + 30 + buffer.readUInt16LE(at + 26) + buffer.readUInt16LE(at + 28);
  const stop = start + entry.compressedSize;
  return stop > buffer.length ? null : buffer.subarray(start, stop);
}

/**
 * Inflates every part with an output limit equal to its declared size, so a part that expands beyond
 * what the directory declares is stopped after at most that many bytes.
 */
async function verifyDeclaredSizes(buffer: Buffer, entries: ZipEntryInfo[]): Promise<XlsxCheck> {
  for (const entry of entries) {
    const data = entryData(buffer, entry);
    if (!data) return refuse('corrupt', `The workbook is damaged: the part "${entry.name}" is cut short.`);
    if (entry.method === METHOD_STORED) {
      if (data.length !== entry.uncompressedSize) return refuse('corrupt', `The workbook is damaged: the part "${entry.name}" has the wrong size.`);
      continue;
    }
    let inflated: Buffer;
    try {
      inflated = await inflateRawAsync(data, { maxOutputLength: Math.max(1, entry.uncompressedSize) });
    } catch (error) {
      if (error instanceof RangeError || (error as NodeJS.ErrnoException).code === 'ERR_BUFFER_TOO_LARGE') {
        return refuse('zip-bomb', `The workbook part "${entry.name}" expands beyond its declared size; it is refused as unsafe.`);
      }
      return refuse('corrupt', `The workbook is damaged: the part "${entry.name}" cannot be decompressed.`);
    }
    if (inflated.length !== entry.uncompressedSize) {
      return refuse('corrupt', `The workbook is damaged: the part "${entry.name}" has the wrong size.`);
    }
  }
  return { ok: true, entries };
}

/**
 * Checks `buffer` is an .xlsx package that is safe to hand to a spreadsheet library: size limit,
 * zip signature, `[Content_Types].xml` and `xl/workbook.xml` present, no encryption, entry count,
 * declared and actual uncompressed sizes. Never throws for bad input; the message is user-facing.
 */
export async function inspectXlsx(buffer: Buffer, limits: XlsxLimits = DEFAULT_XLSX_LIMITS): Promise<XlsxCheck> {
  if (buffer.length > limits.maxBytes) {
    return refuse('too-large', `The file is ${buffer.length.toLocaleString('en-US')} bytes; at most ${formatBytes(limits.maxBytes)} is accepted.`);
  }
  if (buffer.length === 0) return refuse('not-xlsx', 'The file is empty.');
  if (!looksLikeZip(buffer) || buffer.length < END_RECORD_SIZE) return refuse('not-xlsx', describeNonZip(buffer));

  const directory = readCentralDirectory(buffer, limits);
  if (!directory.ok) return directory;

  const names = new Set(directory.entries.map((e) => e.name));
  if (!names.has('[Content_Types].xml') || !names.has('xl/workbook.xml')) {
    return refuse('not-xlsx', 'The file is a zip package but not an .xlsx workbook (it may be another kind of document). Upload the .xlsx workbook.');
  }
  return verifyDeclaredSizes(buffer, directory.entries);
}

/** Like {@link inspectXlsx}, but throws {@link UnsafeWorkbookError} for a refused file. */
export async function assertSafeXlsx(buffer: Buffer, limits: XlsxLimits = DEFAULT_XLSX_LIMITS): Promise<ZipEntryInfo[]> {
  const check = await inspectXlsx(buffer, limits);
  if (!check.ok) throw new UnsafeWorkbookError(check.reason, check.message);
  return check.entries;
}
