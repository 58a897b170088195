import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { ComponentFixture, TestBed } from '@angular/core/testing';
import { HarnessLoader } from '@angular/cdk/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MatDialogHarness } from '@angular/material/dialog/testing';
import { MatInputHarness } from '@angular/material/input/testing';
import { MatRadioGroupHarness } from '@angular/material/radio/testing';
import { MatSelectHarness } from '@angular/material/select/testing';
import { MatTableHarness } from '@angular/material/table/testing';
import { MATERIAL_ANIMATIONS } from '@angular/material/core';
import type { TabulatedBid } from '@shared/tenders';
import { signInAs } from '../../awards/testing/award-fixtures';
import { answerWhenAsked } from '../../testing/answer-when-asked';
import { provideApi } from '../../core/http/provide-api';
import { money, quantity } from '../../ui/number-format';
import { tenderView } from '../testing/tender-fixtures';
import { BidTabulation } from './bid-tabulation';

const tender = tenderView({ status: 'closed' });
const bidsUrl = `/api/tenders/${tender.id}/bids`;

function bid(overrides: Partial<TabulatedBid> & Pick<TabulatedBid, 'id' | 'vendor'>): TabulatedBid {
  return {
    fixedFee: 20000,
    capacity: null,
    prices: {},
    submittedAt: '2026-11-19T16:00:00Z',
    revision: 1,
    digest: 'd'.repeat(64),
    nonce: 'e'.repeat(64),
    receiptVerified: true,
    documentId: null,
    compliance: { decision: 'compliant', ground: null, note: null, decidedAt: '2026-11-21T09:00:00Z' },
    abnormallyLow: null,
    flags: { percent: 20, prices: [], total: null, totalCompared: true },
    ...overrides,
  };
}

const northfell = bid({
  id: '11111111-0000-4000-8000-000000000001',
  vendor: { id: 'v-north', name: 'Northfell Minerals', sme: false },
  fixedFee: 25000,
  capacity: 5000,
  prices: { R01: 161.5, R02: 172.25 },
});
/** Its Cranby price is flagged: more than 20 % below the median of the compliant bids. */
const brinewick = bid({
  id: '22222222-0000-4000-8000-000000000002',
  vendor: { id: 'v-brine', name: 'Brinewick Salt Co-op', sme: true },
  fixedFee: 18000,
  prices: { R01: 98.4 },
  compliance: { decision: null, ground: null, note: null, decidedAt: null },
  flags: { percent: 20, prices: [{ region: 'R01', price: 98.4, median: 161.5, threshold: 129.2 }], total: null, totalCompared: false },
});
/** Excluded: its low Wexcombe price is not the lowest of the region, and it is not screened. */
const quarrow = bid({
  id: '33333333-0000-4000-8000-000000000003',
  vendor: { id: 'v-quarrow', name: 'Quarrow Haulage', sme: false },
  fixedFee: 12000,
  capacity: 2500,
  prices: { R01: 150, R02: 120 },
  compliance: { decision: 'excluded', ground: 'qualification', note: 'No haulage licence on file.', decidedAt: '2026-11-21T10:00:00Z' },
  flags: { percent: 20, prices: [], total: null, totalCompared: false },
});

describe('BidTabulation', () => {
  let http: HttpTestingController;
  let loader: HarnessLoader;
  let fixture: ComponentFixture<BidTabulation>;

  beforeEach(async () => {
    TestBed.configureTestingModule({
      imports: [BidTabulation],
      providers: [provideApi(), provideHttpClientTesting(), { provide: MATERIAL_ANIMATIONS, useValue: { animationsDisabled: true } }],
    });
    http = TestBed.inject(HttpTestingController);
    await signInAs('buyer');
    fixture = TestBed.createComponent(BidTabulation);
    fixture.componentRef.setInput('tender', tender);
    loader = TestbedHarnessEnvironment.loader(fixture);
    fixture.detectChanges();
    http.expectOne({ method: 'GET', url: bidsUrl }).flush({ submitted: 3, bids: [northfell, brinewick, quarrow] });
    await fixture.whenStable();
  });

  afterEach(() => http.verify());

  /** The table's cells by column (region columns are `region-<code>`), rows in the page's order (sorted by vendor name). */
  async function cells(): Promise<Record<string, string[]>> {
    const table = await loader.getHarness(MatTableHarness.with({ selector: '[aria-label="Bid tabulation: vendors by region"]' }));
    const byColumn = await table.getCellTextByColumnName();
    const columns: Record<string, string[]> = Object.fromEntries(Object.entries(byColumn).map(([column, { text }]) => [column, text]));
    // The vendor is each row's header cell (a th), which the cell harness does not list.
    columns['vendor'] = [...(fixture.nativeElement as HTMLElement).querySelectorAll('tr.mat-mdc-row th.vendor')].map((th) => th.textContent?.trim() ?? '');
    return columns;
  }

  it('shows each vendor’s figures per region as served, with the lowest price of each region marked', async () => {
    const table = await cells();
    expect(table['vendor']).toEqual(['Brinewick Salt Co-op', 'Northfell Minerals', 'Quarrow Haulage']);
    expect(table['fixedFee']).toEqual([money(18000, 'EUR', 4), money(25000, 'EUR', 4), money(12000, 'EUR', 4)]);
    expect(table['capacity']).toEqual(['No cap', quantity(5000), quantity(2500)]);
    expect(table['sme']).toEqual(['SME', 'No', 'No']);
    // Brinewick's 98.4 is the lowest in Cranby; Quarrow's 120 in Wexcombe does not count (excluded).
    expect(table['region-R01'][0]).toContain(money(98.4, 'EUR', 4));
    expect(table['region-R01'][0]).toContain('lowest');
    expect(table['region-R02'][0]).toContain('not bid');
    expect(table['region-R02'][1]).toContain(money(172.25, 'EUR', 4));
    expect(table['region-R02'][1]).toContain('lowest');
    expect(table['region-R02'][2]).toContain(money(120, 'EUR', 4));
    expect(table['region-R02'][2]).not.toContain('lowest');
    expect((fixture.nativeElement as HTMLElement).querySelector('.summary')?.textContent?.replace(/\s+/g, ' ')).toContain(
      '3 submitted bids · 1 not yet checked · 1 excluded · 1 flagged as abnormally low',
    );
  });

  it('marks the flagged abnormally low price and says by how much, against which median and threshold', async () => {
    const table = await cells();
    expect(table['region-R01'][0]).toContain('flagged as abnormally low');
    expect(table['region-R01'][1]).not.toContain('flagged');
    expect(table['flags'][0]).toContain(
      `Cranby depot: ${money(98.4, 'EUR', 4)} is more than 20 % below the median ${money(161.5, 'EUR', 4)} (threshold ${money(129.2, 'EUR', 4)})`,
    );
    expect(table['flags'][0]).toContain('No decision recorded');
    expect(table['flags'][1]).toBe('None');
  });

  it('shows an excluded bid as excluded, with its ground and note, and does not screen it', async () => {
    const table = await cells();
    expect(table['check'][2]).toContain('Excluded');
    expect(table['check'][2]).toContain('Fails the qualification criteria');
    expect(table['check'][2]).toContain('No haulage licence on file.');
    expect(table['check'][1]).toContain('Compliant');
    expect(table['check'][0]).toContain('Not checked');
    expect(table['flags'][2]).toBe('Not screened (excluded)');
    const rows = (fixture.nativeElement as HTMLElement).querySelectorAll('tr.excluded-row');
    expect(rows).toHaveLength(1);
    expect(rows[0].textContent).toContain('Quarrow Haulage');
  });

  it('records an exclusion through its dialog: PUT …/compliance with the chosen ground and note, then reloads the bids', async () => {
    await (await loader.getHarness(MatButtonHarness.with({ selector: '[aria-label="Compliance check of Brinewick Salt Co-op"]' }))).click();
    const dialog = await TestbedHarnessEnvironment.documentRootLoader(fixture).getHarness(MatDialogHarness);
    expect(await dialog.getTitleText()).toBe('Compliance check: Brinewick Salt Co-op');
    await (await dialog.getHarness(MatRadioGroupHarness)).checkRadioButton({ label: 'Excluded from the evaluation' });
    await (await dialog.getHarness(MatSelectHarness)).clickOptions({ text: 'Conflict of interest' });
    await (await dialog.getHarness(MatInputHarness.with({ selector: 'textarea' }))).setValue('Director also sits on the evaluation panel.');
    await (await dialog.getHarness(MatButtonHarness.with({ text: 'Record the check' }))).click();

    const request = http.expectOne({ method: 'PUT', url: `${bidsUrl}/${brinewick.id}/compliance` });
    expect(request.request.body).toEqual({ decision: 'excluded', ground: 'conflict-of-interest', note: 'Director also sits on the evaluation panel.' });
    const stored = { ...brinewick, compliance: { decision: 'excluded' as const, ground: 'conflict-of-interest' as const, note: 'Director also sits on the evaluation panel.', decidedAt: '2026-11-22T09:00:00Z' }, flags: { percent: 20, prices: [], total: null, totalCompared: false } };
    request.flush(stored);
    await answerWhenAsked(bidsUrl, { submitted: 3, bids: [northfell, stored, quarrow] }, () => fixture.detectChanges());
    await fixture.whenStable();

    expect(await TestbedHarnessEnvironment.documentRootLoader(fixture).getAllHarnesses(MatDialogHarness)).toHaveLength(0);
    expect((fixture.nativeElement as HTMLElement).querySelector('[role=status]')?.textContent).toBe('Brinewick Salt Co-op: excluded from the evaluation.');
    const table = await cells();
    expect(table['check'][0]).toContain('Conflict of interest');
    // With Brinewick out, Northfell's Cranby price is now the lowest of the region.
    expect(table['region-R01'][1]).toContain('lowest');
  });

  it('refuses an exclusion without a ground in the dialog and sends nothing', async () => {
    await (await loader.getHarness(MatButtonHarness.with({ selector: '[aria-label="Compliance check of Brinewick Salt Co-op"]' }))).click();
    const dialog = await TestbedHarnessEnvironment.documentRootLoader(fixture).getHarness(MatDialogHarness);
    await (await dialog.getHarness(MatRadioGroupHarness)).checkRadioButton({ label: 'Excluded from the evaluation' });
    await (await dialog.getHarness(MatInputHarness.with({ selector: 'textarea' }))).setValue('Unclear.');
    await (await dialog.getHarness(MatButtonHarness.with({ text: 'Record the check' }))).click();
    http.expectNone({ method: 'PUT' });
    expect(await (await dialog.host()).text()).toContain('An exclusion needs a ground from the list.');
    await dialog.close();
  });
});
