import { animationsDone, baseUrl, openBrowser, screenshot, seriousViolations, signIn } from './support/browser';

/**
 * The tender list a page at a time: twelve drafts of its own (made through the API, as the editor
 * would save them; found by their common reference prefix, so other files' tenders do not count).
 */
let b: Awaited<ReturnType<typeof openBrowser>>;
beforeAll(async () => {
  b = await openBrowser();
});
afterAll(() => b.close());

const PREFIX = 'NHP-2029-P';

test('the buyer pages through the list, chooses a page size and an order, and a reload keeps all three', async () => {
  const { page } = b;
  await signIn(page, 'buyer@demo.tendara.test');
  const xsrf = (await page.context().cookies()).find((c) => c.name === 'XSRF-TOKEN')?.value ?? '';
  for (let k = 1; k <= 12; k++) {
    const created = await page.request.post(`${baseUrl()}/api/tenders`, {
      headers: { 'X-XSRF-TOKEN': xsrf },
      data: {
        reference: `${PREFIX}${String(k).padStart(2, '0')}`, title: `Depot sweeping, lot ${k}`, commodity: 'Sweeping visits', unit: 'visit', currency: 'EUR',
        // Lot 1 closes last, so newest closing first lists lots 1, 2, 3…
        closesAt: new Date(Date.now() + (40 - k) * 86_400_000).toISOString(), standstillDays: 10,
        regions: [{ code: 'N01', name: 'North district', forecast: 10 * k }],
      },
    });
    expect(created.status()).toBe(201);
  }
  await page.goto(`${baseUrl()}/tenders?q=${PREFIX}`);
  await page.getByText('12 tenders', { exact: true }).waitFor();
  const paginator = page.getByRole('group', { name: 'Pages of tenders' });
  // Ten a page, chosen with the keyboard (the paginator's touch target lies over the select for a pointer).
  await paginator.getByRole('combobox').focus();
  await page.keyboard.press('Enter');
  await page.getByRole('option', { name: '10', exact: true }).click();
  await page.waitForURL(/size=10/);
  await paginator.getByText('1 – 10 of 12').waitFor();
  await paginator.getByRole('button', { name: 'Next page' }).click();
  await paginator.getByText('11 – 12 of 12').waitFor();
  await page.getByRole('row', { name: new RegExp(`${PREFIX}11`) }).waitFor();
  await expect(page.getByRole('row', { name: new RegExp(`${PREFIX}01`) }).count()).resolves.toBe(0);
  expect(new URL(page.url()).searchParams.get('page')).toBe('2');

  // A reload shows the same page.
  await page.reload();
  await paginator.getByText('11 – 12 of 12').waitFor();
  await expect(page.getByRole('row', { name: new RegExp(`${PREFIX}12`) }).count()).resolves.toBe(1);
  await animationsDone(page);
  await screenshot(page, 'tender-list-paged-1280');
  expect(await seriousViolations(page)).toEqual([]);

  // Ordering by reference, Z to A, starts again at the first page.
  await page.getByRole('button', { name: 'Reference' }).click();
  await page.waitForURL(/sort=reference/);
  await page.getByRole('button', { name: 'Reference' }).click();
  await page.waitForURL(/dir=desc/);
  await paginator.getByText('1 – 10 of 12').waitFor();
  // The last page stays shown until the new one arrives: wait for the new first row.
  const firstRow = () => page.getByRole('table', { name: 'Tenders' }).getByRole('row').nth(1);
  await firstRow().getByRole('link', { name: `${PREFIX}12`, exact: true }).waitFor();
  await page.reload();
  await firstRow().getByRole('link', { name: `${PREFIX}12`, exact: true }).waitFor();
  await expect(firstRow().getByRole('link').textContent()).resolves.toBe(`${PREFIX}12`);
  await animationsDone(page);
  await screenshot(page, 'tender-list-sorted-1280');
  expect(await seriousViolations(page)).toEqual([]);
});
