import { animationsDone, baseUrl, openBrowser, screenshot, seriousViolations, signIn } from './support/browser';
import { ApiSession } from './support/closed-tender';

/**
 * Each role's home is its worklist. The file makes its own state through the API as the demo
 * people would (a draft, a tender closing in two days with a bid, a vendor's draft and a question
 * waiting), so that what it checks does not depend on other files; the demo seed's own items (the
 * administrator's pending invitation, the compliance officer's unverified trails) are there too.
 */
const HOUR = 3_600_000;
const DRAFT = 'NHP-2027-041';
const CLOSING = 'NHP-2027-038';

let b: Awaited<ReturnType<typeof openBrowser>>;

const tender = (reference: string, title: string, closesInHours: number) => ({
  reference, title, commodity: 'Rock salt, 6 mm, delivered', unit: 't', currency: 'EUR',
  closesAt: new Date(Date.now() + closesInHours * HOUR).toISOString(),
  clarificationsCloseAt: new Date(Date.now() + (closesInHours / 2) * HOUR).toISOString(),
  standstillDays: 10, timeZone: 'Europe/Dublin', awardBasis: { sourcing: 'split', soleRegions: [] },
  regions: [{ code: 'D01', name: 'Ashcombe depot', forecast: 800 }, { code: 'D02', name: 'Brindle Cross depot', forecast: 1200 }],
  buyingBody: { name: 'Northvale Highways Partnership', address: 'Unit 4, Harbour Road, Northvale', email: 'procurement@northvale.tendara.test', country: 'IE' },
});

beforeAll(async () => {
  b = await openBrowser();
  const buyer = await ApiSession.signIn('buyer@demo.tendara.test');
  const organisations = await buyer.call<{ id: string; contactEmail: string }[]>('GET', '/vendor-organisations');
  const org = (email: string) => organisations.find((o) => o.contactEmail === email)!.id;
  await buyer.call('POST', '/tenders', tender(DRAFT, 'Salt barn restock, spring round', 30 * 24));
  const open = await buyer.call<{ id: string }>('POST', '/tenders', tender(CLOSING, 'Emergency salt top-up, two depots', 48));
  await buyer.call('POST', `/tenders/${open.id}/invitations`, {
    vendorOrganisationIds: ['vendor1@demo.tendara.test', 'vendor2@demo.tendara.test', 'vendor3@demo.tendara.test'].map(org),
  });
  await buyer.call('POST', `/tenders/${open.id}/publish`);
  const vendor1 = await ApiSession.signIn('vendor1@demo.tendara.test');
  await vendor1.call('PUT', `/tenders/${open.id}/bid`, { fixedFee: 1200, capacity: null, prices: { D01: 61.5 }, submit: false, version: null });
  const vendor2 = await ApiSession.signIn('vendor2@demo.tendara.test');
  await vendor2.call('PUT', `/tenders/${open.id}/bid`, { fixedFee: 1500, capacity: 1800, prices: { D01: 63, D02: 59.8 }, submit: true, version: null });
  const vendor3 = await ApiSession.signIn('vendor3@demo.tendara.test');
  await vendor3.call('POST', `/tenders/${open.id}/questions`, { text: 'May the Brindle Cross deliveries be made at night?' });
});
afterAll(() => b.close());

/** Signs in, waits for the worklist (not its skeleton) and for the navigation's count. */
async function home(email: string): Promise<void> {
  await signIn(b.page, email);
  await b.page.goto(`${baseUrl()}/`);
  await b.page.getByRole('heading', { name: /What needs you now/, level: 2 }).waitFor();
  await b.page.getByRole('heading', { name: 'Nothing waiting here now', level: 3 }).waitFor();
}

const section = (title: string) => b.page.getByRole('region', { name: new RegExp(`^${title}`) });

test('buyer: drafts, a tender closing within 72 h with its bid count, a question waiting; the count is in the Overview link’s name', async () => {
  await home('buyer@demo.tendara.test');
  await section('Drafts not published').getByRole('link', { name: new RegExp(DRAFT) }).waitFor();
  const closing = section('Closing within 72 hours').getByRole('link', { name: new RegExp(CLOSING) });
  await closing.getByText('1 bid submitted so far.').waitFor();
  await closing.getByText(/^Closes: .*\(Europe\/Dublin\)$/).waitFor();
  await section('Questions to answer').getByRole('link', { name: new RegExp(CLOSING) }).getByText('1 question from vendors waiting for your answer.').waitFor();
  const overview = b.page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: /^Overview, \d+ items? waiting$/ });
  await overview.waitFor();
  await animationsDone(b.page);
  await screenshot(b.page, 'worklist-buyer');
  expect(await seriousViolations(b.page)).toEqual([]);
  // With the keyboard: the item is a link like any other.
  await closing.focus();
  await b.page.keyboard.press('Enter');
  await b.page.waitForURL((url) => /^\/tenders\/[0-9a-f-]{36}$/.test(url.pathname));
  await b.page.getByRole('heading', { name: 'Emergency salt top-up, two depots', level: 1 }).waitFor();
});

test('vendor: its draft on a tender closing within 72 h waits, and its empty sections say what will appear there', async () => {
  await home('vendor1@demo.tendara.test');
  const draft = section('Draft bids closing within 72 hours').getByRole('link', { name: new RegExp(CLOSING) });
  await draft.getByText('Your bid is still a draft and closing is within 72 hours: a draft is not opened.').waitFor();
  // Other browser files may already have sent vendor 1 a letter: the section then lists it, and
  // otherwise it says what will appear there.
  await b.page.getByText('Award letters, regret letters and exclusion notices appear here once the buyer sends them after approval.')
    .or(section('Letters received').getByRole('link').first()).waitFor();
  // Another vendor's bid is not this vendor's business: vendor 2 submitted, vendor 1 sees no count.
  await expect(b.page.getByText(/submitted so far/).count()).resolves.toBe(0);
  await animationsDone(b.page);
  await screenshot(b.page, 'worklist-vendor');
  expect(await seriousViolations(b.page)).toEqual([]);
});

test('compliance: audit trails never verified wait, each linking to its trail', async () => {
  await home('compliance@demo.tendara.test');
  const trail = section('Audit trails to verify').getByRole('link', { name: new RegExp(CLOSING) });
  await trail.waitFor();
  expect(await trail.getAttribute('href')).toMatch(/^\/tenders\/[0-9a-f-]{36}\/evaluation\/audit$/);
  await animationsDone(b.page);
  await screenshot(b.page, 'worklist-compliance');
  expect(await seriousViolations(b.page)).toEqual([]);
});

test('administrator: the invitation not yet accepted waits, with its link’s expiry', async () => {
  await home('admin@demo.tendara.test');
  const invited = section('Invitations not yet accepted').getByRole('link', { name: /Hana Voss/ });
  await invited.getByText('Invited; no password set yet.').waitFor();
  await invited.getByText(/^Link expires: /).waitFor();
  await animationsDone(b.page);
  await screenshot(b.page, 'worklist-admin');
  expect(await seriousViolations(b.page)).toEqual([]);
});

test('on a phone (390×844) the vendor’s worklist fits the screen', async () => {
  const phone = await openBrowser({ width: 390, height: 844 });
  try {
    await signIn(phone.page, 'vendor1@demo.tendara.test');
    await phone.page.getByRole('heading', { name: 'Nothing waiting here now', level: 3 }).waitFor();
    const overflow = await phone.page.evaluate(() => document.documentElement.scrollWidth - document.documentElement.clientWidth);
    expect(overflow).toBe(0);
    await animationsDone(phone.page);
    await screenshot(phone.page, 'worklist-vendor-390');
    expect(await seriousViolations(phone.page)).toEqual([]);
  } finally {
    await phone.close();
  }
});
