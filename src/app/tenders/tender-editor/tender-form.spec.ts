import { TestBed } from '@angular/core/testing';
import { NonNullableFormBuilder } from '@angular/forms';
import { tenderInputSchema, type TenderView } from '@shared/tenders';
import { clearServerProblems, fillForm, formBody, placeProblems, tenderForm } from './tender-form';

/** A fictional draft in Irish time: 12:00 on 1 July 2031 is 11:00 UTC (summer time, UTC+1). */
const draft: TenderView = {
  id: '0d6f4b9e-93a1-4d1f-8a55-1c2f7b3e9a10',
  reference: 'WCX-2031-004',
  title: 'Brine for the coastal depots',
  commodity: 'Brine, 23 %',
  unit: 't',
  currency: 'EUR',
  locale: 'en-GB',
  status: 'draft',
  closesAt: '2031-07-01T11:00:00.000Z',
  timeZone: 'Europe/Dublin',
  regionCount: 2,
  totalForecast: 1250,
  description: '',
  standstillDays: 10, standstillExemption: null, closureDays: [], standstillEndsAt: null,
  publishedAt: null,
  closedAt: null,
  awardBasis: { sourcing: 'split', soleRegions: ['QSL'], maxVendors: 2, maxVendorShare: 0.45, awardIncrement: 25 },
  buyingBody: { name: 'Harrowven Port Authority', address: '', email: 'tenders@harrowven.tendara.test', country: 'IE' },
  bidValidityDays: 120,
  // The default: 5 days before closing, so the form leaves it empty.
  clarificationsCloseAt: '2031-06-26T11:00:00.000Z',
  abnormallyLowPercent: 25,
  estimatedValue: 98000,
  amendments: [],
  cancellation: null,
  regions: [
    { code: 'HVN', name: 'Harrowven depot', forecast: 500 },
    { code: 'QSL', name: 'Quillstead depot', forecast: 750 },
  ],
};

function loaded() {
  const fb = TestBed.inject(NonNullableFormBuilder);
  const form = tenderForm(fb);
  fillForm(fb, form, draft);
  return form;
}

describe('tender form', () => {
  it('shows shares as percentages and the closing time in the tender zone, and sends fractions and UTC back', () => {
    const form = loaded();
    expect(form.valid).toBe(true);
    expect(tenderInputSchema.safeParse(formBody(form)).error?.issues ?? []).toEqual([]);
    expect(form.controls.awardBasis.controls.maxVendorShare.value).toBe(45);
    expect([form.controls.closesDate.value, form.controls.closesTime.value]).toEqual(['2031-07-01', '12:00']);
    expect(form.controls.clarificationsDate.value).toBe('');
    expect(formBody(form)).toEqual({
      reference: 'WCX-2031-004', title: 'Brine for the coastal depots', commodity: 'Brine, 23 %', unit: 't', currency: 'EUR',
      closesAt: '2031-07-01T11:00:00.000Z', standstillDays: 10, locale: 'en-GB', standstillExemption: null, closureDays: [], description: '',
      regions: draft.regions,
      awardBasis: { sourcing: 'split', soleRegions: ['QSL'], maxVendors: 2, maxVendorShare: 0.45, awardIncrement: 25 },
      buyingBody: draft.buyingBody, timeZone: 'Europe/Dublin', estimatedValue: 98000, bidValidityDays: 120,
      clarificationsCloseAt: null, abnormallyLowPercent: 25,
    });
  });

  it('a winter closing time in Dublin is GMT; sole sourcing drops listed regions; an empty buying body is none', () => {
    const form = loaded();
    form.patchValue({ buyingBody: { country: 'ie' } });
    expect(form.controls.buyingBody.controls.country.valid).toBe(true);
    expect((formBody(form) as { buyingBody: { country: string } }).buyingBody.country).toBe('IE');
    form.patchValue({ closesDate: '2031-12-02', closesTime: '09:30', awardBasis: { sourcing: 'sole' }, buyingBody: { name: '', address: '', email: '', country: '' } });
    expect(form.valid).toBe(true);
    const body = formBody(form) as { closesAt: string; awardBasis: unknown; buyingBody: unknown };
    expect(body.closesAt).toBe('2031-12-02T09:30:00.000Z');
    expect(body.awardBasis).toEqual({ sourcing: 'sole', soleRegions: [], maxVendors: 2, maxVendorShare: 0.45, awardIncrement: 25 });
    expect(body.buyingBody).toBeNull();
  });

  it("puts the server's field errors on their controls: a sole region, a forecast, the buying body's country", () => {
    const form = loaded();
    const unplaced = placeProblems(form, [
      { field: 'awardBasis.soleRegions[0]', message: "Region QSL is not one of this tender's regions." },
      { field: 'regions[1].forecast', message: 'With an award increment of 25 t, the forecast must be a whole multiple of it.' },
      { field: 'buyingBody.country', message: 'Country must be a two-letter ISO 3166-1 code such as IE.' },
    ]);
    expect(unplaced).toEqual([]);
    expect(form.controls.awardBasis.controls.soleRegions.errors).toEqual({ server: "Region QSL is not one of this tender's regions." });
    expect(form.controls.regions.at(1).controls.forecast.errors).toEqual({ server: 'With an award increment of 25 t, the forecast must be a whole multiple of it.' });
    expect(form.controls.buyingBody.controls.country.errors).toEqual({ server: 'Country must be a two-letter ISO 3166-1 code such as IE.' });
    // A new attempt starts clean: the forecast's refusal depended on another field.
    clearServerProblems(form);
    expect(form.valid).toBe(true);
  });
});
