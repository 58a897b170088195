import { createHash } from 'node:crypto';
import { Migration20261202175000 } from '../../server/migrations/Migration20261202175000';
import { audit } from '../../server/services/audit.service';
import { makeUser, signedIn, startTestApp, type TestApp } from '../support/app';
import { openTender, passClosingTime } from '../support/tenders';

/**
 * Bids stored before receipts were keyed carry an unsalted SHA-256 of their content and no nonce.
 * The migration that adds the nonce gives each live one a nonce and a commitment that verifies.
 */
let t: TestApp;
beforeAll(async () => {
  t = await startTestApp({ workers: false });
});
afterAll(() => t.close());

test('the migration gives every live bid stored before keyed receipts a nonce and a commitment that verifies at opening', async () => {
  const buyer = await signedIn(t, await makeUser(t, 'buyer'));
  const vendors = [await makeUser(t, 'vendor'), await makeUser(t, 'vendor')];
  const tenderId = await openTender(buyer, vendors.map((v) => v.vendorOrganisation!.id));
  const [live, draft] = await Promise.all(vendors.map((v) => signedIn(t, v)));
  const figures = { fixedFee: 12000, capacity: null, prices: { R01: 44.5, R03: 47.25 } };
  expect((await live.send('put', `/api/tenders/${tenderId}/bid`, { ...figures, submit: true, version: null })).status).toBe(200);
  expect((await draft.send('put', `/api/tenders/${tenderId}/bid`, { ...figures, submit: false, version: null })).status).toBe(200);
  // The schema and rows as they were before the migration.
  const conn = t.em().getConnection();
  const unsalted = createHash('sha256').update('as before').digest('hex');
  await conn.execute(`alter table bid drop column nonce`);
  await conn.execute(`update bid set digest = ? where status = 'submitted'`, [unsalted]);

  await new Migration20261202175000(t.orm.em.getDriver(), t.orm.config).up();

  const rows = await conn.execute<{ status: string; nonce: string | null; digest: string | null }[]>(`select status, nonce, digest from bid order by status`);
  expect(rows).toEqual([
    { status: 'draft', nonce: null, digest: null },
    { status: 'submitted', nonce: expect.stringMatching(/^[0-9a-f]{64}$/), digest: expect.stringMatching(/^[0-9a-f]{64}$/) },
  ]);
  expect(rows[1].digest).not.toBe(unsalted);

  // An audit entry written before the change, with the unsalted digest: withheld while sealed.
  await t.em().transactional((tx) => audit(tx, { tenderId, actor: null, action: 'bid.revised', subject: 'bid x', detail: { revision: 2, digest: unsalted } }));
  const sealedTrail = await buyer.get(`/api/tenders/${tenderId}/audit`);
  expect(sealedTrail.text).not.toContain(unsalted);
  expect(sealedTrail.body.find((e: { action: string }) => e.action === 'bid.revised').detail).toEqual({ revision: 2 });
  const csv = await buyer.get(`/api/tenders/${tenderId}/audit.csv`);
  expect(csv.status).toBe(200);
  expect(csv.text).not.toContain(unsalted);
  expect((await buyer.get(`/api/tenders/${tenderId}/audit/verify`)).body.ok).toBe(true);
  await passClosingTime(t, tenderId);
  const bids = (await buyer.get(`/api/tenders/${tenderId}/bids`)).body.bids;
  expect(bids).toEqual([expect.objectContaining({ digest: rows[1].digest, nonce: rows[1].nonce, receiptVerified: true })]);
});
