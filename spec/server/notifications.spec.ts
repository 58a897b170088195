import { randomUUID } from 'node:crypto';
import type { EntityManager } from '@mikro-orm/postgresql';
import { AuditEntry, MailMessage, NotificationSent, Tender } from '../../server/entities';
import { QUEUES } from '../../server/jobs/queue';
import { renderMail } from '../../server/mail/templates';
import { notifyRecommendationDecided } from '../../server/services/notifications/decisions';
import { notifyOnce, type NotifyDeps } from '../../server/services/notifications/notify';
import { sendDueNotifications } from '../../server/services/notifications/reminders';
import { waitForRun } from '../support/evaluation';
import { makeUser, signedIn, startTestApp, type Browser, type TestApp } from '../support/app';
import { openTender, passClosingTime, tenderBody } from '../support/tenders';
import { drainQueue } from '../support/wait';

/**
 * Notification e-mails through the real mail queue and catcher: who gets which, once per event and
 * person (the `notification_sent` key), reminders a person turned off are not sent, legal notices
 * always are. Time is driven by passing `now` to the reminder job (the clock it is given).
 */
let t: TestApp;
let deps: NotifyDeps;
let buyer: Browser;
let buyerEmail: string;
let compliance: Browser;
let complianceEmails: string[];
interface Vendor { b: Browser; org: string; email: string; id: string }

const HOUR = 3_600_000;
const TEN_DAYS_MINUTES = 10 * 24 * 60;

async function vendor(): Promise<Vendor> {
  const u = await makeUser(t, 'vendor');
  return { b: await signedIn(t, u), org: u.vendorOrganisation!.id, email: u.email, id: u.id };
}

/** Mails the catcher stored for `to` whose subject starts with `subjectStart`, once the mail queue is drained. */
async function mailsTo(to: string, subjectStart: string): Promise<MailMessage[]> {
  await drainQueue(t, QUEUES.mail);
  return t.em().find(MailMessage, { toAddresses: { $contains: [to] }, subject: { $like: `${subjectStart}%` } }, { orderBy: { createdAt: 'asc' } });
}

const subjects = (mails: MailMessage[]) => mails.map((m) => m.subject);

beforeAll(async () => {
  t = await startTestApp();
  deps = { boss: t.boss, publicUrl: t.config.publicUrl };
  const b = await makeUser(t, 'buyer');
  buyerEmail = b.email;
  buyer = await signedIn(t, b);
  const officers = [await makeUser(t, 'compliance'), await makeUser(t, 'compliance')];
  complianceEmails = officers.map((o) => o.email);
  compliance = await signedIn(t, officers[0]);
});
afterAll(() => t.close());

describe('never twice', () => {
  test('two transactions notifying the same event and person at once queue exactly one mail and one notification_sent row', async () => {
    const person = await makeUser(t, 'vendor');
    const subjectId = randomUUID();
    const send = (em: EntityManager) => em.transactional((tx) => notifyOnce(tx, t.boss, {
      kind: 'amendment-issued', subjectId, tenderId: null, recipients: [{ id: person.id, email: person.email, name: person.name }],
      render: (r) => renderMail('standstill-ended', `Once only ${subjectId}`, { name: r.name, reference: 'X-1', title: 'Test', endedAt: 'now', link: 'http://tendara.test', settingsLink: 'http://tendara.test/settings' }),
    }));
    const queued = await Promise.all([send(t.em()), send(t.em())]);
    expect(queued.sort()).toEqual([0, 1]);
    expect(await send(t.em())).toBe(0);
    expect(subjects(await mailsTo(person.email, `Once only ${subjectId}`))).toEqual([`Once only ${subjectId}`]);
    expect(await t.em().count(NotificationSent, { subjectId, recipient: person.id })).toBe(1);
  });

  test('a notification whose transaction rolls back queues no mail and leaves no row, so it is sent when the change is made again', async () => {
    const person = await makeUser(t, 'vendor');
    const subjectId = randomUUID();
    const notification = {
      kind: 'clarification-answered' as const, subjectId, tenderId: null, recipients: [{ id: person.id, email: person.email, name: person.name }],
      render: () => renderMail('standstill-ended', `Rolled back ${subjectId}`, { name: 'x', reference: 'X-1', title: 'Test', endedAt: 'now', link: 'l', settingsLink: 's' }),
    };
    await expect(t.em().transactional(async (tx) => {
      await notifyOnce(tx, t.boss, notification);
      throw new Error('the change failed');
    })).rejects.toThrow('the change failed');
    expect(await mailsTo(person.email, `Rolled back ${subjectId}`)).toEqual([]);
    expect(await t.em().transactional((tx) => notifyOnce(tx, t.boss, notification))).toBe(1);
    expect(subjects(await mailsTo(person.email, `Rolled back ${subjectId}`))).toHaveLength(1);
  });
});

describe('closing reminders', () => {
  let tenderId: string;
  let reference: string;
  let closesAt: Date;
  let none: Vendor;
  let draft: Vendor;
  let submitted: Vendor;
  let quiet: Vendor;

  beforeAll(async () => {
    [none, draft, submitted, quiet] = [await vendor(), await vendor(), await vendor(), await vendor()];
    const body = tenderBody(2, TEN_DAYS_MINUTES);
    reference = body.reference;
    tenderId = await openTender(buyer, [none.org, draft.org, submitted.org, quiet.org], body);
    closesAt = (await t.em().findOneOrFail(Tender, { id: tenderId })).closesAt;
    const figures = { fixedFee: 1000, prices: { R01: 50, R02: 51 }, capacity: null, version: null };
    expect((await draft.b.send('put', `/api/tenders/${tenderId}/bid`, { ...figures, submit: false })).status).toBe(200);
    expect((await submitted.b.send('put', `/api/tenders/${tenderId}/bid`, { ...figures, submit: true })).status).toBe(200);
    expect((await quiet.b.send('put', '/api/me/notification-settings', { closingReminders: false, decisionUpdates: true })).status).toBe(200);
  });

  test('nothing is sent more than 48 hours before closing', async () => {
    expect(await sendDueNotifications(t.em(), deps, new Date(closesAt.getTime() - 49 * HOUR))).toBe(0);
    expect(await mailsTo(none.email, `Tender ${reference} closes within`)).toEqual([]);
  });

  test('48 h before closing, vendors with a draft or no bid are reminded once, however often the job runs; a submitted bid and a person who turned reminders off get none', async () => {
    const at = new Date(closesAt.getTime() - 47 * HOUR);
    expect(await sendDueNotifications(t.em(), deps, at)).toBe(2);
    expect(await sendDueNotifications(t.em(), deps, at)).toBe(0);
    expect(await sendDueNotifications(t.em(), deps, new Date(at.getTime() + HOUR))).toBe(0);
    const subject = `Tender ${reference} closes within 48 hours: your bid is not in`;
    const toNone = await mailsTo(none.email, `Tender ${reference} closes within 48`);
    const toDraft = await mailsTo(draft.email, `Tender ${reference} closes within 48`);
    expect(subjects(toNone)).toEqual([subject]);
    expect(subjects(toDraft)).toEqual([subject]);
    expect(toNone[0].text).toContain('has not submitted a bid');
    expect(toDraft[0].text).toContain('still a draft');
    // The draft's figures are its vendor's own, but a reminder never carries them.
    expect(toDraft[0].text).not.toContain('1000');
    expect(await mailsTo(submitted.email, `Tender ${reference} closes within`)).toEqual([]);
    expect(await mailsTo(quiet.email, `Tender ${reference} closes within`)).toEqual([]);
  });

  test('2 h before closing comes the 2-hour reminder, once, to the same vendors (never a late 48-hour one)', async () => {
    const at = new Date(closesAt.getTime() - 90 * 60_000);
    expect(await sendDueNotifications(t.em(), deps, at)).toBe(2);
    expect(await sendDueNotifications(t.em(), deps, at)).toBe(0);
    for (const v of [none, draft]) {
      expect(subjects(await mailsTo(v.email, `Tender ${reference} closes within 2 `))).toEqual([`Tender ${reference} closes within 2 hours: your bid is not in`]);
    }
    expect(await mailsTo(submitted.email, `Tender ${reference} closes within`)).toEqual([]);
    expect(await mailsTo(quiet.email, `Tender ${reference} closes within`)).toEqual([]);
  });

  test('a tender published less than 48 hours before closing gets no 48-hour reminder (the invitation has just gone out)', async () => {
    const late = await vendor();
    const body = tenderBody(2, 30 * 60);
    const id = await openTender(buyer, [late.org], body);
    const closes = (await t.em().findOneOrFail(Tender, { id })).closesAt;
    await sendDueNotifications(t.em(), deps, new Date(closes.getTime() - 29 * HOUR));
    expect(await mailsTo(late.email, `Tender ${body.reference} closes within`)).toEqual([]);
  });
});

describe('legal notices', () => {
  test('an answered clarification and an amendment reach every invited vendor once, also one who turned reminders off; a retried answer adds nothing', async () => {
    const [asker, quiet] = [await vendor(), await vendor()];
    expect((await quiet.b.send('put', '/api/me/notification-settings', { closingReminders: false, decisionUpdates: false })).status).toBe(200);
    const body = tenderBody(2, TEN_DAYS_MINUTES);
    const id = await openTender(buyer, [asker.org, quiet.org], body);
    const q = await asker.b.post(`/api/tenders/${id}/questions`, { text: 'Are deliveries on Saturdays expected?' });
    expect(q.status).toBe(201);
    expect((await buyer.post(`/api/questions/${q.body.id}/answer`, { text: 'No, weekdays only.' })).status).toBe(200);
    expect((await buyer.post(`/api/questions/${q.body.id}/answer`, { text: 'No, weekdays only.' })).status).toBe(409);
    const amended = await buyer.post(`/api/tenders/${id}/amendments`, { reason: 'More time for site visits.', closesAt: new Date(Date.now() + 12 * 24 * HOUR).toISOString() });
    expect(amended.status).toBe(201);
    for (const v of [asker, quiet]) {
      expect(subjects(await mailsTo(v.email, `Clarification 1 on tender ${body.reference}`))).toEqual([`Clarification 1 on tender ${body.reference}`]);
      expect(subjects(await mailsTo(v.email, `Amendment 1 to tender ${body.reference}`))).toEqual([`Amendment 1 to tender ${body.reference}`]);
    }
    const rows = await t.em().find(NotificationSent, { tender: id }, { orderBy: { kind: 'asc' } });
    expect(rows.map((r) => r.kind).sort()).toEqual(['amendment-issued', 'amendment-issued', 'clarification-answered', 'clarification-answered']);
  });
});

describe('recommendation and standstill', () => {
  test('compliance is told a recommendation waits, the buyer that it was returned and then approved, each once; a retried decision and a second job pass add nothing; the standstill end is told once', async () => {
    const [a, b] = [await vendor(), await vendor()];
    const body = tenderBody(2, 60);
    const id = await openTender(buyer, [a.org, b.org], body);
    for (const [v, price] of [[a, 50], [b, 52]] as const) {
      expect((await v.b.send('put', `/api/tenders/${id}/bid`, { fixedFee: 1000, prices: { R01: price, R02: price }, capacity: null, submit: true, version: null })).status).toBe(200);
    }
    await passClosingTime(t, id);
    const scenarios = await buyer.get(`/api/tenders/${id}/scenarios`);
    const split = scenarios.body.find((s: { builtIn: string | null }) => s.builtIn === 'split');
    const queued = await buyer.post(`/api/scenarios/${split.id}/runs`);
    const run = await waitForRun(buyer, queued.body.id);

    expect((await buyer.post(`/api/tenders/${id}/recommendation`, { runId: run.id, justification: 'Least cost at the forecast.' })).status).toBe(201);
    const waiting = `Recommendation awaiting your decision: ${body.reference}`;
    for (const email of complianceEmails) expect(subjects(await mailsTo(email, waiting))).toEqual([waiting]);
    expect((await mailsTo(complianceEmails[0], waiting))[0].text).toContain('Least cost at the forecast.');

    expect((await compliance.post(`/api/tenders/${id}/recommendation/return`, { comment: 'Explain the capacity of vendor B.' })).status).toBe(200);
    expect((await compliance.post(`/api/tenders/${id}/recommendation/return`, { comment: 'Explain the capacity of vendor B.' })).status).toBe(409);
    const returned = await mailsTo(buyerEmail, `Recommendation returned: ${body.reference}`);
    expect(subjects(returned)).toEqual([`Recommendation returned: ${body.reference}`]);
    expect(returned[0].text).toContain('Explain the capacity of vendor B.');
    // A retry of the same decision's notification (as after a crash between two steps) sends nothing more.
    const returnedId = (await buyer.get(`/api/tenders/${id}/recommendation`)).body.recommendation.id as string;
    await t.em().transactional((tx) => notifyRecommendationDecided(tx, deps, { tenderId: id, recommendationId: returnedId, decision: 'returned', decidedBy: 'x', comment: 'again' }));
    expect(await mailsTo(buyerEmail, `Recommendation returned: ${body.reference}`)).toHaveLength(1);

    expect((await buyer.post(`/api/tenders/${id}/recommendation`, { runId: run.id, justification: 'Capacity confirmed by both vendors.' })).status).toBe(201);
    for (const email of complianceEmails) expect(subjects(await mailsTo(email, waiting))).toEqual([waiting, waiting]);
    expect((await compliance.post(`/api/tenders/${id}/recommendation/approve`, { comment: 'Checked.' })).status).toBe(200);
    const approved = await mailsTo(buyerEmail, `Recommendation approved: ${body.reference}`);
    expect(subjects(approved)).toEqual([`Recommendation approved: ${body.reference}`]);
    expect(approved[0].text).toContain('The standstill period ends on');

    // Letters sent (the tender notified) and the stored standstill end passed: the buyer is told once.
    const standstill = `Standstill ended on tender ${body.reference}`;
    expect(await sendDueNotifications(t.em(), deps)).toBe(0);
    await t.em().nativeUpdate(Tender, { id }, { status: 'notified', standstillEndsAt: new Date(Date.now() - HOUR) });
    await sendDueNotifications(t.em(), deps);
    await sendDueNotifications(t.em(), deps);
    expect(subjects(await mailsTo(buyerEmail, standstill))).toEqual([`${standstill}: record the contracts`]);
  });

  test('a buyer who turned updates on recommendations off is not e-mailed the standstill end', async () => {
    const quietBuyerUser = await makeUser(t, 'buyer');
    const quietBuyer = await signedIn(t, quietBuyerUser);
    expect((await quietBuyer.send('put', '/api/me/notification-settings', { closingReminders: true, decisionUpdates: false })).status).toBe(200);
    const v = await vendor();
    const body = tenderBody(2, TEN_DAYS_MINUTES);
    const id = await openTender(quietBuyer, [v.org], body);
    await t.em().nativeUpdate(Tender, { id }, { status: 'notified', standstillEndsAt: new Date(Date.now() - HOUR) });
    await sendDueNotifications(t.em(), deps);
    expect(await mailsTo(quietBuyerUser.email, `Standstill ended on tender ${body.reference}`)).toEqual([]);
  });
});

describe('notification settings', () => {
  test('every reminder is on until a person turns it off; the choice is stored and recorded on the administration trail', async () => {
    const person = await makeUser(t, 'vendor');
    const b = await signedIn(t, person);
    expect((await b.get('/api/me/notification-settings')).body).toEqual({ closingReminders: true, decisionUpdates: true });
    const saved = await b.send('put', '/api/me/notification-settings', { closingReminders: false, decisionUpdates: true });
    expect(saved.body).toEqual({ closingReminders: false, decisionUpdates: true });
    expect((await b.get('/api/me/notification-settings')).body).toEqual({ closingReminders: false, decisionUpdates: true });
    const entries = await t.em().find(AuditEntry, { tender: null, action: 'notification-settings.changed', subject: `person ${person.id}` });
    expect(entries.map((e) => [e.detail['closingReminders'], e.detail['decisionUpdates']])).toEqual([[false, true]]);
  });

  test('a setting that is not on or off is refused with 400 naming the field, and nothing is stored', async () => {
    const person = await makeUser(t, 'buyer');
    const b = await signedIn(t, person);
    const res = await b.send('put', '/api/me/notification-settings', { closingReminders: 'no', decisionUpdates: true });
    expect(res.status).toBe(400);
    expect(res.headers['content-type']).toContain('application/problem+json');
    expect(res.body.errors.map((e: { field: string }) => e.field)).toEqual(['closingReminders']);
    expect((await b.get('/api/me/notification-settings')).body).toEqual({ closingReminders: true, decisionUpdates: true });
  });
});
