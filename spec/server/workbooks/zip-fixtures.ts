import { crc32, deflateRawSync, inflateRawSync } from 'node:zlib';
import XlsxPopulate from 'xlsx-populate';
import yauzl from 'yauzl';

/**
 * Test helpers that write and read zip packages byte by byte, so hostile packages (zip bombs,
 * lying sizes, thousands of parts) can be made inside the tests instead of committed as binaries.
 */

export interface FixtureEntry {
  name: string;
  data: Buffer;
  /** Stored instead of deflated. */
  store?: boolean;
  /** Uncompressed size written in the headers, when it should differ from the truth. */
  declaredSize?: number;
}

export function buildZip(entries: FixtureEntry[]): Buffer {
  const locals: Buffer[] = [];
  const centrals: Buffer[] = [];
  let offset = 0;
  for (const entry of entries) {
    const name = Buffer.from(entry.name, 'utf8');
    const body = entry.store ? entry.data : deflateRawSync(entry.data);
    const size = entry.declaredSize ?? entry.data.length;
    const crc = crc32(entry.data);

    const local = Buffer.alloc(30);
    local.writeUInt32LE(0x04034b50, 0);
    local.writeUInt16LE(20, 4);
    local.writeUInt16LE(entry.store ? 0 : 8, 8);
    local.writeUInt32LE(crc, 14);
    local.writeUInt32LE(body.length, 18);
    local.writeUInt32LE(size, 22);
    local.writeUInt16LE(name.length, 26);
    locals.push(local, name, body);

    const central = Buffer.alloc(46);
    central.writeUInt32LE(0x02014b50, 0);
    central.writeUInt16LE(20, 4);
    central.writeUInt16LE(20, 6);
    central.writeUInt16LE(entry.store ? 0 : 8, 10);
    central.writeUInt32LE(crc, 16);
    central.writeUInt32LE(body.length, 20);
    central.writeUInt32LE(size, 24);
    central.writeUInt16LE(name.length, 28);
    central.writeUInt32LE(offset, 42);
    centrals.push(central, name);
    offset += 30 + name.length + body.length;
  }
  const directory = Buffer.concat(centrals);
  const end = Buffer.alloc(22);
  end.writeUInt32LE(0x06054b50, 0);
  end.writeUInt16LE(entries.length, 8);
  end.writeUInt16LE(entries.length, 10);
  end.writeUInt32LE(directory.length, 12);
  end.writeUInt32LE(offset, 16);
  return Buffer.concat([...locals, directory, end]);
}

/** The minimum parts that make a zip look like an .xlsx to the guard. */
export function xlsxLikeParts(): FixtureEntry[] {
  return [
    { name: '[Content_Types].xml', data: Buffer.from('<?xml version="1.0"?><Types/>') },
    { name: 'xl/workbook.xml', data: Buffer.from('<?xml version="1.0"?><workbook/>') },
  ];
}

/** Text of one part of a (well-formed) zip package. */
export function readZipText(zip: Buffer, name: string): string {
  let end = zip.length - 22;
  while (end >= 0 && zip.readUInt32LE(end) !== 0x06054b50) end--;
  const count = zip.readUInt16LE(end + 10);
  let pos = zip.readUInt32LE(end + 16);
  for (let i = 0; i < count; i++) {
    const method = zip.readUInt16LE(pos + 10);
    const compressed = zip.readUInt32LE(pos + 20);
    const nameLength = zip.readUInt16LE(pos + 28);
    const extra = zip.readUInt16LE(pos + 30);
    const comment = zip.readUInt16LE(pos + 32);
    const local = zip.readUInt32LE(pos + 42);
    const entryName = zip.toString('utf8', pos + 46, pos + 46 + nameLength);
    if (entryName === name) {
      const start = local + 30 + zip.readUInt16LE(local + 26) + zip.readUInt16LE(local + 28);
      const body = zip.subarray(start, start + compressed);
      return (method === 0 ? body : inflateRawSync(body)).toString('utf8');
    }
    pos += 46 + nameLength + extra + comment;
  }
  throw new Error(`no part ${name}`);
}

/** Opens a workbook, lets `edit` change it as a person would in a spreadsheet app, and saves it. */
export async function editWorkbook(buffer: Buffer, edit: (workbook: XlsxPopulate.Workbook) => void): Promise<Buffer> {
  const workbook = await XlsxPopulate.fromDataAsync(buffer);
  edit(workbook);
  return workbook.outputAsync();
}

/** Finds the style index of a cell in a sheet's XML and returns that cell format (xf) element. */
export function cellFormat(sheetXml: string, stylesXml: string, address: string): string {
  const cell = new RegExp(`<c r="${address}"[^>]*?\\ss="(\\d+)"`).exec(sheetXml);
  const index = cell ? Number(cell[1]) : 0;
  const cellXfs = /<cellXfs[^>]*>([\s\S]*?)<\/cellXfs>/.exec(stylesXml)?.[1] ?? '';
  const formats = cellXfs.match(/<xf\b[^>]*?(?:\/>|>[\s\S]*?<\/xf>)/g) ?? [];
  return formats[index] ?? '';
}

/** Every part of a zip package, by name (read with yauzl). */
export async function unzipAll(zip: Buffer): Promise<Map<string, Buffer>> {
  return new Promise((resolve, reject) => {
    yauzl.fromBuffer(zip, { lazyEntries: true }, (error, file) => {
      if (error || !file) return reject(error ?? new Error('yauzl opened no zip'));
      const parts = new Map<string, Buffer>();
      file.on('error', reject);
      file.on('end', () => resolve(parts));
      file.on('entry', (entry: yauzl.Entry) => {
        file.openReadStream(entry, (streamError, stream) => {
          if (streamError || !stream) return reject(streamError ?? new Error(`yauzl opened no stream for ${entry.fileName}`));
          const chunks: Buffer[] = [];
          stream.on('data', (c: Buffer) => chunks.push(c));
          stream.on('error', reject);
          stream.on('end', () => {
            parts.set(entry.fileName, Buffer.concat(chunks));
            file.readEntry();
          });
        });
      });
      file.readEntry();
    });
  });
}
