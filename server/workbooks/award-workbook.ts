import XlsxPopulate from 'xlsx-populate';
import { awardStatusWords, marginAboveBest } from '@shared/award-wording';
import type { RunStatus, RunView } from '@shared/evaluation';
import { outputSafeWorkbook } from './spreadsheet-text';
import { HEADER_STYLE, TITLE_STYLE } from './workbook-style';

/**
 * A run's award as a workbook: a summary sheet (totals, status in the buyer's words, per-vendor
 * award), an allocation matrix (vendor × region quantities) and an appendix with the engine's own
 * figures (bound, gap, bound source, engine, seconds), which the decision screens keep out of sight.
 */
/** A run's status in words when it has no award to describe. */
const RUN_STATUS_WORDS: Record<RunStatus, string> = {
  queued: 'waiting to start', solving: 'solving', optimal: 'best possible award (proven)', feasible: 'best award found in the time limit',
  infeasible: 'no award meets the rules', failed: 'the solve failed', cancelled: 'cancelled',
};

export async function buildAwardWorkbook(run: RunView, tender: { reference: string; title: string }): Promise<Buffer> {
  const wb = await XlsxPopulate.fromBlankAsync();
  const sheet = wb.sheet(0)!.name('Award');
  const r = run.result;
  const money = `#,##0.00 "${run.currency}"`;
  sheet.cell('A1').value(`${tender.reference} — ${tender.title}`).style(TITLE_STYLE);
  sheet.cell('A2').value(`Scenario: ${run.scenarioName}. Status: ${awardStatusWords(r) ?? RUN_STATUS_WORDS[run.status]}. Input SHA-256: ${run.inputDigest}`);
  sheet.cell('A3').value('Decision support only: the buyer\'s procurement rules and local law decide.');
  // Row 4: whether this award can be recommended (the published basis) or is a what-if.
  sheet.cell('A4')
    .value(run.awardable ? 'Published award basis: this award can be recommended.' : (run.whatIf ?? 'What-if: for analysis only; it cannot be recommended.'))
    .style({ bold: !run.awardable });
  const facts: [string, number | string | null][] = [
    ['Total', r?.objective ?? null], ['Fixed fees', r?.fixedCost ?? null], ['Variable cost', r?.variableCost ?? null],
  ];
  facts.forEach(([label, value], i) => {
    sheet.cell(5 + i, 1).value(label).style({ bold: true });
    const cell = sheet.cell(5 + i, 2).value(value ?? '');
    if (typeof value === 'number') cell.style('numberFormat', money);
  });
  sheet.cell(9, 1).value('How the award was computed: see the sheet "Engine details".');
  let row = 13;
  ['Vendor', 'Fixed fee', 'Quantity', 'Value', 'Share of volume'].forEach((h, i) => sheet.cell(row, i + 1).value(h).style(HEADER_STYLE));
  for (const a of r?.awards ?? []) {
    row += 1;
    sheet.cell(row, 1).value(run.vendors[a.vendor]?.name ?? a.vendor);
    sheet.cell(row, 2).value(a.fixedFee).style('numberFormat', money);
    sheet.cell(row, 3).value(a.quantity).style('numberFormat', '#,##0.###');
    sheet.cell(row, 4).value(a.value).style('numberFormat', money);
    sheet.cell(row, 5).value(a.share).style('numberFormat', '0.0%');
  }
  if (r?.diagnosis.length) {
    row += 2;
    sheet.cell(row, 1).value('Diagnosis').style({ bold: true });
    for (const d of r.diagnosis) sheet.cell(++row, 1).value(d);
  }
  sheet.column(1).width(42);
  for (const c of [2, 3, 4, 5]) sheet.column(c).width(18);

  const matrix = wb.addSheet('Allocation');
  const regions = Object.keys(run.regions);
  matrix.cell(1, 1).value(`Quantities (${run.unit}) by vendor and region`).style(TITLE_STYLE);
  matrix.cell(3, 1).value('Vendor').style(HEADER_STYLE);
  regions.forEach((code, j) => matrix.cell(3, j + 2).value(code).style(HEADER_STYLE));
  (r?.awards ?? []).forEach((a, i) => {
    matrix.cell(4 + i, 1).value(run.vendors[a.vendor]?.name ?? a.vendor);
    for (const line of a.lines) matrix.cell(4 + i, regions.indexOf(line.region) + 2).value(line.quantity).style('numberFormat', '#,##0.###');
  });
  matrix.column(1).width(42);

  // Appendix: the engine's own words, for specialists and the file; the summary sheet speaks plainly.
  const engine = wb.addSheet('Engine details');
  engine.cell('A1').value('Engine details').style(TITLE_STYLE);
  engine.cell('A2').value('How the engine reached this award. A lower limit proven on the best possible total; the gap is (total − lower limit) ÷ total.');
  const details: [string, number | string | null, string?][] = [
    ['Run status (engine)', run.status], ['Best bound (lower limit on the best possible total)', r?.bound ?? null, money],
    ['Bound from', r?.boundSource ?? ''], ['Relative gap', r?.gap ?? null, '0.00%'],
    ['At most above the best possible', marginAboveBest(r), '0.00%'], ['Engine', r?.engine ?? ''], ['Solve seconds', r?.solveSeconds ?? null],
    ['Time limit (seconds)', run.timeLimitSeconds],
  ];
  details.forEach(([label, value, format], i) => {
    engine.cell(4 + i, 1).value(label).style({ bold: true });
    const cell = engine.cell(4 + i, 2).value(value ?? '');
    if (format && typeof value === 'number') cell.style('numberFormat', format);
  });
  engine.column(1).width(52);
  engine.column(2).width(40);
  return outputSafeWorkbook(wb);
}
