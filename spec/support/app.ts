import 'reflect-metadata';
import { MikroORM, type EntityManager } from '@mikro-orm/postgresql';
import type { Express } from 'express';
import { Pool } from 'pg';
import type PgBoss from 'pg-boss';
import request from 'supertest';
import type { Role } from '@shared/roles';
import { createApp } from '../../server/app';
import { SESSION_POOL_OPTIONS, type AppDeps } from '../../server/context';
import { loadConfig, type Config } from '../../server/config';
import { MailMessage, User, VendorOrganisation } from '../../server/entities';
import { createBoss, startMailWorker, startTenderCloseWorker } from '../../server/jobs/queue';
import { closeIfDue } from '../../server/services/tender-access';
import { startSolveWorker } from '../../server/jobs/solve-job';
import { startNoticeWorker } from '../../server/jobs/notice-job';
import { startMailCatcher, type MailCatcher } from '../../server/mail/catcher';
import { createMailer, type Mailer } from '../../server/mail/mailer';
import { ormConfig } from '../../server/mikro-orm.config';
import { hashPassword } from '../../server/auth/password';
import { closeWorkbookPool } from '../../server/workbooks/workbook-pool';
import { createTestDatabase, dropTestDatabase } from './db';

export const TEST_PASSWORD = 'correct-horse-battery';

/** The whole server on a fresh database: ORM, queue with its mail worker, a real mail catcher. */
export interface TestApp {
  app: Express;
  deps: AppDeps;
  orm: MikroORM;
  boss: PgBoss;
  catcher: MailCatcher;
  config: Config;
  em(): EntityManager;
  close(): Promise<void>;
}

/** `env` adds or overrides environment variables of the server's configuration (server/config.ts). */
export async function startTestApp(options: { workers?: boolean; solver?: boolean; env?: Record<string, string> } = {}): Promise<TestApp> {
  const databaseUrl = await createTestDatabase();
  const orm = await MikroORM.init(ormConfig(databaseUrl));
  const catcher = await startMailCatcher(orm, 0);
  const config = loadConfig({
    ...process.env,
    NODE_ENV: 'test',
    DATABASE_URL: databaseUrl,
    SMTP_URL: `smtp://127.0.0.1:${catcher.port}`,
    PUBLIC_URL: 'http://tendara.test',
    ...options.env,
  });
  const boss = createBoss(databaseUrl);
  await boss.start();
  let mailer: Mailer | undefined;
  if (options.workers !== false) {
    mailer = createMailer(config.smtpUrl, config.mailFrom);
    await startMailWorker(boss, mailer);
    await startTenderCloseWorker(boss, async (id) => {
      if (id) await closeIfDue(orm.em.fork(), id);
    });
    if (options.solver !== false) await startSolveWorker(boss, orm);
    await startNoticeWorker(boss, orm, mailer);
  }
  const sessionPool = new Pool({ connectionString: databaseUrl, max: 3, options: SESSION_POOL_OPTIONS });
  const deps: AppDeps = { config, orm, boss, sessionPool };
  const app = createApp(deps);
  return {
    app, deps, orm, boss, catcher, config,
    em: () => orm.em.fork(),
    async close() {
      await boss.stop({ graceful: false, wait: true });
      mailer?.close();
      await closeWorkbookPool();
      await catcher.close();
      await sessionPool.end();
      await orm.close(true);
      await dropTestDatabase(databaseUrl);
    },
  };
}

let counter = 0;
/** A person with a password, ready to sign in. Vendors get an organisation of their own. */
export async function makeUser(t: TestApp, role: Role, overrides: Partial<{ email: string; name: string; active: boolean }> = {}): Promise<User> {
  const em = t.em();
  counter += 1;
  const tag = `${role}${counter}-${Math.random().toString(36).slice(2, 7)}`;
  const org = role === 'vendor'
    ? em.create(VendorOrganisation, { name: `Test Firm ${tag}`, registrationNumber: `T-${tag}`, sme: false, contactEmail: `${tag}@firm.test` })
    : null;
  const user = em.create(User, {
    email: overrides.email ?? `${tag}@people.test`,
    name: overrides.name ?? `Person ${tag}`,
    role,
    vendorOrganisation: org,
    passwordHash: await hashPassword(TEST_PASSWORD),
    active: overrides.active ?? true,
  });
  await em.flush();
  return user;
}

/** A supertest agent that keeps cookies and sends the XSRF header like the Angular client. */
export class Browser {
  readonly agent: ReturnType<typeof request.agent>;
  private xsrf = '';
  constructor(app: Express) {
    this.agent = request.agent(app);
  }
  /** GET /api/session once to receive the XSRF cookie. */
  async init(): Promise<this> {
    this.takeXsrf(await this.agent.get('/api/session'));
    return this;
  }
  /** Keeps the XSRF token a response set (GET /api/session sets one, sign-in a fresh one), as Angular does. */
  private takeXsrf(res: { headers: Record<string, unknown> }): void {
    const cookies = ([] as string[]).concat((res.headers['set-cookie'] as string[] | undefined) ?? []);
    const xsrf = cookies.find((c) => c.startsWith('XSRF-TOKEN='));
    if (xsrf) this.xsrf = xsrf.split(';')[0].split('=')[1]!;
  }
  get token(): string {
    return this.xsrf;
  }
  get(path: string) {
    return this.agent.get(path);
  }
  send(method: 'post' | 'put' | 'patch' | 'delete', path: string, body?: object) {
    const req = this.agent[method](path).set('X-XSRF-TOKEN', this.xsrf);
    return body === undefined ? req : req.send(body);
  }
  post(path: string, body?: object) {
    return this.send('post', path, body);
  }
  async signIn(email: string, password = TEST_PASSWORD) {
    const res = await this.post('/api/session', { email, password });
    this.takeXsrf(res);
    return res;
  }
}

export async function signedIn(t: TestApp, user: User): Promise<Browser> {
  const b = await new Browser(t.app).init();
  const res = await b.signIn(user.email);
  if (res.status !== 200) throw new Error(`sign-in failed for ${user.email}: ${res.status} ${JSON.stringify(res.body)}`);
  return b;
}

/** The id of `email`'s latest session, as stored in `http_session` (the cookie's sid). */
export async function sessionIdOf(t: TestApp, email: string): Promise<string> {
  const rows = await t.em().getConnection().execute<{ sid: string }[]>(
    `select s.sid from http_session s join app_user u on u.id = s.person_id where u.email = ? order by s.expire desc limit 1`, [email],
  );
  return rows[0].sid;
}

/** Waits until the catcher has stored a message to `to` (the mail worker polls every second). */
export async function waitForMail(t: TestApp, to: string, subjectStart = '', timeoutMs = 15_000): Promise<MailMessage> {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const found = await t.em().findOne(
      MailMessage,
      { toAddresses: { $contains: [to] }, subject: { $like: `${subjectStart.replace(/[\\%_]/g, (c) => `\\${c}`)}%` } },
      { orderBy: { createdAt: 'desc' } },
    );
    if (found) return found;
    if (Date.now() > deadline) throw new Error(`no mail to ${to} within ${timeoutMs} ms`);
    await new Promise((r) => setTimeout(r, 200));
  }
}
