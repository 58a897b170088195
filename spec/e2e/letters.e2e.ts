import { Client } from 'pg';
import { waitFor } from '../support/wait';
import { animationsDone, baseUrl, openBrowser, openTender, screenshot, seriousViolations, signIn } from './support/browser';
import { ApiSession, closedTender } from './support/closed-tender';

/**
 * The letters as vendors read them at phone width (award, regret, exclusion) and the contract step
 * on the buyer's tender page, on a tender of this file's own: three demo vendors, one excluded, the
 * published basis run, recommended, approved and notified through the API; then its stored
 * standstill end is moved into the past in the database (as if the days had gone by).
 */
jest.setTimeout(180_000);
const TENDER = 'NHP-2026-052';
const VENDORS = { award: 'vendor1@demo.tendara.test', regret: 'vendor2@demo.tendara.test', exclusion: 'vendor3@demo.tendara.test' };

let tenderId: string;
beforeAll(async () => {
  const regions = ['K1', 'K2'].map((code, i) => ({ code, name: `Depot ${code}`, forecast: 100 * (i + 1) }));
  // Close prices (none abnormally low): the first vendor is cheapest everywhere and alone takes the award.
  tenderId = await closedTender({
    reference: TENDER, title: 'Grit for the hill depots, late winter', regions,
    bids: [
      { vendor: VENDORS.award, fixedFee: 500, capacity: null, prices: { K1: 50, K2: 50 } },
      { vendor: VENDORS.regret, fixedFee: 500, capacity: null, prices: { K1: 52, K2: 53 } },
      { vendor: VENDORS.exclusion, fixedFee: 500, capacity: null, prices: { K1: 51, K2: 52 } },
    ],
  });
  const buyer = await ApiSession.signIn('buyer@demo.tendara.test');
  const compliance = await ApiSession.signIn('compliance@demo.tendara.test');
  const tab = await buyer.call<{ bids: { id: string; vendor: { id: string } }[] }>('GET', `/tenders/${tenderId}/bids`);
  const organisations = await buyer.call<{ id: string; contactEmail: string }[]>('GET', '/vendor-organisations');
  const excludedOrg = organisations.find((o) => o.contactEmail === VENDORS.exclusion)!.id;
  const excluded = tab.bids.find((x) => x.vendor.id === excludedOrg)!;
  await buyer.call('PUT', `/tenders/${tenderId}/bids/${excluded.id}/compliance`, { decision: 'excluded', ground: 'qualification', note: 'The insurance certificate sent with the bid had expired.' });
  const scenarios = await buyer.call<{ id: string; builtIn: string | null }[]>('GET', `/tenders/${tenderId}/scenarios`);
  const queued = await buyer.call<{ id: string }>('POST', `/scenarios/${scenarios.find((s) => s.builtIn === 'published')!.id}/runs`);
  await waitFor('the run to finish', async () => !['queued', 'solving'].includes((await buyer.call<{ status: string }>('GET', `/runs/${queued.id}`)).status));
  await buyer.call('POST', `/tenders/${tenderId}/recommendation`, { runId: queued.id, justification: 'Least cost under the published basis.' });
  await compliance.call('POST', `/tenders/${tenderId}/recommendation/approve`, { comment: '' });
  await buyer.call('POST', `/tenders/${tenderId}/notices`);
  await waitFor('the letters to be sent', async () => (await buyer.call<{ status: string }>('GET', `/tenders/${tenderId}`)).status === 'notified');
  const db = new Client({ connectionString: process.env['E2E_DATABASE_URL'] });
  await db.connect();
  try {
    await db.query(`update tender set standstill_ends_at = now() - interval '3 days' where id = $1`, [tenderId]);
  } finally {
    await db.end();
  }
});

describe('letters at phone width (390 × 844)', () => {
  let b: Awaited<ReturnType<typeof openBrowser>>;
  beforeAll(async () => { b = await openBrowser({ width: 390, height: 844 }); });
  afterAll(() => b.close());

  test.each(Object.entries(VENDORS))('the %s letter reads with its own dates in the procedure’s zone, named, and passes axe', async (kind, email) => {
    const { page } = b;
    await signIn(page, email);
    const vendor = await ApiSession.signIn(email);
    const [notice] = await vendor.call<{ id: string; kind: string; standstillEndsAt: string }[]>('GET', `/notices?tenderId=${tenderId}`);
    expect(notice.kind).toBe(kind);
    await page.goto(`${baseUrl()}/notices/${notice.id}`);
    await page.getByText('Standstill period ends').waitFor();
    // The reader's facts give the letter's own times in Europe/Dublin, the zone named.
    await page.getByText(/\(Europe\/Dublin\)/).first().waitFor();
    const frame = page.frameLocator('iframe').first();
    await frame.getByText('This notice is written in English.').waitFor();
    await frame.getByText(/Northvale Highways Partnership, Unit 4, Harbour Road, Northvale, Ireland/).first().waitFor();
    await animationsDone(page);
    await screenshot(page, `letter-${kind}-390`);
    expect(await seriousViolations(page)).toEqual([]);
    // The whole letter: a window tall enough for the page not to scroll.
    await page.setViewportSize({ width: 390, height: 3200 });
    await animationsDone(page);
    await screenshot(page, `letter-${kind}-390-whole`);
    await page.setViewportSize({ width: 390, height: 844 });
  });
});

describe('standstill settings in the tender editor', () => {
  let b: Awaited<ReturnType<typeof openBrowser>>;
  beforeAll(async () => { b = await openBrowser(); });
  afterAll(() => b.close());

  test('0 standstill days asks for the exemption ground; closure days and the letter locale list sit beside it; axe-clean', async () => {
    const { page } = b;
    await signIn(page, 'buyer@demo.tendara.test');
    await page.goto(`${baseUrl()}/tenders/new`);
    await page.getByRole('heading', { name: 'New tender', level: 1 }).waitFor();
    expect(await page.getByLabel('Ground for no standstill').count()).toBe(0);
    await page.getByLabel('Standstill period (days)').fill('0');
    await page.getByLabel('Ground for no standstill').waitFor();
    await page.getByLabel('Closure days of the buying body').fill('2026-12-29, 2026-12-30');
    await page.getByRole('combobox', { name: 'Letter locale' }).click();
    await page.getByRole('option', { name: 'en-IE' }).click();
    await page.getByLabel('Standstill period (days)').scrollIntoViewIfNeeded();
    await animationsDone(page);
    await screenshot(page, 'tender-editor-standstill-1280');
    expect(await seriousViolations(page)).toEqual([]);
  });
});

describe('the contract step', () => {
  let b: Awaited<ReturnType<typeof openBrowser>>;
  // Tall enough to show the section below the tender's facts in one picture.
  beforeAll(async () => { b = await openBrowser({ width: 1280, height: 1500 }); });
  afterAll(() => b.close());

  test('after the standstill the buyer records the awarded vendor’s contract from the pre-filled schedule, and the tender is contracted', async () => {
    const { page } = b;
    await signIn(page, 'buyer@demo.tendara.test');
    await openTender(page, TENDER);
    const section = page.getByRole('region', { name: 'Contracts' });
    await section.waitFor();
    const form = section.getByRole('form');
    await form.waitFor();
    // Pre-filled from the award: both depots at the awarded quantity and price.
    expect(await form.getByLabel('Quantity, K1').inputValue()).toBe('100');
    expect(await form.getByLabel('Unit price, K2').inputValue()).toBe('50');
    await animationsDone(page);
    await screenshot(page, 'contracts-to-record-1280');
    expect(await seriousViolations(page)).toEqual([]);
    const date = form.getByLabel('Signature date');
    await date.fill((await date.getAttribute('min'))!);
    await form.getByLabel('Quantity, K2').fill('180');
    await form.getByRole('button', { name: 'Record contract' }).click();
    await section.getByText('Every awarded vendor’s contract is recorded.').waitFor();
    await page.getByText('Contracts recorded').first().waitFor();
    await section.getByRole('row', { name: /Depot K2 \(K2\) 180/ }).waitFor();
    await animationsDone(page);
    await screenshot(page, 'contracts-recorded-1280');
    expect(await seriousViolations(page)).toEqual([]);
  });
});
