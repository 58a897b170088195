import type { EntityManager } from '@mikro-orm/postgresql';
import { randomBytes } from 'node:crypto';
import { AccountToken, User, VendorOrganisation } from '../server/entities';
import { hashPassword } from '../server/auth/password';
import { DEMO_INVITED, DEMO_ORGANISATIONS, DEMO_PASSWORD, DEMO_PEOPLE } from './demo-people';
import { completeDemoOpening, loadDemoTenders } from './demo-tenders';

/**
 * Loads the demo data set (fictional people and firms) in one transaction. Called through
 * `server/ops/seed.ts`, which makes sure it loads only once per database.
 */
export async function loadDemo(em: EntityManager): Promise<void> {
  const orgs = new Map<string, VendorOrganisation>();
  for (const o of DEMO_ORGANISATIONS) {
    orgs.set(o.key, em.create(VendorOrganisation, { name: o.name, registrationNumber: o.registrationNumber, sme: o.sme, contactEmail: o.contactEmail }));
  }
  const hash = await hashPassword(DEMO_PASSWORD);
  let buyer: User | undefined;
  const vendorPeople = new Map<string, User>();
  for (const p of DEMO_PEOPLE) {
    const user = em.create(User, {
      email: p.email,
      name: p.name,
      role: p.role,
      vendorOrganisation: p.organisation ? orgs.get(p.organisation) : null,
      passwordHash: hash,
    });
    if (p.role === 'buyer') buyer = user;
    if (p.organisation && !vendorPeople.has(p.organisation)) vendorPeople.set(p.organisation, user);
  }
  // Invited a day ago and not yet signed up: the administrator's worklist shows the invitation
  // waiting. The link's secret is thrown away (the seed sends no mail): a resend issues a fresh one.
  const invited = em.create(User, { ...DEMO_INVITED, vendorOrganisation: null, passwordHash: null });
  em.create(AccountToken, {
    user: invited, purpose: 'invitation', tokenHash: randomBytes(32).toString('hex'),
    createdAt: new Date(Date.now() - 86_400_000), expiresAt: new Date(Date.now() + 2 * 86_400_000),
  });
  const salt = loadDemoTenders(em, buyer!, orgs, new Date(), vendorPeople);
  await completeDemoOpening(em, salt, buyer!, orgs);
}
