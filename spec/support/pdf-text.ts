import { execFile } from 'node:child_process';
import { join } from 'node:path';

/** The text of a PDF, read back by pdfjs-dist in a Node.js process of its own (see pdf-text-reader.mjs). */
export function pdfText(pdf: Buffer): Promise<{ pages: number; text: string }> {
  return new Promise((resolve, reject) => {
    const child = execFile(process.execPath, [join(__dirname, 'pdf-text-reader.mjs')], { maxBuffer: 64 * 1024 * 1024 }, (error, stdout, stderr) => {
      if (error) reject(new Error(`pdf-text: ${error.message} ${stderr}`));
      else resolve(JSON.parse(stdout) as { pages: number; text: string });
    });
    child.stdin!.end(pdf);
  });
}

/**
 * The fonts a PDF embeds, from its font dictionaries (written uncompressed by pdfkit): each
 * `/BaseFont` name (a subset is prefixed with six letters and "+") and whether its program is in
 * the file (`/FontFile2` for TrueType outlines).
 */
export function embeddedFonts(pdf: Buffer): { names: string[]; programs: number } {
  const raw = pdf.toString('latin1');
  const names = [...new Set([...raw.matchAll(/\/BaseFont\s*\/([A-Za-z0-9+_-]+)/g)].map((m) => m[1].replace(/^[A-Z]{6}\+/, '')))].sort();
  return { names, programs: (raw.match(/\/FontFile[23]?\s/g) ?? []).length };
}
