import XlsxPopulate from 'xlsx-populate';
import type { ReportContent } from '../services/report/report-content';
import { CAUTION, dateTime } from '../services/report/report-words';
import { outputSafeWorkbook } from './spreadsheet-text';
import { FORMATS, HEADER_STYLE, NOTE_STYLE, TITLE_STYLE, quantityFormat, sizeColumns } from './workbook-style';

/** Sheet names and the labels of the summary's figures, for anyone reading the file back. */
export const REPORT_LAYOUT = {
  summary: 'Summary', bids: 'Bids', scenarios: 'Scenarios', award: 'Award', checks: 'Checks', engine: 'Engine details',
  total: 'Total cost at the forecast', headHash: 'Audit trail head hash (SHA-256)', entries: 'Audit trail entries',
} as const;

type Value = string | number | null;
const WHY = 'Why each region went where it did';
const DROP_OUT = 'If an awarded vendor dropped out';
const FORECAST = 'If the forecast changed';

/**
 * The evaluation report as a workbook, from the same content as the PDF: a summary sheet (facts,
 * basis, opening, tabulation, the chosen award's totals, recommendation rounds, standstill,
 * contracts, audit chain), then one sheet per table. Money and quantities stay numbers.
 */
export async function buildReportWorkbook(c: ReportContent): Promise<Buffer> {
  const L = REPORT_LAYOUT;
  const t = c.tender;
  const at = (iso: string | null) => dateTime(iso, t.timeZone);
  const money = `#,##0.00 "${t.currency}"`;
  const wb = await XlsxPopulate.fromBlankAsync();

  const summary = wb.sheet(0)!.name(L.summary);
  summary.cell('A1').value(`Evaluation report — ${t.reference}: ${t.title}`).style(TITLE_STYLE);
  summary.cell('A2').value(CAUTION).style(NOTE_STYLE);
  summary.cell('A3').value(`Made ${at(c.generatedAt)}; times in ${t.timeZone}.`).style(NOTE_STYLE);
  let row = 5;
  const section = (title: string) => {
    row += 1;
    summary.cell(row, 1).value(title).style(HEADER_STYLE);
    summary.cell(row, 2).style(HEADER_STYLE);
    row += 1;
  };
  const fact = (label: string, value: Value, format?: string) => {
    summary.cell(row, 1).value(label).style({ bold: true });
    const cell = summary.cell(row, 2).value(value ?? '—');
    if (typeof value === 'number' && format) cell.style('numberFormat', format);
    row += 1;
  };
  section('Tender and buying body');
  fact('Reference', t.reference);
  fact('What is bought', `${t.commodity} (${t.unit})`);
  fact('Status', t.status);
  fact('Published', at(t.publishedAt));
  fact('Closing time', at(t.closesAt));
  fact('Total forecast', t.totalForecast, quantityFormat(t.totalForecast));
  fact('Estimated value', t.estimatedValue, money);
  fact('Buying body', t.buyingBody ? `${t.buyingBody.name}, ${t.buyingBody.address} (${t.buyingBody.country}), ${t.buyingBody.email}` : 'not named');
  section('Published award basis');
  c.awardBasis.forEach((line, i) => fact(`Rule ${i + 1}`, line));
  section('Clarifications and amendments');
  if (!c.clarifications.length) fact('Clarifications', 'none published');
  c.clarifications.forEach((q) => fact(`Clarification ${q.number}`, `Q: ${q.question} A: ${q.answer} (${at(q.answeredAt)})`));
  if (!c.amendments.length) fact('Amendments', 'none issued');
  c.amendments.forEach((a) => fact(`Amendment ${a.number}`, `${a.reason} (${at(a.issuedAt)})`));
  section('Opening record');
  fact('Opened', c.opening ? at(c.opening.openedAt) : 'no opening record (closed before they were kept)');
  fact('Bids received', c.tabulation.received);
  fact('Withdrawn before closing', c.opening?.withdrawn ?? null);
  fact('Record digest (SHA-256)', c.opening?.digest ?? null);
  fact('Compliant', c.tabulation.compliant);
  fact('Excluded', c.tabulation.excluded);
  fact('Not checked', c.tabulation.notChecked);
  section('The chosen award');
  fact('Scenario', c.chosen?.scenarioName ?? 'no award recommended yet');
  fact('Recommendation', c.chosen?.recommendation ?? null);
  fact('Quality of the award', c.chosen?.statusWords ?? null);
  fact(L.total, c.chosen?.total ?? null, money);
  fact('Fixed fees', c.chosen?.fixedCost ?? null, money);
  fact('Unit prices × quantities', c.chosen?.variableCost ?? null, money);
  section('Recommendation and approval');
  if (!c.recommendations.length) fact('Recommendation', 'none made');
  c.recommendations.forEach((r) => fact(`Round ${r.round}`, `${r.status}. Recommended by ${r.recommendedBy} on ${at(r.recommendedAt)}: ${r.justification}`
    + (r.decidedBy ? ` — decided by ${r.decidedBy} on ${at(r.decidedAt)}${r.comment ? `: ${r.comment}` : ''}` : '')));
  fact('Standstill end', t.standstillEndsAt ? at(t.standstillEndsAt) : t.standstillDays === 0 ? `no standstill: ${t.standstillExemption ?? ''}` : 'fixed at approval');
  section('Contracts');
  if (!c.contracts.length) fact('Contracts', 'none due yet');
  c.contracts.forEach((k) => fact(k.vendor, k.signedOn ? `signed on ${k.signedOn}, recorded by ${k.recordedBy}` : 'not recorded yet'));
  section('Audit trail');
  fact(L.entries, c.audit.entries);
  fact(L.headHash, c.audit.headHash);
  fact('Verification', `${c.audit.verified ? 'Verified' : 'Does not verify'}: ${c.audit.message}`);
  sizeColumns(summary, [36, 110]);

  table(wb.addSheet(L.bids), ['Vendor', 'SME', 'Fixed fee', 'Capacity', 'Regions priced', 'Total at forecast', 'Compliance', 'Abnormally low'],
    c.bids.map((b) => [b.vendor, b.sme ? 'yes' : 'no', b.fixedFee, b.capacity, b.regionsPriced, b.totalAtForecast, b.compliance, b.abnormallyLow]),
    [null, null, money, FORMATS.quantity, null, money, null, null], [30, 6, 14, 12, 14, 18, 40, 40]);
  const scenarios = wb.addSheet(L.scenarios);
  table(scenarios, ['Scenario', 'Basis', 'Outcome', 'Total cost', 'Above plain split', 'Above plain split (%)', 'Vendors awarded'],
    c.scenarios.rows.map((r) => [r.name, r.awardable ? 'Published basis' : `What-if${r.whatIf ? `: ${r.whatIf}` : ''}`, r.status, r.total, r.overSplit,
      r.overSplitPercent, r.vendorsAwarded]),
    [null, null, null, money, money, '0.0%', null], [30, 50, 12, 16, 18, 18, 14]);
  const sole = c.scenarios.costOfSoleAward;
  if (sole) {
    const last = c.scenarios.rows.length + 3;
    scenarios.cell(last, 1).value('Cost of awarding each region to one vendor').style({ bold: true });
    scenarios.cell(last, 4).value(sole.low).style('numberFormat', money);
    if (!sole.exact) scenarios.cell(last, 5).value(sole.high).style('numberFormat', money);
  }
  const award = wb.addSheet(L.award);
  table(award, ['Region', 'Code', 'Vendor', 'Quantity', 'Unit price', 'Line value'],
    (c.chosen?.lines ?? []).map((l) => [l.regionName, l.region, l.vendor, l.quantity, l.unitPrice, l.value]),
    [null, null, null, FORMATS.quantity, money, money], [28, 10, 30, 14, 14, 16]);
  award.cell((c.chosen?.lines.length ?? 0) + 3, 1).value('Quantities and values are estimated at the forecast; they are not a volume commitment.').style(NOTE_STYLE);
  table(wb.addSheet(L.checks), ['Check', 'Subject', 'Finding'], [
    ...(c.explanation ? c.explanation.map((e) => [WHY, e.region, e.why]) : [[WHY, '', 'Not run.']]),
    ...(c.dropOut ? c.dropOut.map((d) => [DROP_OUT, d.vendor, d.words]) : [[DROP_OUT, '', 'Not run.']]),
    ...(c.forecastChecks ?? ['Not run.']).map((s) => [FORECAST, '', s]),
  ], [null, null, null], [34, 30, 110]);
  table(wb.addSheet(L.engine), ['Figure', 'Value'], c.chosen ? [
    ['Run', c.chosen.runId], ['Engine', c.chosen.engine], ['Gap to the proven bound', c.chosen.gap], ['Input digest (SHA-256)', c.chosen.inputDigest],
  ] : [['Run', 'no award recommended yet']], [null, null], [30, 80]);
  return outputSafeWorkbook(wb);
}

function table(sheet: XlsxPopulate.Sheet, headers: string[], rows: Value[][], formats: (string | null)[], widths: number[]): void {
  headers.forEach((h, i) => sheet.cell(1, i + 1).value(h).style(HEADER_STYLE));
  rows.forEach((cells, r) => cells.forEach((value, i) => {
    const cell = sheet.cell(r + 2, i + 1).value(value ?? '—');
    const format = formats[i];
    if (typeof value === 'number' && format) cell.style('numberFormat', format);
  }));
  sizeColumns(sheet, widths);
}
