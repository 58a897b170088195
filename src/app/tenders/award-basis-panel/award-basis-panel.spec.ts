import { TestBed } from '@angular/core/testing';
import { tenderView } from '../testing/tender-fixtures';
import { AwardBasisPanel } from './award-basis-panel';

/** A fictional open tender whose basis lists one sole region, a vendor cap and lorry loads. */
const tender = tenderView({
  reference: 'WCX-2031-004',
  title: 'Brine for the coastal depots',
  status: 'open',
  closesAt: '2031-07-01T11:00:00.000Z',
  timeZone: 'Europe/Dublin',
  awardBasis: { sourcing: 'split', soleRegions: ['QSL'], maxVendors: 2, maxVendorShare: 0.45, awardIncrement: 25 },
  buyingBody: { name: 'Harrowven Port Authority', address: '2 Pier Lane, Harrowven', email: 'tenders@harrowven.tendara.test', country: 'IE' },
  bidValidityDays: 120,
  regionCount: 2,
  totalForecast: 1250,
  regions: [
    { code: 'HVN', name: 'Harrowven depot', forecast: 500 },
    { code: 'QSL', name: 'Quillstead depot', forecast: 750 },
  ],
});

describe('AwardBasisPanel', () => {
  it('states the published basis in the buyer words, with bid validity and the buying body', async () => {
    TestBed.configureTestingModule({ imports: [AwardBasisPanel] });
    const fixture = TestBed.createComponent(AwardBasisPanel);
    fixture.componentRef.setInput('tender', tender);
    fixture.detectChanges();
    await fixture.whenStable();
    const root = fixture.nativeElement as HTMLElement;
    expect(root.querySelector('h2')?.textContent).toBe('How the contract will be awarded');
    expect([...root.querySelectorAll('li')].map((li) => li.textContent)).toEqual([
      'A region may be shared between vendors, except Quillstead depot (QSL), which goes to one vendor.',
      'At most 2 vendors will be awarded.',
      'No vendor will be awarded more than 45 % of the total quantity.',
      'Quantities are awarded in whole multiples of 25 t.',
      'Within these rules, the award goes to the bids with the lowest total cost: fixed fees plus unit prices times the quantities awarded.',
    ]);
    expect(root.textContent).toContain('120 days after closing');
    expect(root.textContent).toContain('Harrowven Port Authority, 2 Pier Lane, Harrowven (IE) · tenders@harrowven.tendara.test');
  });
});
