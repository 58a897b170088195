import { simpleParser } from 'mailparser';
import type { RunView } from '@shared/evaluation';
import { formatInZone, utcToWallTime } from '@shared/time-zone';
import { MailMessage, Notice, Recommendation, Tender } from '../../server/entities';
import { standstillEnd } from '../../server/services/standstill';
import { startMailCatcher } from '../../server/mail/catcher';
import { seed } from '../../server/ops/seed';
import { DEMO_PASSWORD } from '../../seeds/demo-people';
import { Browser, startTestApp, type TestApp } from '../support/app';
import { waitForRun } from '../support/evaluation';
import { waitFor } from '../support/wait';

/** Award notices on the demo salt tender, after the buyer → compliance approval. */
jest.setTimeout(120_000);
process.env['NOTICE_RETRY_SECONDS'] = '1';

async function demo(t: TestApp, who: string): Promise<Browser> {
  const b = await new Browser(t.app).init();
  expect((await b.signIn(`${who}@demo.tendara.test`, DEMO_PASSWORD)).status).toBe(200);
  return b;
}

/** Runs the published award basis and has it recommended and approved; returns the approved run. */
async function approvedAward(t: TestApp): Promise<{ tenderId: string; run: RunView; buyer: Browser }> {
  await seed(t.em(), 'demo');
  const buyer = await demo(t, 'buyer');
  const compliance = await demo(t, 'compliance');
  const tenderId = (await t.em().findOneOrFail(Tender, { reference: 'NHP-2026-014' })).id;
  const basis = (await buyer.get(`/api/tenders/${tenderId}/scenarios`)).body.find((s: { builtIn: string }) => s.builtIn === 'published');
  const queued = await buyer.post(`/api/scenarios/${basis.id}/runs`);
  const run = await waitForRun(buyer, queued.body.id);
  expect((await buyer.post(`/api/tenders/${tenderId}/recommendation`, { runId: run.id, justification: 'Least cost.' })).status).toBe(201);
  expect((await compliance.post(`/api/tenders/${tenderId}/recommendation/approve`, { comment: '' })).status).toBe(200);
  return { tenderId, run, buyer };
}

async function waitForStatus(t: TestApp, tenderId: string, status: string): Promise<void> {
  await waitFor(`the tender to be ${status}`, async () => (await t.em().findOneOrFail(Tender, { id: tenderId })).status === status, { everyMs: 250 });
}

describe('with the mail server up', () => {
  let t: TestApp;
  let tenderId: string;
  let run: RunView;
  let buyer: Browser;
  beforeAll(async () => {
    t = await startTestApp();
    ({ tenderId, run, buyer } = await approvedAward(t));
  });
  afterAll(() => t.close());

  /** Sends the notices once, whichever test asks first; the answer to that first request. */
  let firstSend: Promise<Awaited<ReturnType<Browser['post']>>> | undefined;
  const sendOnce = () => (firstSend ??= Promise.resolve(buyer.post(`/api/tenders/${tenderId}/notices`)));

  test('the preview has an award letter per awarded vendor and a regret letter per other bidder; the figures match the approved run', async () => {
    const stored = await t.em().count(Notice, {});
    const res = await buyer.get(`/api/tenders/${tenderId}/notices/preview`);
    expect(res.status).toBe(200);
    const letters = res.body as { vendor: { id: string; name: string }; kind: string; html: string; text: string }[];
    expect(letters).toHaveLength(7);
    const awards = run.result!.awards;
    expect(letters.filter((l) => l.kind === 'award').map((l) => l.vendor.id).sort()).toEqual(awards.map((a) => a.vendor).sort());
    // The demo tender's letter locale is the default, en-GB.
    const eur = new Intl.NumberFormat('en-GB', { style: 'currency', currency: 'EUR' });
    const unitEur = new Intl.NumberFormat('en-GB', { style: 'currency', currency: 'EUR', maximumFractionDigits: 4 });
    for (const a of awards) {
      const letter = letters.find((l) => l.vendor.id === a.vendor)!;
      // The lines add up to the contract value (fee + Σ quantity × unit price), which the letter states as an estimate.
      const sum = a.fixedFee + a.lines.reduce((s, l) => s + l.quantity * l.unitPrice, 0);
      expect(sum).toBeCloseTo(a.value, 6);
      expect(letter.text).toContain(`Estimated contract value: ${eur.format(a.value)}`);
      expect(letter.text).toContain('not a commitment to buy any');
      for (const l of a.lines) expect(letter.text).toContain(`= ${eur.format(l.cost)}`);
    }
    // A regret letter names the successful vendors and the criterion, gives the bidder's own total and
    // its prices against the awarded ones — and no rank anywhere.
    const awardedNames = awards.map((a) => letters.find((l) => l.vendor.id === a.vendor)!.vendor.name);
    for (const regret of letters.filter((l) => l.kind === 'regret')) {
      for (const name of awardedNames) expect(regret.text).toContain(name);
      expect(regret.text).toContain('Award criterion: the lowest total cost');
      expect(regret.text).toContain('- At most 4 vendors will be awarded.');
      expect(regret.text).toContain(`The awarded contract's total cost, all regions and fixed fees included: ${eur.format(run.result!.objective!)}`);
      expect(regret.text).toMatch(/your unit price €[\d.,]+; awarded €[\d.,]+ \(/);
      expect(regret.text).not.toMatch(/rank/i);
    }
    // Every letter names the buying body (name, address, country) and states its language.
    for (const l of letters) {
      expect(l.text).toContain('From: Northvale Highways Partnership, Unit 4, Harbour Road, Northvale, Ireland (procurement@northvale.tendara.test)');
      expect(l.text).toContain('This notice is written in English.');
      expect(l.html).toContain('This notice is written in English.');
    }
    expect(unitEur.format(61.5)).toBe('€61.50');
    expect(await t.em().count(Notice, {})).toBe(stored); // a preview stores nothing
  });

  test('the standstill end was fixed at approval (10 days in Europe/Dublin, next working day, 23:59) and every letter carries that same end', async () => {
    const tender = await t.em().findOneOrFail(Tender, { id: tenderId });
    const rec = await t.em().findOneOrFail(Recommendation, { tender: tenderId, status: 'approved' });
    const expected = standstillEnd({ approvedAt: rec.decidedAt!, days: 10, timeZone: 'Europe/Dublin', country: 'IE', closureDays: tender.closureDays });
    expect(tender.standstillEndsAt?.toISOString()).toBe(expected.endsAt.toISOString());
    expect(utcToWallTime(expected.endsAt.toISOString(), 'Europe/Dublin').slice(11)).toBe('23:59');
    // The one date-time format, in the letters' locale.
    const end = formatInZone(expected.endsAt, 'Europe/Dublin', { locale: tender.locale });
    const preview = (await buyer.get(`/api/tenders/${tenderId}/notices/preview`)).body as { text: string }[];
    expect(preview.map((l) => l.text.includes(`on ${end}.`))).toEqual(Array(7).fill(true));
  });

  test('the preview is byte for byte what is sent: each letter as previewed equals the mail the catcher received', async () => {
    const preview = (await buyer.get(`/api/tenders/${tenderId}/notices/preview`)).body as { vendor: { id: string }; subject: string; html: string; text: string; to: string[] }[];
    expect((await sendOnce()).status).toBe(202);
    await waitForStatus(t, tenderId, 'notified');
    const tender = await t.em().findOneOrFail(Tender, { id: tenderId });
    const notices = await t.em().find(Notice, { tender: tenderId });
    expect(notices).toHaveLength(7);
    // The letters only: the recommendation's own notifications (to compliance, to the buyer) are not letters.
    const mails = (await t.em().find(MailMessage, { subject: { $like: '%NHP-2026-014%' } })).filter((m) => !m.subject.startsWith('Recommendation'));
    expect(mails).toHaveLength(7);
    for (const letter of preview) {
      const notice = notices.find((n) => n.vendorOrganisation.id === letter.vendor.id)!;
      expect(notice.standstillEndsAt.toISOString()).toBe(tender.standstillEndsAt!.toISOString());
      const mail = mails.find((m) => m.toAddresses.join(',') === letter.to.join(','))!;
      expect({ subject: mail.subject, html: mail.html, text: mail.text.trimEnd() }).toEqual({ subject: letter.subject, html: letter.html, text: letter.text.trimEnd() });
    }
    // A later preview still gives the same letters: nothing in them depends on when they are made.
    expect((await buyer.get(`/api/tenders/${tenderId}/notices/preview`)).body).toEqual(preview);
  });

  test('sending queues one notice per bidder, the mail really arrives, and sending twice is refused without duplicating', async () => {
    const first = await sendOnce();
    expect(first.status).toBe(202);
    expect(first.body).toEqual({ queued: 7 });
    const again = await buyer.post(`/api/tenders/${tenderId}/notices`);
    expect(again.status).toBe(409);
    expect(again.body.detail).toMatch(/already been queued/);
    await waitForStatus(t, tenderId, 'notified');
    const notices = await t.em().find(Notice, { tender: tenderId });
    expect(notices.map((n) => n.status)).toEqual(Array(7).fill('sent'));
    const mails = (await t.em().find(MailMessage, { subject: { $like: '%NHP-2026-014%' } }, { populate: ['raw'] })).filter((m) => !m.subject.startsWith('Recommendation'));
    expect(mails).toHaveLength(7);
    const parsed = await simpleParser(mails.find((m) => m.subject.startsWith('Notice of award'))!.raw);
    expect(parsed.text).toContain('Standstill period');
    expect(parsed.html).toContain('Estimated contract value');
  });

  test('a vendor reads only its own notice', async () => {
    expect((await sendOnce()).status).toBe(202);
    await waitForStatus(t, tenderId, 'notified');
    const vendor = await demo(t, 'vendor1');
    const list = await vendor.get('/api/notices');
    expect(list.status).toBe(200);
    expect(list.body).toHaveLength(1);
    const one = await vendor.get(`/api/notices/${list.body[0].id}`);
    expect(one.body.html).toContain('NHP-2026-014');
    const others = await t.em().find(Notice, { vendorOrganisation: { $ne: list.body[0].vendor.id } });
    expect((await vendor.get(`/api/notices/${others[0].id}`)).status).toBe(404);
    const buyerList = await buyer.get('/api/notices').query({ tenderId });
    expect(buyerList.body).toHaveLength(7);
  });

  test('the award schedule of the approved run downloads as a workbook', async () => {
    const res = await buyer.get(`/api/tenders/${tenderId}/award-schedule.xlsx`);
    expect(res.status).toBe(200);
    expect(res.headers['content-disposition']).toMatch(/award-schedule\.xlsx/);
  });
});

test('with the mail server down, notices stay queued and go out when it returns', async () => {
  const t = await startTestApp();
  try {
    const { tenderId, buyer } = await approvedAward(t);
    const port = t.catcher.port;
    await t.catcher.close();
    expect((await buyer.post(`/api/tenders/${tenderId}/notices`)).body).toEqual({ queued: 7 });
    // Wait until every notice has failed at least once.
    await waitFor('every notice to have failed once', async () => (await t.em().find(Notice, { tender: tenderId })).every((n) => n.attempts > 0), { everyMs: 250 });
    const waiting = await t.em().find(Notice, { tender: tenderId });
    expect(waiting.map((n) => n.status)).toEqual(Array(7).fill('queued'));
    expect(waiting.every((n) => n.attempts > 0 && n.lastError)).toBe(true);
    expect((await t.em().findOneOrFail(Tender, { id: tenderId })).status).toBe('awarded');
    // Approved but no letter sent: a vendor sees the tender closed, not its outcome.
    const vendor = await demo(t, 'vendor1');
    expect((await vendor.get(`/api/tenders/${tenderId}`)).body.status).toBe('closed');
    expect((await vendor.get('/api/tenders')).body.items.find((x: { id: string }) => x.id === tenderId).status).toBe('closed');
    expect((await vendor.get('/api/notices')).body).toEqual([]);
    const back = await startMailCatcher(t.orm, port);
    try {
      await waitForStatus(t, tenderId, 'notified');
      // Its letter sent, the vendor sees the outcome.
      expect((await vendor.get(`/api/tenders/${tenderId}`)).body.status).toBe('notified');
      expect((await vendor.get('/api/tenders')).body.items.find((x: { id: string }) => x.id === tenderId).status).toBe('notified');
      expect(await t.em().count(MailMessage, {})).toBeGreaterThanOrEqual(7);
    } finally {
      await back.close();
    }
  } finally {
    t.catcher.close = () => Promise.resolve(); // already closed above
    await t.close();
  }
});
