import XlsxPopulate from 'xlsx-populate';
import type { RunView } from '@shared/evaluation';
import { outputSafeWorkbook } from './spreadsheet-text';
import { HEADER_STYLE, TITLE_STYLE } from './workbook-style';

/**
 * A run's award as a workbook: a summary sheet (totals, status, per-vendor award) and an allocation
 * matrix (vendor × region quantities).
 */
export async function buildAwardWorkbook(run: RunView, tender: { reference: string; title: string }): Promise<Buffer> {
  const wb = await XlsxPopulate.fromBlankAsync();
  const sheet = wb.sheet(0)!.name('Award');
  const r = run.result;
  const money = `#,##0.00 "${run.currency}"`;
  sheet.cell('A1').value(`${tender.reference} — ${tender.title}`).style(TITLE_STYLE);
  sheet.cell('A2').value(`Scenario: ${run.scenarioName}. Status: ${run.status}. Input SHA-256: ${run.inputDigest}`);
  sheet.cell('A3').value('Decision support only: the buyer\'s procurement rules and local law decide.');
  // Row 4: whether this award can be recommended (the published basis) or is a what-if.
  sheet.cell('A4')
    .value(run.awardable ? 'Published award basis: this award can be recommended.' : (run.whatIf ?? 'What-if: for analysis only; it cannot be recommended.'))
    .style({ bold: !run.awardable });
  const facts: [string, number | string | null][] = [
    ['Total', r?.objective ?? null], ['Fixed fees', r?.fixedCost ?? null], ['Variable cost', r?.variableCost ?? null],
    ['Best bound', r?.bound ?? null], ['Relative gap', r?.gap ?? null], ['Engine', r?.engine ?? ''], ['Solve seconds', r?.solveSeconds ?? null],
  ];
  facts.forEach(([label, value], i) => {
    sheet.cell(5 + i, 1).value(label).style({ bold: true });
    const cell = sheet.cell(5 + i, 2).value(value ?? '');
    if (i < 4 && typeof value === 'number') cell.style('numberFormat', money);
  });
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
  return outputSafeWorkbook(wb);
}
