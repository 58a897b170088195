import { readFile } from 'node:fs/promises';
import { animationsDone, openBrowser, openTender, screenshot, seriousViolations, signIn } from './support/browser';

/**
 * The open-data file (OCDS) from the tender page, on the demo's closed salt tender NHP-2026-014
 * (another browser test may take it on to awarded and notified: only the stages it surely reached
 * are asserted).
 */
let b: Awaited<ReturnType<typeof openBrowser>>;
beforeAll(async () => {
  b = await openBrowser();
});
afterAll(() => b.close());

test('the buyer downloads the open data (OCDS) of the salt tender from its page: a release package from publication to opening', async () => {
  const { page } = b;
  await signIn(page, 'buyer@demo.tendara.test');
  await openTender(page, 'NHP-2026-014');
  const link = page.getByRole('link', { name: 'Open data (OCDS)' });
  await link.waitFor();
  await page.getByText('Check it against your procurement rules and the law that applies to you before publishing it.').waitFor();
  await animationsDone(page);
  await screenshot(page, 'open-data-buyer-1280');
  expect(await seriousViolations(page)).toEqual([]);
  const [download] = await Promise.all([page.waitForEvent('download'), link.click()]);
  expect(download.suggestedFilename()).toBe('NHP-2026-014-ocds-release-package.json');
  const pkg = JSON.parse(await readFile(await download.path(), 'utf8')) as { version: string; releases: { tag: string[]; tender: { id: string; numberOfTenderers?: number } }[] };
  expect(pkg.version).toBe('1.1');
  expect(pkg.releases.slice(0, 3).map((r) => r.tag[0])).toEqual(['tender', 'tenderAmendment', 'tenderUpdate']);
  expect(pkg.releases[2].tender).toEqual(expect.objectContaining({ id: 'NHP-2026-014', numberOfTenderers: 7 }));
});

test('compliance has the same link on the tender page, at phone width too', async () => {
  const phone = await openBrowser({ width: 390, height: 844 });
  try {
    const { page } = phone;
    await signIn(page, 'compliance@demo.tendara.test');
    await openTender(page, 'NHP-2026-014');
    const link = page.getByRole('link', { name: 'Open data (OCDS)' });
    await link.waitFor();
    await expect(link.getAttribute('href')).resolves.toMatch(/\/api\/tenders\/[0-9a-f-]{36}\/ocds\.json$/);
    await animationsDone(page);
    await screenshot(page, 'open-data-compliance-390');
    expect(await seriousViolations(page)).toEqual([]);
  } finally {
    await phone.close();
  }
});
