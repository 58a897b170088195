import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { TestBed, type ComponentFixture } from '@angular/core/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MatInputHarness } from '@angular/material/input/testing';
import type { ContractsView } from '@shared/contracts';
import { provideApi } from '../../core/http/provide-api';
import { signInAs } from '../../awards/testing/award-fixtures';
import { TENDER_UUID, tenderView } from '../testing/tender-fixtures';
import { ContractsPanel } from './contracts-panel';

const VENDOR = 'b3c4d5e6-0000-4000-8000-000000000007';

/** Fictional: one awarded vendor (Cranby depot at 4,200 t and €61.50), standstill over. */
function contracts(overrides: Partial<ContractsView> = {}): ContractsView {
  return {
    tenderId: TENDER_UUID, status: 'notified', timeZone: 'Europe/Berlin', standstillEndsAt: '2026-12-07T22:59:00Z', earliestSignedOn: '2026-12-08',
    open: true, waiting: null,
    vendors: [{ vendor: { id: VENDOR, name: 'Northfell Minerals' }, awarded: [{ region: 'R01', regionName: 'Cranby depot', quantity: 4200, unitPrice: 61.5 }], contract: null }],
    ...overrides,
  };
}

describe('ContractsPanel', () => {
  let http: HttpTestingController;
  let fixture: ComponentFixture<ContractsPanel>;

  async function open(view: ContractsView, role: 'buyer' | 'compliance' = 'buyer'): Promise<HTMLElement> {
    TestBed.configureTestingModule({ imports: [ContractsPanel], providers: [provideApi(), provideHttpClientTesting()] });
    http = TestBed.inject(HttpTestingController);
    await signInAs(role);
    fixture = TestBed.createComponent(ContractsPanel);
    fixture.componentRef.setInput('tender', tenderView({ status: 'notified' }));
    fixture.detectChanges();
    http.expectOne({ method: 'GET', url: `/api/tenders/${TENDER_UUID}/contracts` }).flush(view);
    await fixture.whenStable();
    return fixture.nativeElement as HTMLElement;
  }

  afterEach(() => http.verify());

  it('says the award is pending while the standstill runs, and offers no form', async () => {
    const page = await open(contracts({ open: false, waiting: 'The award is pending: the standstill period is running.' }));

    expect(page.querySelector('.pending')!.textContent).toContain('The award is pending: the standstill period is running.');
    expect(page.textContent).toContain('Standstill period ends');
    expect(page.querySelector('form')).toBeNull();
  });

  it('sends the signature date and the pre-filled schedule with the quantity the buyer changed', async () => {
    await open(contracts());
    const loader = TestbedHarnessEnvironment.loader(fixture);
    await (await loader.getHarness(MatInputHarness.with({ selector: '[formControlName="signedOn"]' }))).setValue('2026-12-09');
    await (await loader.getHarness(MatInputHarness.with({ selector: '[formControlName="quantity"]' }))).setValue('4000');
    await (await loader.getHarness(MatButtonHarness.with({ text: 'Record contract' }))).click();

    const req = http.expectOne({ method: 'POST', url: `/api/tenders/${TENDER_UUID}/contracts` });
    expect(req.request.body).toEqual({ vendorId: VENDOR, signedOn: '2026-12-09', lines: [{ region: 'R01', quantity: 4000, unitPrice: 61.5 }] });
  });

  it('shows compliance the recorded contracts and never a form', async () => {
    const page = await open(contracts({
      status: 'contracted', open: false, waiting: 'Every awarded vendor’s contract is recorded.',
      vendors: [{
        vendor: { id: VENDOR, name: 'Northfell Minerals' }, awarded: [{ region: 'R01', regionName: 'Cranby depot', quantity: 4200, unitPrice: 61.5 }],
        contract: { id: 'c1', signedOn: '2026-12-09', recordedBy: { id: 'u1', name: 'Test buyer' }, recordedAt: '2026-12-09T10:00:00Z', lines: [{ region: 'R01', regionName: 'Cranby depot', quantity: 4000, unitPrice: 61.5 }] },
      }],
    }), 'compliance');

    expect(page.textContent).toContain('Signed on 2026-12-09; recorded by Test buyer.');
    expect(page.querySelector('.schedule tbody tr')!.textContent).toContain('4000');
    expect(page.querySelector('form')).toBeNull();
  });
});
