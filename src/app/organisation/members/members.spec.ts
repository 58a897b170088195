import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { ComponentFixture, TestBed } from '@angular/core/testing';
import { HarnessLoader } from '@angular/cdk/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { MATERIAL_ANIMATIONS } from '@angular/material/core';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MatDialogHarness } from '@angular/material/dialog/testing';
import { MatTableHarness } from '@angular/material/table/testing';
import { provideRouter } from '@angular/router';
import type { MemberView } from '@shared/people';
import { provideApi } from '../../core/http/provide-api';
import { answerWhenAsked } from '../../testing/answer-when-asked';
import { Members } from './members';

const view = (youAreContact: boolean, nadia: 'pending' | 'approved' = 'pending'): MemberView => ({
  organisation: { id: 'o1', name: 'Quarnby Minerals Ltd' },
  youAreContact,
  contactName: 'Owen Marsh',
  people: [
    { id: 'u1', name: 'Owen Marsh', email: 'owen@quarnby.example', membership: 'approved', active: true, createdAt: '2026-11-01T09:00:00Z' },
    { id: 'u2', name: 'Nadia Quarry', email: 'nadia@quarnby.example', membership: nadia, active: true, createdAt: '2026-12-01T09:00:00Z' },
  ],
});

// Dialogs and harnesses take a few seconds on a busy machine.
jest.setTimeout(30_000);

describe('Members', () => {
  let http: HttpTestingController;
  let loader: HarnessLoader;
  let documentLoader: HarnessLoader;
  let fixture: ComponentFixture<Members>;

  async function open(body: MemberView): Promise<void> {
    TestBed.configureTestingModule({
      imports: [Members],
      providers: [provideApi(), provideHttpClientTesting(), provideRouter([]), { provide: MATERIAL_ANIMATIONS, useValue: { animationsDisabled: true } }],
    });
    http = TestBed.inject(HttpTestingController);
    fixture = TestBed.createComponent(Members);
    loader = TestbedHarnessEnvironment.loader(fixture);
    documentLoader = TestbedHarnessEnvironment.documentRootLoader(fixture);
    fixture.detectChanges();
    http.expectOne({ method: 'GET', url: '/api/organisation/members' }).flush(body);
    await fixture.whenStable();
  }

  afterEach(() => http.verify());

  it('the contact approves a person an administrator added, after confirming, and the table shows them as a member', async () => {
    await open(view(true));
    const table = await loader.getHarness(MatTableHarness);
    expect((await table.getCellTextByColumnName())['state'].text).toEqual(['Member', 'Awaiting your approval']);

    await (await loader.getHarness(MatButtonHarness.with({ text: /Approve/ }))).click();
    const dialog = await documentLoader.getHarness(MatDialogHarness);
    // The click settles only once the request it makes is answered.
    const clicked = (await dialog.getHarness(MatButtonHarness.with({ text: 'Approve' }))).click();
    await answerWhenAsked({ method: 'POST', url: '/api/organisation/members/u2/approve' }, view(true, 'approved'));
    await clicked;
    await fixture.whenStable();

    expect((await table.getCellTextByColumnName())['state'].text).toEqual(['Member', 'Member']);
    expect(document.querySelector('[role=status]')!.textContent).toContain('Nadia Quarry is approved');
  });

  it('another member sees the request but cannot decide it', async () => {
    await open(view(false));
    expect(fixture.nativeElement.textContent).toContain('Its contact, Owen Marsh, approves new people.');
    expect(fixture.nativeElement.textContent).toContain('nadia@quarnby.example');
    expect(await loader.getAllHarnesses(MatButtonHarness.with({ text: /Approve|Refuse/ }))).toHaveLength(0);
  });
});
