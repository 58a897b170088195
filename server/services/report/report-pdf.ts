import PDFDocument from 'pdfkit';
import type { ReportContent } from './report-content';
import { CAUTION, dateTime, formatMoney, formatQuantity, percentText } from './report-words';

/**
 * Noto Sans from `@fontsource/noto-sans` (the typeface of the screens), embedded as a subset.
 * Fontsource ships WOFF and WOFF2 only; pdfkit reads WOFF through fontkit and embeds the glyphs
 * as a TrueType subset (FontFile2), so no TTF copy is kept. The latin subset covers Latin-1
 * (accented names, €, dashes and quotes).
 */
const FONT_FILES = {
  regular: require.resolve('@fontsource/noto-sans/files/noto-sans-latin-400-normal.woff'),
  bold: require.resolve('@fontsource/noto-sans/files/noto-sans-latin-700-normal.woff'),
};

const MARGIN = 50;
const MUTED = '#555555';

/** The evaluation report as an A4 PDF (no browser: pdfkit draws it). */
export function buildReportPdf(c: ReportContent): Promise<Buffer> {
  const doc = new PDFDocument({
    size: 'A4', margin: MARGIN, bufferPages: true,
    info: { Title: `Evaluation report — ${c.tender.reference}`, Subject: c.tender.title, Creator: 'Tendara' },
    lang: 'en-GB', displayTitle: true,
  });
  doc.registerFont('body', FONT_FILES.regular);
  doc.registerFont('bold', FONT_FILES.bold);
  const chunks: Buffer[] = [];
  doc.on('data', (chunk: Buffer) => chunks.push(chunk));
  const done = new Promise<Buffer>((resolve, reject) => {
    doc.on('end', () => resolve(Buffer.concat(chunks)));
    doc.on('error', reject);
  });
  new ReportWriter(doc, c).write();
  doc.end();
  return done;
}

class ReportWriter {
  private readonly width: number;
  private readonly money: (n: number | null) => string;
  private readonly qty: (n: number) => string;
  private readonly at: (iso: string | null) => string;

  constructor(private readonly doc: PDFKit.PDFDocument, private readonly c: ReportContent) {
    this.width = doc.page.width - 2 * MARGIN;
    this.money = (n) => (n === null ? '—' : formatMoney(n, c.tender.currency));
    this.qty = (n) => `${formatQuantity(n)} ${c.tender.unit}`;
    this.at = (iso) => dateTime(iso, c.tender.timeZone);
  }

  write(): void {
    const { c, doc } = this;
    const t = c.tender;
    doc.font('bold').fontSize(18).fillColor('black').text(`Evaluation report — ${t.reference}`);
    doc.font('body').fontSize(12).text(t.title);
    this.note(`Made ${this.at(c.generatedAt)}. Times in ${t.timeZone}.`);
    this.note(CAUTION);

    this.heading('1. Tender and buying body');
    this.facts([
      ['Reference', t.reference], ['Title', t.title], ['What is bought', `${t.commodity} (${t.unit})`], ['Currency', t.currency],
      ['Status', t.status], ['Published', this.at(t.publishedAt)], ['Closing time', this.at(t.closesAt)], ['Opened', this.at(t.closedAt)],
      ['Regions', `${t.regions.length}, forecast ${this.qty(t.totalForecast)} in all`],
      ['Estimated value', t.estimatedValue === null ? 'not stated' : this.money(t.estimatedValue)],
      ['Buying body', t.buyingBody ? `${t.buyingBody.name}, ${t.buyingBody.address} (${t.buyingBody.country}), ${t.buyingBody.email}` : 'not named'],
    ]);
    this.table(['Region', 'Code', 'Forecast'], t.regions.map((r) => [r.name, r.code, this.qty(r.forecast)]), [0.55, 0.2, 0.25]);

    this.heading('2. Published award basis');
    for (const line of c.awardBasis) this.para(`• ${line}`);

    this.heading('3. Clarifications and amendments');
    if (!c.clarifications.length) this.para('No clarification was published.');
    for (const q of c.clarifications) this.para(`Clarification ${q.number} (${this.at(q.answeredAt)}). Q: ${q.question} A: ${q.answer}`);
    if (!c.amendments.length) this.para('No amendment was issued.');
    for (const a of c.amendments) this.para(`Amendment ${a.number} (${this.at(a.issuedAt)}): ${a.reason}`);

    this.heading('4. Opening record');
    this.para(c.opening
      ? `Opened ${this.at(c.opening.openedAt)}: ${c.opening.received} bids received, ${c.opening.withdrawn} withdrawn before closing.`
      : 'This tender was closed before opening records were kept: its audit trail lists the bids received.');
    if (c.opening) this.facts([['Record digest (SHA-256)', c.opening.digest]]);

    this.heading('5. Bids, compliance and abnormally low prices');
    const tab = c.tabulation;
    this.para(`Bids received: ${tab.received}. Compliant: ${tab.compliant}. Excluded: ${tab.excluded}. Not checked: ${tab.notChecked}.`);
    this.table(
      ['Vendor', 'Fixed fee', 'Regions priced', 'Total at forecast', 'Compliance', 'Abnormally low'],
      c.bids.map((b) => [`${b.vendor}${b.sme ? ' (SME)' : ''}`, this.money(b.fixedFee), `${b.regionsPriced} of ${t.regions.length}`, this.money(b.totalAtForecast), b.compliance, b.abnormallyLow ?? '—']),
      [0.2, 0.13, 0.12, 0.17, 0.2, 0.18],
    );
    this.note('Total at forecast: fixed fee plus each unit price times the region’s forecast, over the regions the bid priced.');

    this.heading('6. Scenarios compared');
    this.table(
      ['Scenario', 'Basis', 'Total cost', 'Above plain split', 'Vendors'],
      c.scenarios.rows.map((r) => [r.name, r.awardable ? 'Published basis' : `What-if${r.whatIf ? `: ${r.whatIf}` : ''}`, r.total === null ? r.status : this.money(r.total),
        r.overSplit === null ? '—' : `${this.money(r.overSplit)}${r.overSplitPercent === null ? '' : ` (${percentText(r.overSplitPercent)})`}`, String(r.vendorsAwarded)]),
      [0.26, 0.26, 0.16, 0.2, 0.12],
    );
    const sole = c.scenarios.costOfSoleAward;
    if (sole) {
      this.para(sole.exact
        ? `Cost of awarding each region to one vendor: ${this.money(sole.low)} (${percentText(sole.lowPercent)}).`
        : `Cost of awarding each region to one vendor: between ${this.money(sole.low)} and ${this.money(sole.high)} (${percentText(sole.lowPercent)} to ${percentText(sole.highPercent)}).`);
    }

    this.heading('7. The chosen award');
    const chosen = c.chosen;
    if (!chosen) {
      this.para('No award is recommended yet.');
    } else {
      this.facts([
        ['Scenario', chosen.scenarioName], ['Recommendation', chosen.recommendation], ['Quality of the award', chosen.statusWords ?? '—'],
        ['Total cost at the forecast', this.money(chosen.total)], ['Fixed fees', this.money(chosen.fixedCost)], ['Unit prices × quantities', this.money(chosen.variableCost)],
      ]);
      this.table(['Region', 'Vendor', 'Quantity', 'Unit price', 'Line value'],
        chosen.lines.map((l) => [`${l.regionName} (${l.region})`, l.vendor, this.qty(l.quantity), this.money(l.unitPrice), this.money(l.value)]),
        [0.26, 0.26, 0.16, 0.14, 0.18]);
      this.table(['Vendor', 'Fixed fee', 'Quantity', 'Share', 'Value'],
        chosen.vendors.map((v) => [v.vendor, this.money(v.fixedFee), this.qty(v.quantity), percentText(v.share), this.money(v.value)]),
        [0.3, 0.17, 0.18, 0.13, 0.22]);
      this.note('Quantities and values are estimated at the forecast; they are not a volume commitment.');
      this.subheading('Why each region went where it did');
      if (!c.explanation) this.para('Not run.');
      for (const e of c.explanation ?? []) this.para(`${e.region}: ${e.why}`);
    }

    this.heading('8. Checks of the award');
    this.subheading('If an awarded vendor dropped out');
    if (!c.dropOut) this.para('Not run.');
    for (const d of c.dropOut ?? []) this.para(`${d.vendor}: ${d.words}`);
    this.subheading('If the forecast changed');
    if (!c.forecastChecks) this.para('Not run.');
    for (const s of c.forecastChecks ?? []) this.para(s);

    this.heading('9. Recommendation and approval');
    if (!c.recommendations.length) this.para('No recommendation was made.');
    for (const r of c.recommendations) {
      this.para(`Round ${r.round}: ${r.status}. Recommended by ${r.recommendedBy} on ${this.at(r.recommendedAt)}: “${r.justification}”`
        + (r.decidedBy ? ` Decided by ${r.decidedBy} on ${this.at(r.decidedAt)}${r.comment ? `: “${r.comment}”` : ', without comment.'}` : ''));
    }
    this.para(t.standstillEndsAt
      ? `Standstill: ${t.standstillDays} days, ending ${this.at(t.standstillEndsAt)}.`
      : t.standstillDays === 0 ? `No standstill: ${t.standstillExemption ?? ''}` : 'Standstill: fixed when the award is approved.');

    this.heading('10. Contracts');
    if (!c.contracts.length) this.para('No contract is due yet.');
    for (const k of c.contracts) this.para(`${k.vendor}: ${k.signedOn ? `signed on ${k.signedOn}, recorded by ${k.recordedBy}` : 'not recorded yet'}.`);

    this.heading('11. Audit trail');
    this.facts([
      ['Entries', String(c.audit.entries)], ['Head hash (SHA-256)', c.audit.headHash ?? '—'],
      ['Verification', `${c.audit.verified ? 'Verified' : 'Does not verify'}: ${c.audit.message}`],
    ]);

    if (chosen) {
      this.heading('Appendix: engine details');
      this.facts([
        ['Run', chosen.runId], ['Engine', chosen.engine ?? '—'], ['Gap to the proven bound', chosen.gap === null ? '—' : percentText(chosen.gap)],
        ['Input digest (SHA-256)', chosen.inputDigest],
      ]);
    }
    this.pageNumbers();
  }

  private ensureRoom(height: number): void {
    if (this.doc.y + height > this.doc.page.height - MARGIN) this.doc.addPage();
  }

  private heading(text: string): void {
    this.ensureRoom(60);
    this.doc.moveDown(0.8).font('bold').fontSize(13).fillColor('black').text(text, MARGIN, this.doc.y, { width: this.width }).moveDown(0.3);
  }

  private subheading(text: string): void {
    this.ensureRoom(40);
    this.doc.moveDown(0.3).font('bold').fontSize(10).fillColor('black').text(text, MARGIN, this.doc.y, { width: this.width });
  }

  private para(text: string): void {
    this.doc.font('body').fontSize(10).fillColor('black').text(text, MARGIN, this.doc.y, { width: this.width }).moveDown(0.2);
  }

  private note(text: string): void {
    this.doc.font('body').fontSize(9).fillColor(MUTED).text(text, MARGIN, this.doc.y, { width: this.width }).moveDown(0.2);
  }

  /** Label and value pairs, the label in bold. */
  private facts(pairs: [string, string][]): void {
    this.table(null, pairs, [0.3, 0.7]);
  }

  /** A simple table: each row as tall as its tallest cell, a new page (with the header again) when it does not fit. */
  private table(headers: string[] | null, rows: string[][], fractions: number[]): void {
    const { doc } = this;
    const widths = fractions.map((f) => f * this.width);
    const drawRow = (cells: string[], bold: boolean) => {
      doc.font(bold ? 'bold' : 'body').fontSize(9).fillColor('black');
      const height = Math.max(...cells.map((cell, i) => doc.heightOfString(cell, { width: widths[i] - 6 }))) + 4;
      if (doc.y + height > doc.page.height - MARGIN) {
        doc.addPage();
        if (headers && !bold) drawRow(headers, true);
      }
      const y = doc.y;
      let x = MARGIN;
      cells.forEach((cell, i) => {
        doc.font(bold || (!headers && i === 0) ? 'bold' : 'body').text(cell, x, y + 2, { width: widths[i] - 6 });
        x += widths[i];
      });
      doc.moveTo(MARGIN, y + height).lineTo(MARGIN + this.width, y + height).lineWidth(0.5).strokeColor('#bbbbbb').stroke();
      doc.x = MARGIN;
      doc.y = y + height;
    };
    if (headers) drawRow(headers, true);
    for (const row of rows) drawRow(row, false);
    doc.moveDown(0.4);
  }

  private pageNumbers(): void {
    const { doc } = this;
    const range = doc.bufferedPageRange();
    for (let i = range.start; i < range.start + range.count; i++) {
      doc.switchToPage(i);
      // Writing below the bottom margin would otherwise open a new page.
      doc.page.margins.bottom = 0;
      doc.font('body').fontSize(8).fillColor(MUTED)
        .text(`${this.c.tender.reference} — page ${i + 1} of ${range.count}`, MARGIN, doc.page.height - MARGIN + 15, { width: this.width, align: 'center', lineBreak: false });
    }
  }
}
