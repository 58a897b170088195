import { Migration20261209100000 } from '../../server/migrations/Migration20261209100000';
import { makeUser, signedIn, startTestApp, type Browser, type TestApp } from '../support/app';
import { openTender, tenderBody } from '../support/tenders';

/**
 * A tender's count of regions and total forecast live on its own row (`tender.region_count`,
 * `tender.total_forecast`), kept by PostgreSQL's triggers on region in the statement that writes
 * the regions; the tender lists read them. Each way regions are written keeps them equal to what
 * counting and summing the regions gives, and the list shows them.
 */
let t: TestApp;
let buyer: Browser;
let vendor: Browser;
let org: string;

beforeAll(async () => {
  t = await startTestApp({ workers: false });
  buyer = await signedIn(t, await makeUser(t, 'buyer'));
  const u = await makeUser(t, 'vendor');
  org = u.vendorOrganisation!.id;
  vendor = await signedIn(t, u);
});
afterAll(() => t.close());

interface Totals {
  region_count: number;
  total_forecast: string;
  counted: number;
  summed: string;
}

/** What the tender's row says, beside what counting and summing its regions says now. */
async function totals(tenderId: string): Promise<Totals> {
  const [row] = await t.em().getConnection().execute<Totals[]>(
    `select t.region_count, t.total_forecast::text as total_forecast,
            (select count(*)::int from region r where r.tender_id = t.id) as counted,
            (select coalesce(sum(r.forecast), 0)::text from region r where r.tender_id = t.id) as summed
       from tender t where t.id = ?`, [tenderId],
  );
  return row;
}

/** The tender as a list shows it to `who`. */
async function listed(who: Browser, reference: string): Promise<{ regionCount: number; totalForecast: number }> {
  const res = await who.get('/api/tenders').query({ q: reference });
  expect(res.body.total).toBe(1);
  return res.body.items[0];
}

test("a tender's region count and forecast total follow its regions when it is created, edited as a draft and amended, and the lists show them", async () => {
  const body = tenderBody(3, 120);
  const created = await buyer.post('/api/tenders', body);
  expect(created.status).toBe(201);
  const id = created.body.id as string;
  // tenderBody's regions: 1,000, 2,000 and 3,000 t; the sum of numeric(16,4) forecasts keeps four decimals.
  expect(await totals(id)).toEqual({ region_count: 3, total_forecast: '6000.0000', counted: 3, summed: '6000.0000' });
  expect(await listed(buyer, body.reference)).toMatchObject({ regionCount: 3, totalForecast: 6000 });

  // A draft's edit replaces its regions.
  const edited = { ...body, regions: [{ code: 'N1', name: 'North yard', forecast: 250.5 }, { code: 'S1', name: 'South yard', forecast: 400 }] };
  expect((await buyer.send('put', `/api/tenders/${id}`, edited)).status).toBe(200);
  expect(await totals(id)).toEqual({ region_count: 2, total_forecast: '650.5000', counted: 2, summed: '650.5000' });

  // Published, then amended: one region's forecast changed, one removed, one added.
  expect((await buyer.post(`/api/tenders/${id}/invitations`, { vendorOrganisationIds: [org] })).status).toBe(200);
  expect((await buyer.post(`/api/tenders/${id}/publish`)).status).toBe(200);
  const regions = [{ code: 'N1', name: 'North yard', forecast: 300 }, { code: 'E1', name: 'East yard', forecast: 120 }];
  expect((await buyer.post(`/api/tenders/${id}/amendments`, { reason: 'The south yard closes; an east yard opens.', regions })).status).toBe(201);
  expect(await totals(id)).toEqual({ region_count: 2, total_forecast: '420.0000', counted: 2, summed: '420.0000' });
  expect(await listed(vendor, body.reference)).toMatchObject({ regionCount: 2, totalForecast: 420 });
  expect(await listed(buyer, body.reference)).toMatchObject({ regionCount: 2, totalForecast: 420 });
});

test('a tender left without regions counts none and totals 0', async () => {
  // The API always gives a tender a region; the rows are written here as any statement may write them.
  const body = tenderBody(2, 120);
  const created = await buyer.post('/api/tenders', body);
  expect(created.status).toBe(201);
  await t.em().getConnection().execute('delete from region where tender_id = ?', [created.body.id]);
  expect(await totals(created.body.id)).toEqual({ region_count: 0, total_forecast: '0', counted: 0, summed: '0' });
  expect(await listed(buyer, body.reference)).toMatchObject({ regionCount: 0, totalForecast: 0 });
});

test('the migration fills in the totals of the tenders there are, and its triggers keep them after it', async () => {
  const first = await openTender(buyer, [org], tenderBody(4, 120));
  const second = (await buyer.post('/api/tenders', tenderBody(1, 120))).body.id as string;
  // Runs the statements of the migration's up or down, as the migrator does.
  const run = async (direction: 'up' | 'down') => {
    const migration = new Migration20261209100000(t.orm.em.getDriver(), t.orm.config);
    await migration[direction]();
    for (const sql of migration.getQueries()) await t.em().getConnection().execute(sql as string);
  };
  // The schema as it was before the migration, with the regions already there.
  await run('down');
  await run('up');
  // 1,000 + 2,000 + 3,000 + 4,000 t, and 1,000 t.
  expect(await totals(first)).toEqual({ region_count: 4, total_forecast: '10000.0000', counted: 4, summed: '10000.0000' });
  expect(await totals(second)).toEqual({ region_count: 1, total_forecast: '1000.0000', counted: 1, summed: '1000.0000' });
  const regions = [{ code: 'R01', name: 'Depot 1', forecast: 1000 }, { code: 'R02', name: 'Depot 2', forecast: 2000 }];
  expect((await buyer.post(`/api/tenders/${first}/amendments`, { reason: 'Depots 3 and 4 are served by another contract.', regions })).status).toBe(201);
  expect(await totals(first)).toEqual({ region_count: 2, total_forecast: '3000.0000', counted: 2, summed: '3000.0000' });
});
