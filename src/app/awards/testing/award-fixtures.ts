import { TestBed } from '@angular/core/testing';
import { HttpTestingController } from '@angular/common/http/testing';
import type { Role } from '@shared/roles';
import type { RunView } from '@shared/evaluation';
import { Auth } from '../../core/auth/auth';

/** Fictional test data and small helpers shared by the award screens' specs. */

export const TENDER_ID = '6d1f3c2a-0b4e-4c7a-9e21-5a8f0c3d7b10';
export const RUN_ID = 'b7e2a9c4-3d51-4f08-8a6e-1c2d3e4f5a60';

/** Signs a person in the way the app does at start-up (GET /api/session). */
export async function signInAs(role: Role, id = `user-${role}`): Promise<void> {
  const auth = TestBed.inject(Auth);
  const http = TestBed.inject(HttpTestingController);
  const restored = auth.restore();
  http.expectOne('/api/session').flush({ user: { id, email: `${role}@demo.tendara.test`, name: `Test ${role}`, role } });
  await restored;
}

export function runView(overrides: Partial<RunView> = {}): RunView {
  return {
    id: RUN_ID,
    tenderId: TENDER_ID,
    scenarioId: 'c0ffee00-0000-4000-8000-000000000001',
    scenarioName: 'All regions split',
    awardable: true,
    whatIf: null,
    status: 'optimal',
    queuedAt: '2026-12-01T09:00:00Z',
    startedAt: '2026-12-01T09:00:01Z',
    finishedAt: '2026-12-01T09:00:04Z',
    timeLimitSeconds: 60,
    objective: 1234567.5,
    droppedVendor: null,
    parentRunId: null,
    forecastChangePercent: null,
    scaledRegion: null,
    currency: 'EUR',
    unit: 't',
    inputDigest: 'a'.repeat(64),
    vendors: {
      'v-north': { name: 'Northfell Minerals', sme: false },
      'v-brine': { name: 'Brinewick Salt Co-op', sme: true },
    },
    regions: {
      R01: { name: 'Cranby depot', forecast: 4200 },
      R02: { name: 'Wexcombe depot', forecast: 3000 },
    },
    result: {
      status: 'optimal',
      objective: 1234567.5,
      fixedCost: 50000,
      variableCost: 1184567.5,
      bound: 1234567.5,
      boundSource: 'branch-and-bound dual bound',
      gap: 0,
      solveSeconds: 0.21,
      engine: 'test engine 1.0',
      awards: [
        {
          vendor: 'v-north',
          fixedFee: 25000,
          quantity: 4200,
          value: 700000,
          share: 0.5833,
          lines: [{ region: 'R01', quantity: 4200, unitPrice: 160.71, cost: 675000 }],
        },
        {
          vendor: 'v-brine',
          fixedFee: 25000,
          quantity: 3000,
          value: 534567.5,
          share: 0.4167,
          lines: [{ region: 'R02', quantity: 3000, unitPrice: 169.86, cost: 509567.5 }],
        },
      ],
      diagnosis: [],
    },
    ...overrides,
  };
}
