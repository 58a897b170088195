import { readFile } from 'node:fs/promises';
import XlsxPopulate from 'xlsx-populate';
import { REPORT_LAYOUT } from '../../server/workbooks/report-workbook';
import { pdfText } from '../support/pdf-text';
import { animationsDone, openBrowser, openTender, screenshot, seriousViolations, signIn } from './support/browser';

/**
 * The evaluation report from the tender page, on the demo's closed salt tender NHP-2026-014
 * (another browser test may take it on to awarded and notified: the report is read, never changes
 * it, and only what holds at every stage after closing is asserted).
 */
let b: Awaited<ReturnType<typeof openBrowser>>;
beforeAll(async () => {
  b = await openBrowser();
});
afterAll(() => b.close());

test('the buyer downloads the evaluation report of the salt tender as a PDF and as a workbook from its page', async () => {
  const { page } = b;
  await signIn(page, 'buyer@demo.tendara.test');
  await openTender(page, 'NHP-2026-014');
  const pdfLink = page.getByRole('link', { name: 'Evaluation report (PDF)' });
  const xlsxLink = page.getByRole('link', { name: 'Evaluation report (.xlsx)' });
  await pdfLink.waitFor();
  await page.getByText('It is decision support: your procurement rules and the law that applies to this tender govern the award.').waitFor();
  await animationsDone(page);
  await screenshot(page, 'report-buyer-1280');
  expect(await seriousViolations(page)).toEqual([]);

  const [pdf] = await Promise.all([page.waitForEvent('download'), pdfLink.click()]);
  expect(pdf.suggestedFilename()).toBe('NHP-2026-014-evaluation-report.pdf');
  const { text } = await pdfText(await readFile(await pdf.path()));
  const words = text.replace(/\s+/g, ' ');
  expect(['Evaluation report — NHP-2026-014', '5. Bids, compliance and abnormally low prices', '11. Audit trail'].map((s) => words.includes(s))).toEqual([true, true, true]);

  const [xlsx] = await Promise.all([page.waitForEvent('download'), xlsxLink.click()]);
  expect(xlsx.suggestedFilename()).toBe('NHP-2026-014-evaluation-report.xlsx');
  const book = await XlsxPopulate.fromDataAsync(await readFile(await xlsx.path()));
  expect(book.sheet(REPORT_LAYOUT.summary)!.cell('A1').value()).toEqual(expect.stringMatching(/^Evaluation report — NHP-2026-014: /));
});
