import { Component } from '@angular/core';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { ComponentFixture, TestBed } from '@angular/core/testing';
import { HarnessLoader } from '@angular/cdk/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { MatAutocompleteHarness } from '@angular/material/autocomplete/testing';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MatFormFieldHarness } from '@angular/material/form-field/testing';
import { MatInputHarness } from '@angular/material/input/testing';
import { MatRadioGroupHarness } from '@angular/material/radio/testing';
import { MatSelectHarness } from '@angular/material/select/testing';
import { MATERIAL_ANIMATIONS } from '@angular/material/core';
import { Router, provideRouter } from '@angular/router';
import { provideApi } from '../../core/http/provide-api';
import { tenderView } from '../testing/tender-fixtures';
import { TenderEditor } from './tender-editor';

@Component({ template: '' })
class TenderPage {}

/**
 * A complete fictional draft in Irish time. 12:00 on 1 July 2031 in Europe/Dublin is 11:00 UTC
 * (Irish summer time is UTC+1, from memory of the zone's rules; the runtime's zone data decides).
 */
const expectedBody = {
  reference: 'WCX-2031-004',
  title: 'Brine for the coastal depots',
  commodity: 'Brine, 23 %',
  unit: 't',
  currency: 'EUR',
  closesAt: '2031-07-01T11:00:00.000Z',
  standstillDays: 10,
  standstillExemption: null,
  closureDays: [],
  locale: 'en-GB',
  description: 'Two depots on the coast.',
  regions: [
    { code: 'HVN', name: 'Harrowven depot', forecast: 500 },
    { code: 'QSL', name: 'Quillstead depot', forecast: 750 },
  ],
  // Percentages as the form shows them (45 %, 12.5 %) go as fractions.
  awardBasis: { sourcing: 'split', soleRegions: ['QSL'], maxVendors: 2, maxVendorShare: 0.45, smeShare: 0.125, awardIncrement: 25 },
  buyingBody: { name: 'Harrowven Port Authority', address: '2 Pier Lane, Harrowven', email: 'tenders@harrowven.tendara.test', country: 'IE' },
  timeZone: 'Europe/Dublin',
  estimatedValue: 98000,
  bidValidityDays: 120,
  // Left empty: the default, 5 days before closing.
  clarificationsCloseAt: null,
  abnormallyLowPercent: 25,
};

describe('TenderEditor', () => {
  let http: HttpTestingController;
  let loader: HarnessLoader;
  let fixture: ComponentFixture<TenderEditor>;

  beforeEach(async () => {
    TestBed.configureTestingModule({
      imports: [TenderEditor],
      providers: [
        provideApi(),
        provideHttpClientTesting(),
        provideRouter([{ path: 'tenders/:id', component: TenderPage }]),
        { provide: MATERIAL_ANIMATIONS, useValue: { animationsDisabled: true } },
      ],
    });
    http = TestBed.inject(HttpTestingController);
    fixture = TestBed.createComponent(TenderEditor);
    loader = TestbedHarnessEnvironment.loader(fixture);
    fixture.detectChanges();
    await fixture.whenStable();
  });

  afterEach(() => http.verify());

  async function input(selector: string): Promise<MatInputHarness> {
    return loader.getHarness(MatInputHarness.with({ selector }));
  }

  async function fill(selector: string, value: string): Promise<void> {
    await (await input(selector)).setValue(value);
  }

  /** The error lines under the form field that holds `selector`. */
  async function errorsUnder(selector: string): Promise<string[]> {
    const field = await loader.getHarness(MatFormFieldHarness.with({ selector: `.mat-mdc-form-field:has(${selector})` }));
    return field.getTextErrors();
  }

  async function fillCompleteDraft(): Promise<void> {
    await fill('[formControlName=reference]', 'WCX-2031-004');
    await fill('[formControlName=title]', 'Brine for the coastal depots');
    await fill('[formControlName=commodity]', 'Brine, 23 %');
    await fill('[formControlName=currency]', 'eur');
    await fill('[formControlName=description]', 'Two depots on the coast.');

    const zone = await loader.getHarness(MatAutocompleteHarness);
    await zone.clear();
    await zone.enterText('Europe/Dub');
    await zone.selectOption({ text: 'Europe/Dublin' });
    await fill('[formControlName=closesDate]', '2031-07-01');
    await fill('[formControlName=closesTime]', '12:00');

    await fill('[aria-label="Code, region 1"]', 'HVN');
    await fill('[aria-label="Name, region 1"]', 'Harrowven depot');
    await fill('[aria-label="Forecast, region 1"]', '500');
    await (await loader.getHarness(MatButtonHarness.with({ text: /Add region/ }))).click();
    await fill('[aria-label="Code, region 2"]', 'QSL');
    await fill('[aria-label="Name, region 2"]', 'Quillstead depot');
    await fill('[aria-label="Forecast, region 2"]', '750');

    await (await loader.getHarness(MatRadioGroupHarness)).checkRadioButton({ label: /Split/ });
    await (await loader.getHarness(MatSelectHarness.with({ selector: '[formControlName=soleRegions]' }))).clickOptions({ text: 'QSL' });
    await fill('[formControlName=maxVendors]', '2');
    await fill('[formControlName=maxVendorShare]', '45');
    await fill('[formControlName=smeShare]', '12.5');
    await fill('[formControlName=awardIncrement]', '25');

    await fill('[autocomplete=organization]', 'Harrowven Port Authority');
    await fill('[autocomplete=street-address]', '2 Pier Lane, Harrowven');
    await fill('[formControlName=email]', 'tenders@harrowven.tendara.test');
    await fill('[formControlName=country]', 'ie');

    await fill('[formControlName=estimatedValue]', '98000');
    await fill('[formControlName=bidValidityDays]', '120');
    await fill('[formControlName=abnormallyLowPercent]', '25');
  }

  async function save(): Promise<void> {
    await (await loader.getHarness(MatButtonHarness.with({ text: 'Save draft' }))).click();
  }

  it('sends a complete draft as one POST: percentages as fractions, closing time from the tender’s zone, then opens it', async () => {
    await fillCompleteDraft();
    const page = fixture.nativeElement as HTMLElement;
    expect(page.querySelector('.total')?.textContent?.trim()).toBe((1250).toLocaleString());
    expect(page.querySelector('#closing-message')?.textContent).toContain('(Europe/Dublin)');
    expect([...page.querySelectorAll('.basis-preview li')].map((li) => li.textContent)).toContain('At most 2 vendors will be awarded.');
    await save();
    const request = http.expectOne({ method: 'POST', url: '/api/tenders' });
    expect(request.request.body).toEqual(expectedBody);
    request.flush(tenderView({ id: '5b6c7d8e-0000-4000-8000-000000000031', status: 'draft' }), { status: 201, statusText: 'Created' });
    await fixture.whenStable();
    expect(TestBed.inject(Router).url).toBe('/tenders/5b6c7d8e-0000-4000-8000-000000000031');
  });

  it('with 0 standstill days asks for the exemption ground and sends it, with the closure days as a sorted list and the chosen letter locale', async () => {
    await fillCompleteDraft();
    expect(await loader.getAllHarnesses(MatInputHarness.with({ selector: '[formControlName=standstillExemption]' }))).toEqual([]);
    await fill('[formControlName=standstillDays]', '0');
    await fill('[formControlName=standstillExemption]', 'Call-off under a framework agreement.');
    await fill('[formControlName=closureDays]', '2031-12-30, 2031-12-29');
    const locale = await loader.getHarness(MatSelectHarness.with({ selector: '[formControlName=locale]' }));
    await locale.clickOptions({ text: 'en-IE' });
    await save();
    const request = http.expectOne({ method: 'POST', url: '/api/tenders' });
    expect(request.request.body).toEqual({
      ...expectedBody, standstillDays: 0, standstillExemption: 'Call-off under a framework agreement.', closureDays: ['2031-12-29', '2031-12-30'], locale: 'en-IE',
    });
    request.flush(tenderView({ id: '5b6c7d8e-0000-4000-8000-000000000032', status: 'draft' }), { status: 201, statusText: 'Created' });
    await fixture.whenStable();
  });

  it('refuses a closure day that is not a date, under its field, and sends nothing', async () => {
    await fillCompleteDraft();
    await fill('[formControlName=closureDays]', '2031-02-30');
    await save();
    expect(await errorsUnder('[formControlName=closureDays]')).toEqual(['This date does not exist.']);
    http.expectNone({ method: 'POST', url: '/api/tenders' });
  });

  it('takes a currency typed in small letters (shown in capitals) and refuses one that is not three letters', async () => {
    await fillCompleteDraft();
    expect(await errorsUnder('[formControlName=currency]')).toEqual([]);
    await fill('[formControlName=currency]', 'eu');
    await save();
    http.expectNone({ method: 'POST', url: '/api/tenders' });
    expect(await errorsUnder('[formControlName=currency]')).toEqual(['Currency must be a three-letter ISO 4217 code such as EUR.']);
  });

  it('puts a server refusal of regions[1].forecast under the second region’s forecast, not the first', async () => {
    await fillCompleteDraft();
    await save();
    http.expectOne({ method: 'POST', url: '/api/tenders' }).flush(
      {
        type: 'about:blank', title: 'Bad Request', status: 400, detail: 'Some fields need attention.',
        errors: [{ field: 'regions[1].forecast', message: 'Forecast must be a whole multiple of the award increment (25 t).' }],
      },
      { status: 400, statusText: 'Bad Request' },
    );
    await fixture.whenStable();
    expect(await errorsUnder('[aria-label="Forecast, region 2"]')).toEqual(['Forecast must be a whole multiple of the award increment (25 t).']);
    expect(await errorsUnder('[aria-label="Forecast, region 1"]')).toEqual([]);
    expect((fixture.nativeElement as HTMLElement).querySelector('.form-error')?.textContent?.trim()).toContain('Some fields need attention.');
    expect(TestBed.inject(Router).url).toBe('/');
  });

  it('refuses a region code used twice under the second code, then sends the corrected draft as one POST', async () => {
    await fillCompleteDraft();
    await fill('[aria-label="Code, region 2"]', 'hvn');
    await save();
    http.expectNone({ method: 'POST', url: '/api/tenders' });
    expect((await errorsUnder('[aria-label="Code, region 2"]')).join(' ')).toMatch(/Region code "hvn" is used twice/);
    expect((fixture.nativeElement as HTMLElement).querySelector('.form-error')?.textContent).toContain('Some fields need attention; each is marked below.');

    await fill('[aria-label="Code, region 2"]', 'QSL');
    await save();
    const request = http.expectOne({ method: 'POST', url: '/api/tenders' });
    expect(request.request.body).toEqual(expectedBody);
    request.flush(tenderView({ id: '5b6c7d8e-0000-4000-8000-000000000032', status: 'draft' }), { status: 201, statusText: 'Created' });
    await fixture.whenStable();
    expect(TestBed.inject(Router).url).toBe('/tenders/5b6c7d8e-0000-4000-8000-000000000032');
  });

  it('sends nothing for an invalid draft and says what is wrong under each field', async () => {
    await fillCompleteDraft();
    await fill('[formControlName=title]', '');
    await fill('[aria-label="Forecast, region 2"]', '-5');
    await fill('[formControlName=maxVendorShare]', '140');
    await save();
    http.expectNone({ method: 'POST', url: '/api/tenders' });
    expect(await errorsUnder('[formControlName=title]')).toEqual(['Title is required.']);
    expect(await errorsUnder('[formControlName=maxVendorShare]')).toEqual(['Maximum vendor share must be between 0 and 100 %.']);
    expect(await errorsUnder('[aria-label="Forecast, region 2"]')).toEqual(['Forecast must be a number above 0.']);
    expect(await errorsUnder('[aria-label="Forecast, region 1"]')).toEqual([]);
    expect((fixture.nativeElement as HTMLElement).querySelector('.form-error')?.textContent).toContain('Some fields need attention; each is marked below.');
  });
});
