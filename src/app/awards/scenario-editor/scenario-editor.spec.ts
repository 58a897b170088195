import { Component } from '@angular/core';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { ComponentFixture, TestBed } from '@angular/core/testing';
import { HarnessLoader, TestKey } from '@angular/cdk/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MatDialog } from '@angular/material/dialog';
import { MatDialogHarness } from '@angular/material/dialog/testing';
import { MatFormFieldHarness } from '@angular/material/form-field/testing';
import { MatInputHarness } from '@angular/material/input/testing';
import { MatRadioGroupHarness } from '@angular/material/radio/testing';
import { MatSelectHarness } from '@angular/material/select/testing';
import { MATERIAL_ANIMATIONS } from '@angular/material/core';
import type { ScenarioView } from '@shared/evaluation';
import { provideApi } from '../../core/http/provide-api';
import { TENDER_ID } from '../testing/award-fixtures';
import { ScenarioEditor, type ScenarioEditorData } from './scenario-editor';

/** Only a place for the dialog to open from. */
@Component({ template: '' })
class Host {}

const SCENARIO_ID = 'c0ffee00-0000-4000-8000-000000000007';
const regions = [
  { code: 'R01', name: 'Cranby depot', forecast: 4200 },
  { code: 'R02', name: 'Wexcombe depot', forecast: 3000 },
];
const vendors = [
  { id: 'v-north', name: 'Northfell Minerals', sme: false },
  { id: 'v-brine', name: 'Brinewick Salt Co-op', sme: true },
  { id: 'v-quarrow', name: 'Quarrow Haulage', sme: false },
];
const saved: ScenarioView = {
  id: SCENARIO_ID,
  tenderId: TENDER_ID,
  name: 'Cranby sole, SME third',
  rules: { sourcing: 'split', soleRegions: ['R01'], exclude: [], require: [] },
  timeLimitSeconds: 60,
  builtIn: null,
  awardable: false,
  whatIf: 'Adds: sole award in Cranby depot',
  createdAt: '2026-11-21T08:00:00Z',
  latestRun: null,
};

describe('ScenarioEditor', () => {
  let http: HttpTestingController;
  let fixture: ComponentFixture<Host>;
  let dialog: MatDialogHarness;
  let closedWith: ScenarioView[];

  async function open(scenario: ScenarioView | null): Promise<void> {
    TestBed.configureTestingModule({
      imports: [Host],
      providers: [provideApi(), provideHttpClientTesting(), { provide: MATERIAL_ANIMATIONS, useValue: { animationsDisabled: true } }],
    });
    http = TestBed.inject(HttpTestingController);
    fixture = TestBed.createComponent(Host);
    closedWith = [];
    TestBed.inject(MatDialog)
      .open<ScenarioEditor, ScenarioEditorData, ScenarioView>(ScenarioEditor, { data: { tenderId: TENDER_ID, regions, vendors, scenario } })
      .afterClosed()
      .subscribe((value) => {
        if (value) closedWith.push(value);
      });
    const root: HarnessLoader = TestbedHarnessEnvironment.documentRootLoader(fixture);
    dialog = await root.getHarness(MatDialogHarness);
  }

  afterEach(() => http.verify());

  async function fill(selector: string, value: string): Promise<void> {
    await (await dialog.getHarness(MatInputHarness.with({ selector }))).setValue(value);
  }

  async function select(label: string, ...options: string[]): Promise<void> {
    const field = await dialog.getHarness(MatFormFieldHarness.with({ floatingLabelText: label }));
    const control = (await field.getControl(MatSelectHarness))!;
    for (const text of options) await control.clickOptions({ text });
    // Escape closes the panel, as a person would; the harness's close() clicks the first backdrop
    // in the page, which here is the dialog's, and would close the dialog instead.
    await (await control.host()).sendKeys(TestKey.ESCAPE);
    expect(await control.isOpen()).toBe(false);
  }

  async function errorsUnder(label: string): Promise<string[]> {
    return (await dialog.getHarness(MatFormFieldHarness.with({ floatingLabelText: label }))).getTextErrors();
  }

  async function save(): Promise<void> {
    await (await dialog.getHarness(MatButtonHarness.with({ text: 'Save scenario' }))).click();
  }

  it('POSTs the rules built on the form with the engine’s field names, shares as fractions and empty rules left out', async () => {
    await open(null);
    expect(await dialog.getTitleText()).toBe('New scenario');
    await fill('[formControlName=name]', '  Cranby sole, SME third ');
    await (await dialog.getHarness(MatRadioGroupHarness)).checkRadioButton({ label: /Split award/ });
    await select('Regions to sole-award', 'Cranby depot (R01)');
    await fill('[formControlName=minVendors]', '2');
    await fill('[formControlName=maxVendors]', '3');
    await fill('[formControlName=maxVendorShare]', '60');
    await fill('[formControlName=smeShare]', '33.5');
    await select('Excluded vendors', 'Quarrow Haulage');
    await select('Required vendors', 'Brinewick Salt Co-op (SME)');
    await fill('[formControlName=timeLimitSeconds]', '120');
    await save();

    const request = http.expectOne({ method: 'POST', url: `/api/tenders/${TENDER_ID}/scenarios` });
    expect(request.request.body).toEqual({
      name: 'Cranby sole, SME third',
      timeLimitSeconds: 120,
      rules: {
        sourcing: 'split',
        soleRegions: ['R01'],
        minVendors: 2,
        maxVendors: 3,
        maxVendorShare: 0.6,
        smeShare: 0.335,
        exclude: ['v-quarrow'],
        require: ['v-brine'],
      },
    });
    request.flush(saved, { status: 201, statusText: 'Created' });
    await fixture.whenStable();
    expect(closedWith).toEqual([saved]);
  });

  it('PUTs an edited scenario to its own URL; sole sourcing sends no sole-region list', async () => {
    await open({ ...saved, rules: { sourcing: 'split', soleRegions: ['R01'], maxRegionShare: 0.5, exclude: [], require: [] } });
    expect(await dialog.getTitleText()).toBe('Edit scenario');
    expect(await (await dialog.getHarness(MatInputHarness.with({ selector: '[formControlName=maxRegionShare]' }))).getValue()).toBe('50');
    await (await dialog.getHarness(MatRadioGroupHarness)).checkRadioButton({ label: /Sole award/ });
    await fill('[formControlName=maxRegionShare]', '');
    await save();
    const request = http.expectOne({ method: 'PUT', url: `/api/scenarios/${SCENARIO_ID}` });
    expect(request.request.body).toEqual({
      name: 'Cranby sole, SME third',
      timeLimitSeconds: 60,
      rules: { sourcing: 'sole', soleRegions: [], exclude: [], require: [] },
    });
    request.flush({ ...saved, rules: { sourcing: 'sole', soleRegions: [], exclude: [], require: [] } });
    await fixture.whenStable();
    expect(closedWith.map((s) => s.rules.sourcing)).toEqual(['sole']);
  });

  it('puts the server’s refusal of rules.maxVendors under that field and keeps the dialog open', async () => {
    await open(null);
    await fill('[formControlName=name]', 'At most one vendor');
    await fill('[formControlName=maxVendors]', '1');
    await save();
    http.expectOne({ method: 'POST', url: `/api/tenders/${TENDER_ID}/scenarios` }).flush(
      {
        type: 'about:blank', title: 'Bad Request', status: 400, detail: 'The scenario was not saved.',
        errors: [{ field: 'rules.maxVendors', message: 'Maximum number of vendors must be at least 2 to honour the required vendors.' }],
      },
      { status: 400, statusText: 'Bad Request' },
    );
    await fixture.whenStable();
    expect(await errorsUnder('Maximum number of vendors')).toEqual(['Maximum number of vendors must be at least 2 to honour the required vendors.']);
    expect(await errorsUnder('Minimum number of vendors')).toEqual([]);
    expect(await (await dialog.host()).text()).toContain('The scenario was not saved.');
    expect(closedWith).toEqual([]);
    await dialog.close();
  });

  it('sends nothing while the minimum is above the maximum or a share is out of 0–100 %', async () => {
    await open(null);
    await fill('[formControlName=name]', 'Contradictory');
    await fill('[formControlName=minVendors]', '4');
    await fill('[formControlName=maxVendors]', '2');
    await fill('[formControlName=smeShare]', '140');
    await save();
    http.expectNone({ method: 'POST' });
    const text = await (await dialog.host()).text();
    expect(text).toContain('Minimum number of vendors (4) is above the maximum (2).');
    expect(await errorsUnder('SME share')).toEqual(['SME share must be between 0 and 100 %.']);
    await dialog.close();
  });
});
