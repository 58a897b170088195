import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { ComponentFixture, TestBed } from '@angular/core/testing';
import { HarnessLoader } from '@angular/cdk/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { MATERIAL_ANIMATIONS } from '@angular/material/core';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MatSlideToggleHarness } from '@angular/material/slide-toggle/testing';
import { provideRouter } from '@angular/router';
import type { Role } from '@shared/roles';
import { Auth } from '../core/auth/auth';
import { provideApi } from '../core/http/provide-api';
import { NotificationSettingsPage } from './notification-settings';

jest.setTimeout(30_000);

describe('NotificationSettingsPage', () => {
  let http: HttpTestingController;
  let loader: HarnessLoader;
  let fixture: ComponentFixture<NotificationSettingsPage>;

  async function open(role: Role): Promise<void> {
    TestBed.configureTestingModule({
      imports: [NotificationSettingsPage],
      providers: [provideApi(), provideHttpClientTesting(), provideRouter([]), { provide: MATERIAL_ANIMATIONS, useValue: { animationsDisabled: true } }],
    });
    http = TestBed.inject(HttpTestingController);
    const restored = TestBed.inject(Auth).restore();
    http.expectOne('/api/session').flush({ user: { id: 'u1', email: 'mei@firm.example', name: 'Mei Tanaka', role, vendorOrganisation: null } });
    await restored;
    fixture = TestBed.createComponent(NotificationSettingsPage);
    loader = TestbedHarnessEnvironment.loader(fixture);
    fixture.detectChanges();
    http.expectOne({ method: 'GET', url: '/api/me/notification-settings' }).flush({ closingReminders: true, decisionUpdates: false });
    await fixture.whenStable();
  }

  afterEach(() => http.verify());

  test('a vendor sees only closing reminders, as stored, and saving after turning them off sends both settings', async () => {
    await open('vendor');
    const toggles = await loader.getAllHarnesses(MatSlideToggleHarness);
    expect(await Promise.all(toggles.map((t) => t.getLabelText()))).toEqual(['Closing reminders']);
    expect(await toggles[0].isChecked()).toBe(true);
    await toggles[0].toggle();
    await (await loader.getHarness(MatButtonHarness.with({ text: 'Save settings' }))).click();
    const put = http.expectOne({ method: 'PUT', url: '/api/me/notification-settings' });
    expect(put.request.body).toEqual({ closingReminders: false, decisionUpdates: false });
    put.flush({ closingReminders: false, decisionUpdates: false });
    await fixture.whenStable();
    expect(fixture.nativeElement.textContent).toContain('Your notification settings are saved.');
  });

  test('a buyer is offered updates on recommendations and the standstill, shown off as stored; legal notices are listed as always sent', async () => {
    await open('buyer');
    const toggles = await loader.getAllHarnesses(MatSlideToggleHarness);
    expect(await Promise.all(toggles.map((t) => t.getLabelText()))).toEqual(['Updates on recommendations and the standstill']);
    expect(await toggles[0].isChecked()).toBe(false);
    const text = fixture.nativeElement.textContent as string;
    expect(text).toContain('Legal notices, always sent');
    expect(text).toContain('Award and regret letters');
  });

  test('a refused save shows the server\'s message and keeps the choice on screen', async () => {
    await open('vendor');
    const toggle = await loader.getHarness(MatSlideToggleHarness);
    await toggle.toggle();
    await (await loader.getHarness(MatButtonHarness.with({ text: 'Save settings' }))).click();
    http.expectOne({ method: 'PUT', url: '/api/me/notification-settings' }).flush(
      { type: 'about:blank', title: 'Bad request', status: 400, detail: 'Some fields are not valid.', errors: [{ field: 'closingReminders', message: 'Closing reminders must be on or off.' }] },
      { status: 400, statusText: 'Bad Request', headers: { 'content-type': 'application/problem+json' } },
    );
    await fixture.whenStable();
    expect(fixture.nativeElement.querySelector('[role="alert"]')?.textContent).toContain('Some fields are not valid.');
    expect(await toggle.isChecked()).toBe(false);
  });
});
