import { Client } from 'pg';
import { waitFor } from '../../support/wait';
import { baseUrl } from './browser';

/** A signed-in API session of the browser tests' server (cookies and the XSRF header by hand). */
export class ApiSession {
  private cookies = new Map<string, string>();

  private keep(res: Response): void {
    for (const line of res.headers.getSetCookie()) {
      const [pair] = line.split(';');
      const eq = pair.indexOf('=');
      this.cookies.set(pair.slice(0, eq), pair.slice(eq + 1));
    }
  }

  async call<T>(method: string, path: string, body?: unknown): Promise<T> {
    if (!this.cookies.has('XSRF-TOKEN')) this.keep(await fetch(`${baseUrl()}/api/session`));
    const res = await fetch(`${baseUrl()}/api${path}`, {
      method,
      headers: {
        cookie: [...this.cookies].map(([k, v]) => `${k}=${v}`).join('; '),
        'x-xsrf-token': decodeURIComponent(this.cookies.get('XSRF-TOKEN') ?? ''),
        ...(body === undefined ? {} : { 'content-type': 'application/json' }),
      },
      body: body === undefined ? undefined : JSON.stringify(body),
    });
    this.keep(res);
    const text = await res.text();
    if (!res.ok) throw new Error(`${method} ${path}: ${res.status} ${text}`);
    return (text ? JSON.parse(text) : null) as T;
  }

  static async signIn(email: string, password = 'demo-pass-2026'): Promise<ApiSession> {
    const s = new ApiSession();
    await s.call('POST', '/session', { email, password });
    return s;
  }
}

export interface ClosedTenderBid {
  /** Demo vendor's e-mail (vendor1@demo.tendara.test …). */
  vendor: string;
  fixedFee: number;
  capacity: number | null;
  prices: Record<string, number>;
}

/**
 * A tender of the browser test's own, published and open for bids, made the way people make one:
 * the demo buyer creates it, invites the demo vendors named (by their contact e-mail) and
 * publishes it. Returns its id.
 */
export async function publishedTender(input: {
  reference: string; title: string; regions: { code: string; name: string; forecast: number }[]; vendors: string[];
}): Promise<string> {
  const buyer = await ApiSession.signIn('buyer@demo.tendara.test');
  const organisations = await buyer.call<{ id: string; contactEmail: string }[]>('GET', '/vendor-organisations');
  const created = await buyer.call<{ id: string }>('POST', '/tenders', {
    reference: input.reference, title: input.title, commodity: 'Brine, 23 %, delivered', unit: 't', currency: 'EUR',
    closesAt: new Date(Date.now() + 10 * 86_400_000).toISOString(), standstillDays: 10, regions: input.regions,
    timeZone: 'Europe/Dublin', bidValidityDays: 90,
    awardBasis: { sourcing: 'split', soleRegions: [] },
    buyingBody: { name: 'Northvale Highways Partnership', address: 'Unit 4, Harbour Road, Northvale', email: 'procurement@northvale.tendara.test', country: 'IE' },
  });
  const invited = input.vendors.map((vendor) => {
    const org = organisations.find((o) => o.contactEmail === vendor);
    if (!org) throw new Error(`no demo organisation with contact ${vendor}`);
    return org.id;
  });
  await buyer.call('POST', `/tenders/${created.id}/invitations`, { vendorOrganisationIds: invited });
  await buyer.call('POST', `/tenders/${created.id}/publish`);
  return created.id;
}

/**
 * A tender of the browser test's own, closed with bids from demo vendors, made the way people make
 * one: the demo buyer creates, invites and publishes it, each vendor submits through the API; then
 * its closing time (and the bids' receipt times, an hour before it) is moved into the past in the
 * database, and the next read closes it and writes its opening record. The demo's own tenders stay
 * as seeded, whatever other browser test files do to them.
 */
export async function closedTender(input: {
  reference: string; title: string; regions: { code: string; name: string; forecast: number }[]; bids: ClosedTenderBid[];
}): Promise<string> {
  const id = await publishedTender({ ...input, vendors: input.bids.map((b) => b.vendor) });
  const buyer = await ApiSession.signIn('buyer@demo.tendara.test');
  for (const bid of input.bids) {
    const vendor = await ApiSession.signIn(bid.vendor);
    await vendor.call('PUT', `/tenders/${id}/bid`, { fixedFee: bid.fixedFee, capacity: bid.capacity, prices: bid.prices, submit: true, version: null });
  }
  const db = new Client({ connectionString: process.env['E2E_DATABASE_URL'] });
  await db.connect();
  try {
    await db.query(`update tender set closes_at = now() - interval '10 minutes', published_at = now() - interval '3 days' where id = $1`, [id]);
    await db.query(`update bid set submitted_at = now() - interval '70 minutes' where tender_id = $1`, [id]);
  } finally {
    await db.end();
  }
  // Reading the tender closes it (its closing time is past the grace), as the close job would.
  const view = await buyer.call<{ status: string }>('GET', `/tenders/${id}`);
  if (view.status !== 'closed') throw new Error(`the tender did not close: ${view.status}`);
  return id;
}

/** Runs one of a closed tender's scenarios through the API (built-in: published, split, sole) and waits for its end; returns the run's id. */
export async function runScenario(session: ApiSession, tenderId: string, builtIn: string): Promise<string> {
  const scenarios = await session.call<{ id: string; builtIn: string | null }[]>('GET', `/tenders/${tenderId}/scenarios`);
  const scenario = scenarios.find((s) => s.builtIn === builtIn);
  if (!scenario) throw new Error(`the tender has no built-in scenario ${builtIn}`);
  const run = await session.call<{ id: string }>('POST', `/scenarios/${scenario.id}/runs`);
  await waitFor(`the ${builtIn} run to finish`, async () => !['queued', 'solving'].includes((await session.call<{ status: string }>('GET', `/runs/${run.id}`)).status));
  return run.id;
}

/**
 * Takes a closed tender of the test's own to `notified` through the API, as its people would: the
 * buyer runs the published basis and recommends it, compliance approves, the buyer sends the letters,
 * and the letters are sent. Returns the recommended run's id.
 */
export async function awardAndNotify(tenderId: string): Promise<string> {
  const buyer = await ApiSession.signIn('buyer@demo.tendara.test');
  const compliance = await ApiSession.signIn('compliance@demo.tendara.test');
  const runId = await runScenario(buyer, tenderId, 'published');
  await buyer.call('POST', `/tenders/${tenderId}/recommendation`, { runId, justification: 'Least cost under the published basis.' });
  await compliance.call('POST', `/tenders/${tenderId}/recommendation/approve`, { comment: '' });
  await buyer.call('POST', `/tenders/${tenderId}/notices`);
  await waitFor('the letters to be sent', async () => (await buyer.call<{ status: string }>('GET', `/tenders/${tenderId}`)).status === 'notified');
  return runId;
}
