import yauzl from 'yauzl';

/**
 * Checks an uploaded file is a real, harmless .xlsx package before any spreadsheet library sees it.
 *
 * An .xlsx is a zip package. Spreadsheet libraries unzip every part into memory, so a crafted file of
 * a few kilobytes could expand to gigabytes (a "zip bomb"). The zip's central directory is read with
 * yauzl (entry count, names, declared sizes), absurd declared sizes are refused, and then every part
 * is inflated as a stream whose bytes are counted: a part that lies about its size is stopped as
 * soon as it passes the size it declared, and the total actually inflated is capped too. The file
 * name and the browser's MIME type are never consulted: a renamed .csv or .pdf fails on its content.
 * Uploads are checked and parsed in a worker thread (see workbook-pool.ts), never on the thread
 * that answers requests.
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

/**
 * A bid workbook of 500 regions is about 20 parts and well under 1 MB once inflated; a workbook
 * saved by a spreadsheet application adds a few parts (theme, properties). The limits leave wide
 * room above that while keeping what a worker must inflate and parse small: a package of many
 * sub-megabyte parts inflating to 45 MB once kept the server busy for seconds.
 */
export const DEFAULT_XLSX_LIMITS: Readonly<XlsxLimits> = Object.freeze({
  maxBytes: 5 * 1024 * 1024,
  maxEntries: 500,
  maxTotalUncompressed: 20 * 1024 * 1024,
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
const END_RECORD_SIZE = 22;
const METHOD_STORED = 0;
const METHOD_DEFLATE = 8;

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

function refuse(reason: XlsxRejection, message: string): XlsxCheck & { ok: false } {
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

/** A refusal carried through yauzl's callbacks. */
class Refused extends Error {
  constructor(readonly check: XlsxCheck & { ok: false }) {
    super(check.message);
  }
}

function openZip(buffer: Buffer): Promise<yauzl.ZipFile> {
  return new Promise((resolve, reject) => {
    // autoClose off: the parts are inflated after the whole directory has been read.
    yauzl.fromBuffer(buffer, { lazyEntries: true, autoClose: false, validateEntrySizes: true, decodeStrings: true, strictFileNames: false }, (error, zip) => {
      if (error || !zip) {
        const text = String(error?.message ?? '');
        if (/multi-disk/i.test(text)) reject(new Refused(refuse('unsupported', 'The workbook is split across several files, which is not accepted.')));
        else if (/end of central directory record signature not found/i.test(text)) reject(new Refused(refuse('corrupt', 'The workbook is damaged: its zip directory is missing. Save it again as .xlsx.')));
        else reject(new Refused(refuse('corrupt', 'The workbook is damaged: its zip directory is unreadable.')));
        return;
      }
      resolve(zip);
    });
  });
}

/** Reads the central directory; checks structure and declared sizes only (no inflating). */
function readEntries(zip: yauzl.ZipFile, limits: XlsxLimits): Promise<yauzl.Entry[]> {
  if (zip.entryCount > limits.maxEntries) {
    return Promise.reject(new Refused(refuse('too-many-entries', `The workbook has ${zip.entryCount} internal parts; at most ${limits.maxEntries} are accepted.`)));
  }
  return new Promise((resolve, reject) => {
    const entries: yauzl.Entry[] = [];
    const names = new Set<string>();
    let total = 0;
    const stop = (check: XlsxCheck & { ok: false }) => {
      zip.removeAllListeners('entry');
      reject(new Refused(check));
    };
    zip.on('error', () => stop(refuse('corrupt', 'The workbook is damaged: its zip directory is unreadable.')));
    zip.on('end', () => resolve(entries));
    zip.on('entry', (entry: yauzl.Entry) => {
      const name = entry.fileName;
      if (entry.isEncrypted()) return stop(refuse('encrypted', 'The workbook is encrypted. Remove the password and upload it again.'));
      if (entry.compressionMethod !== METHOD_STORED && entry.compressionMethod !== METHOD_DEFLATE) {
        return stop(refuse('unsupported', `The workbook part "${name}" uses an unusual compression (method ${entry.compressionMethod}). Save it again as .xlsx.`));
      }
      // Two parts with one name would let different readers see different content.
      if (names.has(name)) return stop(refuse('corrupt', `The workbook is damaged: the part "${name}" appears twice.`));
      names.add(name);
      total += entry.uncompressedSize;
      if (total > limits.maxTotalUncompressed) {
        return stop(refuse('zip-bomb', `The workbook would expand to more than ${formatBytes(limits.maxTotalUncompressed)}; it is refused as unsafe.`));
      }
      if (entry.uncompressedSize > limits.ratioAppliesAbove && entry.uncompressedSize > entry.compressedSize * limits.maxRatio) {
        return stop(refuse('zip-bomb', `The workbook part "${name}" is compressed more than ${limits.maxRatio} to 1; it is refused as unsafe.`));
      }
      entries.push(entry);
      zip.readEntry();
    });
    zip.readEntry();
  });
}

/**
 * Inflates one part as a stream, counting its bytes. yauzl stops the stream with an error as soon
 * as it passes the declared size, so a lying part costs at most that many bytes; `budget` is what
 * the whole package may still inflate to. Resolves with the bytes the part actually held.
 */
function inflateCounted(zip: yauzl.ZipFile, entry: yauzl.Entry, budget: number, limits: XlsxLimits): Promise<number> {
  const name = entry.fileName;
  return new Promise((resolve, reject) => {
    zip.openReadStream(entry, (error, stream) => {
      if (error || !stream) {
        const text = String(error?.message ?? '');
        reject(new Refused(/size mismatch/i.test(text)
          ? refuse('corrupt', `The workbook is damaged: the part "${name}" has the wrong size.`)
          : refuse('corrupt', `The workbook is damaged: the part "${name}" is cut short.`)));
        return;
      }
      let count = 0;
      stream.on('data', (chunk: Buffer) => {
        count += chunk.length;
        if (count > budget) {
          stream.destroy(new Refused(refuse('zip-bomb', `The workbook would expand to more than ${formatBytes(limits.maxTotalUncompressed)}; it is refused as unsafe.`)));
        }
      });
      stream.on('error', (streamError: Error) => {
        if (streamError instanceof Refused) return reject(streamError);
        const text = streamError.message;
        if (/too many bytes/i.test(text)) reject(new Refused(refuse('zip-bomb', `The workbook part "${name}" expands beyond its declared size; it is refused as unsafe.`)));
        else if (/not enough bytes/i.test(text)) reject(new Refused(refuse('corrupt', `The workbook is damaged: the part "${name}" has the wrong size.`)));
        else reject(new Refused(refuse('corrupt', `The workbook is damaged: the part "${name}" cannot be decompressed.`)));
      });
      stream.on('end', () => resolve(count));
    });
  });
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

  let zip: yauzl.ZipFile | undefined;
  try {
    zip = await openZip(buffer);
    const entries = await readEntries(zip, limits);
    const names = new Set(entries.map((e) => e.fileName));
    if (!names.has('[Content_Types].xml') || !names.has('xl/workbook.xml')) {
      return refuse('not-xlsx', 'The file is a zip package but not an .xlsx workbook (it may be another kind of document). Upload the .xlsx workbook.');
    }
    let inflated = 0;
    for (const entry of entries) inflated += await inflateCounted(zip, entry, limits.maxTotalUncompressed - inflated, limits);
    return {
      ok: true,
      entries: entries.map((e) => ({ name: e.fileName, method: e.compressionMethod, compressedSize: e.compressedSize, uncompressedSize: e.uncompressedSize })),
    };
  } catch (error) {
    if (error instanceof Refused) return error.check;
    return refuse('corrupt', 'The workbook is damaged and cannot be read. Save it again as .xlsx.');
  } finally {
    zip?.close();
  }
}

/** Like {@link inspectXlsx}, but throws {@link UnsafeWorkbookError} for a refused file. */
export async function assertSafeXlsx(buffer: Buffer, limits: XlsxLimits = DEFAULT_XLSX_LIMITS): Promise<ZipEntryInfo[]> {
  const check = await inspectXlsx(buffer, limits);
  if (!check.ok) throw new UnsafeWorkbookError(check.reason, check.message);
  return check.entries;
}
