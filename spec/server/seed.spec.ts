import { User, VendorOrganisation } from '../../server/entities';
import { seed } from '../../server/ops/seed';
import { DEMO_PASSWORD } from '../../seeds/demo-people';
import { Browser, startTestApp, type TestApp } from '../support/app';

let t: TestApp;
beforeAll(async () => {
  t = await startTestApp({ workers: false });
});
afterAll(() => t.close());

test('the demo data loads once: a second load adds nothing', async () => {
  expect(await seed(t.em(), 'demo')).toBe(true);
  const users = await t.em().count(User, {});
  expect(users).toBe(10);
  expect(await t.em().count(VendorOrganisation, {})).toBe(7);
  expect(await seed(t.em(), 'demo')).toBe(false);
  expect(await t.em().count(User, {})).toBe(users);
});

test.each(['admin', 'buyer', 'compliance', 'vendor1', 'vendor7'])('the demo sign-in %s works with the demo password', async (who) => {
  const res = await (await new Browser(t.app).init()).signIn(`${who}@demo.tendara.test`, DEMO_PASSWORD);
  expect(res.status).toBe(200);
});
