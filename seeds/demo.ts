import type { EntityManager } from '@mikro-orm/postgresql';
import { User, VendorOrganisation } from '../server/entities';
import { hashPassword } from '../server/auth/password';
import { DEMO_ORGANISATIONS, DEMO_PASSWORD, DEMO_PEOPLE } from './demo-people';
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
  const salt = loadDemoTenders(em, buyer!, orgs, new Date(), vendorPeople);
  await completeDemoOpening(em, salt, buyer!, orgs);
}
