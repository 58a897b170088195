import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { Component } from '@angular/core';
import { ComponentFixture, TestBed } from '@angular/core/testing';
import { HarnessLoader } from '@angular/cdk/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { MATERIAL_ANIMATIONS } from '@angular/material/core';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MatDialogHarness } from '@angular/material/dialog/testing';
import { MatFormFieldHarness } from '@angular/material/form-field/testing';
import { MatInputHarness } from '@angular/material/input/testing';
import { MatSelectHarness } from '@angular/material/select/testing';
import { MatTableHarness } from '@angular/material/table/testing';
import { provideRouter } from '@angular/router';
import type { PersonView, VendorOrganisationView } from '@shared/people';
import { provideApi } from '../../core/http/provide-api';
import { AdminAudit } from '../admin-audit/admin-audit';
import { answerWhenAsked } from '../../testing/answer-when-asked';
import { PeopleList } from './people-list';

/** The admin audit trail below the table loads on its own; these tests are about the list. */
@Component({ selector: 'app-admin-audit', template: '' })
class NoAdminAudit {}

const saltmarsh: VendorOrganisationView = {
  id: '3f0d8c3e-7a0b-4c55-9b1e-0a4c2d5e6f70',
  name: 'Saltmarsh Haulage Ltd',
  registrationNumber: 'NR-448120',
  sme: true,
  contactEmail: 'bids@saltmarsh.example',
};

function personView(overrides: Partial<PersonView> & Pick<PersonView, 'id' | 'name' | 'email' | 'role'>): PersonView {
  return {
    active: true,
    invitationPending: false,
    membership: 'approved',
    vendorOrganisation: null,
    createdAt: '2026-11-02T09:00:00Z',
    lastSignInAt: null,
    ...overrides,
  };
}

const people: PersonView[] = [
  personView({ id: 'p1', name: 'Mira Okonjo', email: 'mira@demo.tendara.test', role: 'buyer' }),
  personView({
    id: 'p2',
    name: 'Tobias Fenwright',
    email: 'tobias@saltmarsh.example',
    role: 'vendor',
    vendorOrganisation: { id: saltmarsh.id, name: saltmarsh.name },
    invitationPending: true,
  }),
  personView({ id: 'p3', name: 'Alba Quennell', email: 'alba@demo.tendara.test', role: 'compliance', active: false }),
];

describe('PeopleList', () => {
  let http: HttpTestingController;
  let loader: HarnessLoader;
  let documentLoader: HarnessLoader;
  let fixture: ComponentFixture<PeopleList>;

  beforeEach(async () => {
    // jsdom lays nothing out, so the dialog's focus trap calls every input unfocusable and says so.
    const warn = console.warn.bind(console);
    jest.spyOn(console, 'warn').mockImplementation((first: unknown, ...rest: unknown[]) => {
      if (typeof first === 'string' && first.includes('[cdkFocusInitial]')) return;
      warn(first, ...rest);
    });
    TestBed.configureTestingModule({
      imports: [PeopleList],
      providers: [
        provideApi(),
        provideHttpClientTesting(),
        provideRouter([]),
        // jsdom runs no CSS animations, so a dialog would wait forever for its closing one.
        { provide: MATERIAL_ANIMATIONS, useValue: { animationsDisabled: true } },
      ],
    });
    TestBed.overrideComponent(PeopleList, { remove: { imports: [AdminAudit] }, add: { imports: [NoAdminAudit] } });
    http = TestBed.inject(HttpTestingController);
    fixture = TestBed.createComponent(PeopleList);
    loader = TestbedHarnessEnvironment.loader(fixture);
    documentLoader = TestbedHarnessEnvironment.documentRootLoader(fixture);
    // The list is a resource: it asks once the component is first checked.
    fixture.detectChanges();
    http.expectOne({ method: 'GET', url: '/api/users' }).flush(people);
    await fixture.whenStable();
  });

  afterEach(() => {
    http.verify();
    jest.restoreAllMocks();
  });

  async function rows(): Promise<Record<string, string>[]> {
    const table = await loader.getHarness(MatTableHarness);
    return Promise.all((await table.getRows()).map((row) => row.getCellTextByColumnName()));
  }

  it('lists every person with role, organisation and status, sorted by name', async () => {
    expect(await rows()).toEqual([
      { name: 'Alba Quennell', email: 'alba@demo.tendara.test', role: 'Compliance officer', organisation: '—', status: 'Deactivated', actions: 'more_vert' },
      { name: 'Mira Okonjo', email: 'mira@demo.tendara.test', role: 'Buyer', organisation: '—', status: 'Active', actions: 'more_vert' },
      { name: 'Tobias Fenwright', email: 'tobias@saltmarsh.example', role: 'Vendor', organisation: 'Saltmarsh Haulage Ltd', status: 'Invitation pending', actions: 'more_vert' },
    ]);
  });

  it('filters on what the table shows, such as the organisation or the status', async () => {
    const filter = await loader.getHarness(MatInputHarness.with({ selector: '[type=search]' }));

    await filter.setValue('saltmarsh');
    expect((await rows()).map((row) => row['name'])).toEqual(['Tobias Fenwright']);

    await filter.setValue('deactivated');
    expect((await rows()).map((row) => row['name'])).toEqual(['Alba Quennell']);

    await filter.setValue('nobody-like-this');
    const table = await loader.getHarness(MatTableHarness);
    expect(await table.getRows()).toHaveLength(0);
    await expect((await table.host()).text()).resolves.toContain('Nobody matches');
  });

  describe('invite dialog', () => {
    async function openDialog(): Promise<MatDialogHarness> {
      // The harness waits for the app to be stable, and a pending request keeps it busy, so the
      // dialog's request for organisations is answered while the click is still settling.
      const clicked = (await loader.getHarness(MatButtonHarness.with({ text: /Invite person/ }))).click();
      await answerWhenAsked('/api/vendor-organisations', [saltmarsh]);
      await clicked;
      return documentLoader.getHarness(MatDialogHarness);
    }

    async function errorsIn(dialog: MatDialogHarness): Promise<string[]> {
      const fields = await dialog.getAllHarnesses(MatFormFieldHarness);
      return (await Promise.all(fields.map((field) => field.getTextErrors()))).flat();
    }

    it("shows the shared schema's messages under each field and sends nothing", async () => {
      const dialog = await openDialog();
      await (await dialog.getHarness(MatButtonHarness.with({ text: 'Send invitation' }))).click();

      expect(await errorsIn(dialog)).toEqual(['Name is required.', 'Enter a valid e-mail address.', 'Choose a role.']);
      http.expectNone('/api/users');
    });

    it('asks a vendor for an organisation, with the message from the schema', async () => {
      const dialog = await openDialog();
      await (await dialog.getHarness(MatInputHarness.with({ selector: '[formControlName=name]' }))).setValue('Tobias Fenwright');
      await (await dialog.getHarness(MatInputHarness.with({ selector: '[formControlName=email]' }))).setValue('tobias@saltmarsh.example');
      const role = await dialog.getHarness(MatSelectHarness.with({ selector: '[formControlName=role]' }));
      await role.open();
      await role.clickOptions({ text: 'Vendor' });
      await (await dialog.getHarness(MatButtonHarness.with({ text: 'Send invitation' }))).click();

      expect(await errorsIn(dialog)).toEqual(['A vendor must belong to a vendor organisation.']);
      http.expectNone('/api/users');

      const organisation = await dialog.getHarness(MatSelectHarness.with({ selector: '[formControlName=vendorOrganisationId]' }));
      await organisation.open();
      await organisation.clickOptions({ text: 'Saltmarsh Haulage Ltd' });
      await (await dialog.getHarness(MatButtonHarness.with({ text: 'Send invitation' }))).click();

      const request = http.expectOne({ method: 'POST', url: '/api/users' });
      expect(request.request.body).toEqual({
        name: 'Tobias Fenwright',
        email: 'tobias@saltmarsh.example',
        role: 'vendor',
        vendorOrganisationId: saltmarsh.id,
      });
      request.flush(personView({ id: 'p9', name: 'Tobias Fenwright', email: 'tobias@saltmarsh.example', role: 'vendor' }), {
        status: 201,
        statusText: 'Created',
      });
    });

    it("puts the server's field errors under the matching fields", async () => {
      const dialog = await openDialog();
      await (await dialog.getHarness(MatInputHarness.with({ selector: '[formControlName=name]' }))).setValue('Mira Okonjo');
      await (await dialog.getHarness(MatInputHarness.with({ selector: '[formControlName=email]' }))).setValue('mira@demo.tendara.test');
      const role = await dialog.getHarness(MatSelectHarness.with({ selector: '[formControlName=role]' }));
      await role.open();
      await role.clickOptions({ text: 'Buyer' });
      await (await dialog.getHarness(MatButtonHarness.with({ text: 'Send invitation' }))).click();

      http.expectOne({ method: 'POST', url: '/api/users' }).flush(
        {
          type: 'https://tendara.test/problems/conflict',
          title: 'Someone already uses this e-mail',
          status: 409,
          errors: [{ field: 'email', message: 'A person with this e-mail already exists.' }],
        },
        { status: 409, statusText: 'Conflict' },
      );

      expect(await errorsIn(dialog)).toEqual(['A person with this e-mail already exists.']);
      expect(await (await dialog.host()).text()).toContain('Someone already uses this e-mail');
    });

    it('adds the invited person to the table and says the invitation went out', async () => {
      const dialog = await openDialog();
      await (await dialog.getHarness(MatInputHarness.with({ selector: '[formControlName=name]' }))).setValue('Ines Barrowdale');
      await (await dialog.getHarness(MatInputHarness.with({ selector: '[formControlName=email]' }))).setValue('ines@demo.tendara.test');
      const role = await dialog.getHarness(MatSelectHarness.with({ selector: '[formControlName=role]' }));
      await role.open();
      await role.clickOptions({ text: 'Administrator' });
      await (await dialog.getHarness(MatButtonHarness.with({ text: 'Send invitation' }))).click();

      http.expectOne({ method: 'POST', url: '/api/users' }).flush(
        personView({ id: 'p10', name: 'Ines Barrowdale', email: 'ines@demo.tendara.test', role: 'admin', invitationPending: true }),
        { status: 201, statusText: 'Created' },
      );
      await fixture.whenStable();
      expect(await documentLoader.getAllHarnesses(MatDialogHarness)).toHaveLength(0);

      expect((await rows()).map((row) => [row['name'], row['status']])).toContainEqual(['Ines Barrowdale', 'Invitation pending']);
      expect(document.querySelector('[role=status]')!.textContent).toContain('Invitation sent to ines@demo.tendara.test.');
    });
  });
});
