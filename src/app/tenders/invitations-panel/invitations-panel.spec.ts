import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { ComponentFixture, TestBed } from '@angular/core/testing';
import { HarnessLoader } from '@angular/cdk/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MatCheckboxHarness } from '@angular/material/checkbox/testing';
import { MATERIAL_ANIMATIONS } from '@angular/material/core';
import { MatFormFieldHarness } from '@angular/material/form-field/testing';
import { MatInputHarness } from '@angular/material/input/testing';
import { MatSelectHarness } from '@angular/material/select/testing';
import type { VendorOrganisationView } from '@shared/people';
import type { TenderView } from '@shared/tenders';
import { provideApi } from '../../core/http/provide-api';
import { answerWhenAsked } from '../../testing/answer-when-asked';
import { TENDER_UUID, tenderView } from '../testing/tender-fixtures';
import { InvitationsPanel } from './invitations-panel';

const ORGANISATIONS: VendorOrganisationView[] = [
  { id: '6f1e2d3c-4b5a-4978-8a1b-2c3d4e5f6a71', name: 'Northfell Minerals', registrationNumber: 'NF-20417', sme: false, contactEmail: 'bids@northfell.example' },
  { id: '7a2b3c4d-5e6f-4a8b-9c0d-1e2f3a4b5c62', name: 'Brinewick Salt Co-op', registrationNumber: 'BW-88120', sme: true, contactEmail: 'tenders@brinewick.example' },
];
const invitesUrl = `/api/tenders/${TENDER_UUID}/invitations`;
const draft = tenderView({ status: 'draft', publishedAt: null, submittedBids: 0, invitations: [] });

describe('InvitationsPanel', () => {
  let http: HttpTestingController;
  let loader: HarnessLoader;
  let fixture: ComponentFixture<InvitationsPanel>;
  let announced: string[];
  let changed: TenderView[];

  beforeEach(async () => {
    TestBed.configureTestingModule({
      imports: [InvitationsPanel],
      providers: [provideApi(), provideHttpClientTesting(), { provide: MATERIAL_ANIMATIONS, useValue: { animationsDisabled: true } }],
    });
    http = TestBed.inject(HttpTestingController);
    fixture = TestBed.createComponent(InvitationsPanel);
    fixture.componentRef.setInput('tender', draft);
    fixture.componentRef.setInput('canEdit', true);
    announced = [];
    changed = [];
    fixture.componentInstance.announce.subscribe((text) => announced.push(text));
    fixture.componentInstance.changed.subscribe((tender) => changed.push(tender));
    fixture.detectChanges();
    http.expectOne('/api/vendor-organisations').flush(ORGANISATIONS);
    await fixture.whenStable();
    loader = TestbedHarnessEnvironment.loader(fixture);
  });

  afterEach(() => http.verify());

  async function invite(): Promise<void> {
    await (await loader.getHarness(MatButtonHarness.with({ text: /Invite$/ }))).click();
  }

  it('invites the chosen organisations with one POST and announces that they are e-mailed when the tender is published', async () => {
    const select = await loader.getHarness(MatSelectHarness);
    await select.open();
    await select.clickOptions({ text: 'Brinewick Salt Co-op (SME)' });
    await select.clickOptions({ text: 'Northfell Minerals' });
    await invite();

    const post = http.expectOne({ method: 'POST', url: invitesUrl });
    expect(post.request.body).toEqual({ vendorOrganisationIds: [ORGANISATIONS[1].id, ORGANISATIONS[0].id] });
    const invited = { ...draft, invitations: ORGANISATIONS.map((o) => ({ vendorOrganisation: { id: o.id, name: o.name, sme: o.sme }, invitedAt: '2026-12-03T09:00:00Z' })) };
    post.flush(invited);
    // The list of organisations is asked for again (the invited ones drop out of it).
    await answerWhenAsked('/api/vendor-organisations', ORGANISATIONS, () => fixture.detectChanges());
    await fixture.whenStable();

    expect(changed).toEqual([invited]);
    expect(announced).toEqual(['2 organisations invited. They are e-mailed when you publish.']);
    expect(await select.getValueText()).toBe('');
  });

  it('sends nothing when no one is chosen, and says so under the list of organisations', async () => {
    await invite();

    http.expectNone({ method: 'POST', url: invitesUrl });
    const field = await loader.getHarness(MatFormFieldHarness.with({ floatingLabelText: 'Vendor organisations' }));
    expect(await field.getTextErrors()).toEqual(['Choose at least one vendor organisation or enter a new vendor contact.']);
  });

  it('checks a new vendor contact only while it is ticked, and sends it with the request', async () => {
    const addNew = await loader.getHarness(MatCheckboxHarness.with({ label: 'Also invite a new vendor contact' }));
    await addNew.check();
    await invite();
    // Nothing is sent while its fields are empty; each says what it needs.
    http.expectNone({ method: 'POST', url: invitesUrl });
    const email = await loader.getHarness(MatFormFieldHarness.with({ floatingLabelText: 'Contact e-mail' }));
    expect(await email.isControlValid()).toBe(false);

    const fill = async (name: string, value: string) =>
      (await loader.getHarness(MatInputHarness.with({ selector: `[formControlName=${name}]` }))).setValue(value);
    await fill('organisationName', 'Harrowgate Grit Ltd');
    await fill('registrationNumber', 'HG-55310');
    await fill('contactName', 'Ines Varga');
    await fill('contactEmail', 'ines.varga@harrowgate.example');
    await invite();

    const post = http.expectOne({ method: 'POST', url: invitesUrl });
    expect(post.request.body).toEqual({
      vendorOrganisationIds: [],
      newVendor: { organisationName: 'Harrowgate Grit Ltd', registrationNumber: 'HG-55310', sme: false, contactName: 'Ines Varga', contactEmail: 'ines.varga@harrowgate.example' },
    });
    // A refusal naming a field of the new contact shows under that field.
    post.flush(
      { type: 'about:blank', title: 'Bad Request', status: 400, detail: 'Some fields need attention.', errors: [{ field: 'newVendor.contactEmail', message: 'This address already belongs to a vendor organisation.' }] },
      { status: 400, statusText: 'Bad Request' },
    );
    await fixture.whenStable();
    expect(await email.getTextErrors()).toEqual(['This address already belongs to a vendor organisation.']);
    expect(changed).toEqual([]);

    // Unticked, the new contact is neither checked nor sent.
    await addNew.uncheck();
    await invite();
    http.expectNone({ method: 'POST', url: invitesUrl });
    const field = await loader.getHarness(MatFormFieldHarness.with({ floatingLabelText: 'Vendor organisations' }));
    expect(await field.getTextErrors()).toEqual(['Choose at least one vendor organisation or enter a new vendor contact.']);
  });
});
