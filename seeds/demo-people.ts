import type { Role } from '../shared/roles';

/**
 * The demo's people and vendor organisations. Every name here is invented for the demo; any
 * likeness to a real firm or person is chance.
 */
export const DEMO_PASSWORD = 'demo-pass-2026';

export interface DemoOrganisation {
  key: string;
  name: string;
  registrationNumber: string;
  sme: boolean;
  contactEmail: string;
}

export const DEMO_ORGANISATIONS: DemoOrganisation[] = [
  { key: 'v1', name: 'Quarnby Minerals Ltd', registrationNumber: 'DEMO-100101', sme: false, contactEmail: 'vendor1@demo.tendara.test' },
  { key: 'v2', name: 'Saltmere Supply Co.', registrationNumber: 'DEMO-100102', sme: true, contactEmail: 'vendor2@demo.tendara.test' },
  { key: 'v3', name: 'Northfell Haulage & Salt', registrationNumber: 'DEMO-100103', sme: true, contactEmail: 'vendor3@demo.tendara.test' },
  { key: 'v4', name: 'Brackwater Deicing Ltd', registrationNumber: 'DEMO-100104', sme: false, contactEmail: 'vendor4@demo.tendara.test' },
  { key: 'v5', name: 'Kestrelway Road Services', registrationNumber: 'DEMO-100105', sme: true, contactEmail: 'vendor5@demo.tendara.test' },
  { key: 'v6', name: 'Lowmoor Halite plc', registrationNumber: 'DEMO-100106', sme: false, contactEmail: 'vendor6@demo.tendara.test' },
  { key: 'v7', name: 'Tidewell Logistics Ltd', registrationNumber: 'DEMO-100107', sme: true, contactEmail: 'vendor7@demo.tendara.test' },
];

export interface DemoPerson {
  email: string;
  name: string;
  role: Role;
  organisation?: string;
}

export const DEMO_PEOPLE: DemoPerson[] = [
  { email: 'admin@demo.tendara.test', name: 'Ines Albright', role: 'admin' },
  { email: 'buyer@demo.tendara.test', name: 'Tomas Reedy', role: 'buyer' },
  { email: 'compliance@demo.tendara.test', name: 'Priya Castell', role: 'compliance' },
  { email: 'vendor1@demo.tendara.test', name: 'Owen Marsh', role: 'vendor', organisation: 'v1' },
  { email: 'vendor2@demo.tendara.test', name: 'Greta Lindqvist', role: 'vendor', organisation: 'v2' },
  { email: 'vendor3@demo.tendara.test', name: 'Callum Birch', role: 'vendor', organisation: 'v3' },
  { email: 'vendor4@demo.tendara.test', name: 'Aisha Okafor', role: 'vendor', organisation: 'v4' },
  { email: 'vendor5@demo.tendara.test', name: 'Rafael Duarte', role: 'vendor', organisation: 'v5' },
  { email: 'vendor6@demo.tendara.test', name: 'Mei Tanaka', role: 'vendor', organisation: 'v6' },
  { email: 'vendor7@demo.tendara.test', name: 'Jonas Weber', role: 'vendor', organisation: 'v7' },
];

/** Invited by the administrator, no password set yet (not a sign-in). */
export const DEMO_INVITED = { email: 'h.voss@demo.tendara.test', name: 'Hana Voss', role: 'compliance' as const };

/** What the start banner and the README list. */
export const DEMO_SIGN_INS = DEMO_PEOPLE.map((p) => ({ email: p.email, role: p.role }));
