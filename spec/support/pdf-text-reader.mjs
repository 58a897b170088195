// Reads a PDF on standard input and prints {pages, text, fonts} as JSON, with pdfjs-dist's legacy
// build (the one made for Node.js). A script of its own because pdfjs-dist is ES modules only and
// the server tests run as CommonJS under jest: `pdfText` in pdf-text.ts runs it with Node.
import { getDocument } from 'pdfjs-dist/legacy/build/pdf.mjs';

const chunks = [];
for await (const chunk of process.stdin) chunks.push(chunk);
const doc = await getDocument({ data: new Uint8Array(Buffer.concat(chunks)), useSystemFonts: false }).promise;
const pages = [];
for (let n = 1; n <= doc.numPages; n++) {
  const page = await doc.getPage(n);
  const content = await page.getTextContent();
  // Items of one line are joined by a space, lines by a new line (pdfkit writes one item per line).
  pages.push(content.items.map((item) => ('str' in item ? item.str + (item.hasEOL ? '\n' : ' ') : '')).join(''));
}
process.stdout.write(JSON.stringify({ pages: doc.numPages, text: pages.join('\n') }));
