/// <reference lib="dom" />
// The functions handed to page.evaluate run in Chromium, hence the DOM types.
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { gzipSync } from 'node:zlib';
import { chromium, type Page } from 'playwright-core';
import { FINISHED_RUN_STATUSES, type RunView, type ScenarioView } from '@shared/evaluation';
import { benchEnv, startServer, stopAll } from './support/processes';
import { call, signIn } from './support/http';
import { percentile, table } from './support/measure';
import { BENCH_PASSWORD, seedBenchData } from './support/seed';

/**
 * `npm run bench:client`: the client in Debian's Chromium, against the built app on a throwaway
 * cluster (support/with-cluster.sh; the npm script builds the client first).
 *
 *  1. The production build: initial JavaScript (the scripts index.html loads at once) and the
 *     largest lazy chunk, raw and gzip.
 *  2. The two widest screens at 30 vendors × 200 regions — the bid tabulation and a run's
 *     allocation matrix — timed with the Performance API inside the page: from navigation start
 *     (or a `performance.mark` just before an in-page click) to the first frame after the table
 *     holds the expected cells, with the longest main-thread task seen meanwhile (Long Tasks API).
 *     Side by side in one run: the default page of 25 regions and all 200 regions at once.
 *
 * Prints tables; asserts nothing. `--screenshots DIR` also saves both screens at 25 regions a page.
 */
const REPEAT = 5;
const CHROMIUM = process.env['CHROMIUM_PATH'] ?? '/usr/bin/chromium';
const BROWSER = path.resolve(__dirname, '..', '..', 'client', 'browser');

interface Timing {
  ms: number;
  longestTask: number;
}

const kB = (n: number) => (n / 1024).toFixed(1);

function buildFigures(): string[][] {
  const index = fs.readFileSync(path.join(BROWSER, 'index.html'), 'utf8');
  const initial = [...index.matchAll(/<(?:script|link rel="modulepreload")[^>]*(?:src|href)="([^"]+\.js)"/g)].map((m) => m[1]);
  const size = (file: string) => {
    const content = fs.readFileSync(path.join(BROWSER, file));
    return { raw: content.length, gzip: gzipSync(content).length };
  };
  const sum = (files: string[]) => files.map(size).reduce((a, b) => ({ raw: a.raw + b.raw, gzip: a.gzip + b.gzip }), { raw: 0, gzip: 0 });
  const init = sum(initial);
  const lazy = fs.readdirSync(BROWSER).filter((f) => f.endsWith('.js') && !initial.includes(f));
  const largest = lazy.map((f) => ({ f, ...size(f) })).sort((a, b) => b.raw - a.raw)[0];
  const all = sum(lazy);
  return [
    ['initial JavaScript', `${initial.length} files`, kB(init.raw), kB(init.gzip)],
    ['largest lazy chunk', largest?.f ?? '-', kB(largest?.raw ?? 0), kB(largest?.gzip ?? 0)],
    ['all lazy chunks', `${lazy.length} files`, kB(all.raw), kB(all.gzip)],
  ];
}

/** Starts watching long tasks and marks the start, in the page. */
const START = () => {
  const w = window as unknown as { __long: number[]; __observer?: PerformanceObserver };
  w.__observer?.disconnect();
  w.__long = [];
  w.__observer = new PerformanceObserver((list) => w.__long.push(...list.getEntries().map((e) => e.duration)));
  w.__observer.observe({ type: 'longtask' });
  performance.clearMarks('bench-start');
  performance.mark('bench-start');
};

/** After the next frame: the time since the mark (or since navigation start) and the longest task. */
async function finish(page: Page, sinceNavigation: boolean): Promise<Timing> {
  return page.evaluate((fromStart) => new Promise<Timing>((resolve) => {
    requestAnimationFrame(() => setTimeout(() => {
      const w = window as unknown as { __long?: number[] };
      const longestTask = Math.max(0, ...(w.__long ?? []));
      if (fromStart) {
        resolve({ ms: performance.now(), longestTask });
        return;
      }
      const m = performance.measure('bench', 'bench-start');
      resolve({ ms: m.duration, longestTask });
    }, 0));
  }), sinceNavigation);
}

/** What changes when a table is redrawn: its first region heading and its first row's vendor. */
const SIGNATURE = (host: string) => {
  const el = document.querySelector(host);
  const head = el?.querySelector('thead th.region-head, thead th[scope=col]:nth-child(2)')?.textContent ?? '';
  const row = el?.querySelector('tbody tr th')?.textContent ?? '';
  return `${head.trim()}|${row.trim()}`;
};

/** True once the table in `host` holds `cells` data cells and (after a click) has been redrawn. */
const READY = ({ host, cells, signature }: { host: string; cells: number; signature: string }) => {
  const el = document.querySelector(host);
  if (!el || el.querySelectorAll('tbody td').length !== cells) return false;
  const before = (window as unknown as { __before?: string }).__before;
  // eslint-disable-next-line @typescript-eslint/no-implied-eval, @typescript-eslint/no-unsafe-call -- runs in the page, which gets the function as source text
  return before === undefined || new Function(`return (${signature})`)()(host) !== before;
};

async function timedNavigation(page: Page, url: string, host: string, cells: number): Promise<Timing> {
  await page.goto(url, { waitUntil: 'commit' });
  await page.waitForFunction(READY, { host, cells, signature: SIGNATURE.toString() }, { polling: 'raf', timeout: 60_000 });
  return finish(page, true);
}

/**
 * Clicks `selector` in the page right after the mark, so no round trip to this process is timed,
 * and waits for the redrawn table (`changes`: its first region or first row must differ).
 */
async function timedClick(page: Page, selector: string, host: string, cells: number, changes = true): Promise<Timing> {
  await page.evaluate(({ start, signature, sel, h, changes: c }) => {
    const w = window as unknown as { __before?: string };
    // eslint-disable-next-line @typescript-eslint/no-implied-eval, @typescript-eslint/no-unsafe-call -- runs in the page, which gets the function as source text
    w.__before = c ? (new Function(`return (${signature})`)()(h) as string) : undefined;
    // eslint-disable-next-line @typescript-eslint/no-implied-eval, @typescript-eslint/no-unsafe-call -- as above
    new Function(`return (${start})`)()();
    (document.querySelector(sel) as HTMLElement).click();
  }, { start: START.toString(), signature: SIGNATURE.toString(), sel: selector, h: host, changes });
  await page.waitForFunction(READY, { host, cells, signature: SIGNATURE.toString() }, { polling: 'raf', timeout: 60_000 });
  return finish(page, false);
}

/** Opens the page-size list of the region pager in `host` and picks `size`, timed from the pick. */
async function timedPageSize(page: Page, host: string, size: number, cells: number): Promise<Timing> {
  // As a keyboard user would: the paginator's touch target lies over the select.
  await page.locator(`${host} app-region-pager mat-select`).press('Enter');
  const option = page.getByRole('option', { name: String(size), exact: true });
  await option.waitFor();
  const id = await option.getAttribute('id');
  return timedClick(page, `#${id}`, host, cells, false);
}

interface Row {
  screen: string;
  action: string;
  shown: string;
  samples: Timing[];
}

async function main(): Promise<void> {
  if (!fs.existsSync(path.join(BROWSER, 'index.html'))) throw new Error(`no client build in ${BROWSER}: run npm run build:client`);
  const build = buildFigures();
  const { databaseUrl } = benchEnv();
  const seeded = await seedBenchData(databaseUrl, { vendors: 30 });
  const { url } = await startServer({ CLIENT_DIST: BROWSER });
  const buyer = await signIn(url, seeded.buyerEmail, BENCH_PASSWORD);
  const tenderId = seeded.big.id;

  // One split-award run of the 30 × 200 tender, for the allocation matrix.
  const scenarios = (await call<ScenarioView[]>(url, buyer, 'GET', `/api/tenders/${tenderId}/scenarios`)).body;
  const split = scenarios.find((s) => s.builtIn === 'split');
  if (!split) throw new Error('the closed tender has no built-in split scenario');
  const queued = await call<{ id: string }>(url, buyer, 'POST', `/api/scenarios/${split.id}/runs`);
  let run: RunView | null = null;
  for (const stopAt = Date.now() + 180_000; Date.now() < stopAt;) {
    run = (await call<RunView>(url, buyer, 'GET', `/api/runs/${queued.body.id}`)).body;
    if (FINISHED_RUN_STATUSES.includes(run.status)) break;
    await new Promise((r) => setTimeout(r, 500));
  }
  if (!run?.result?.awards.length) throw new Error(`the run did not finish with an award (${run?.status})`);
  const awarded = run.result.awards.length;
  process.stdout.write(`[bench] run ${run.status}: ${awarded} vendors awarded\n`);

  const profile = fs.mkdtempSync(path.join(os.tmpdir(), 'tendara-bench-chromium-'));
  const context = await chromium.launchPersistentContext(profile, {
    executablePath: CHROMIUM, headless: true, viewport: { width: 1440, height: 900 }, locale: 'en-GB',
    args: ['--headless', '--no-sandbox', '--disable-gpu', '--no-first-run', '--disable-background-networking', '--disable-component-update', '--disable-dev-shm-usage'],
  });
  try {
    const page = context.pages()[0] ?? (await context.newPage());
    // Long tasks from the very start of each page: the observer is installed before the app's scripts run.
    await page.addInitScript(START);
    await page.goto(`${url}/sign-in`);
    await page.getByLabel('E-mail').fill(seeded.buyerEmail);
    await page.getByLabel('Password', { exact: true }).fill(BENCH_PASSWORD);
    await page.getByRole('button', { name: 'Sign in' }).click();
    await page.waitForURL((u) => !u.pathname.startsWith('/sign-in'));

    // Data cells: the tabulation has fee, SME and cap besides the regions; the vendor is a row heading.
    const tabCells = (regions: number) => 30 * (3 + regions);
    const matrixCells = (regions: number) => awarded * regions;
    const tab = 'app-bid-tabulation';
    const matrix = 'app-allocation-matrix';
    const rows: Row[] = [
      { screen: 'bid tabulation', action: 'open the tender page', shown: '25 of 200', samples: [] },
      { screen: 'bid tabulation', action: 'next page of regions', shown: '25 of 200', samples: [] },
      { screen: 'bid tabulation', action: 'sort by vendor', shown: '25 of 200', samples: [] },
      { screen: 'bid tabulation', action: 'show all regions', shown: '200 of 200', samples: [] },
      { screen: 'bid tabulation', action: 'sort by vendor', shown: '200 of 200', samples: [] },
      { screen: 'allocation matrix', action: 'open the run', shown: '25 of 200', samples: [] },
      { screen: 'allocation matrix', action: 'next page of regions', shown: '25 of 200', samples: [] },
      { screen: 'allocation matrix', action: 'show all regions', shown: '200 of 200', samples: [] },
    ];
    const sortVendor = `${tab} th.mat-column-vendor .mat-sort-header-container`;
    for (let k = 0; k < REPEAT; k++) {
      const t = rows.values();
      t.next().value!.samples.push(await timedNavigation(page, `${url}/tenders/${tenderId}`, tab, tabCells(25)));
      t.next().value!.samples.push(await timedClick(page, `${tab} button[aria-label="Next regions"]`, tab, tabCells(25)));
      t.next().value!.samples.push(await timedClick(page, sortVendor, tab, tabCells(25)));
      t.next().value!.samples.push(await timedPageSize(page, tab, 200, tabCells(200)));
      t.next().value!.samples.push(await timedClick(page, sortVendor, tab, tabCells(200)));
      t.next().value!.samples.push(await timedNavigation(page, `${url}/tenders/${tenderId}/evaluation/runs/${run.id}`, matrix, matrixCells(25)));
      t.next().value!.samples.push(await timedClick(page, `${matrix} button[aria-label="Next regions"]`, matrix, matrixCells(25)));
      t.next().value!.samples.push(await timedPageSize(page, matrix, 200, matrixCells(200)));
      process.stdout.write(`[bench] round ${k + 1} of ${REPEAT} done\n`);
    }
    const shotsAt = process.argv.indexOf('--screenshots');
    if (shotsAt > 0) {
      const dir = path.resolve(process.argv[shotsAt + 1] ?? 'bench-screenshots');
      fs.mkdirSync(dir, { recursive: true });
      await timedNavigation(page, `${url}/tenders/${tenderId}`, tab, tabCells(25));
      await page.locator(tab).screenshot({ path: path.join(dir, 'bid-tabulation-30x200.png') });
      await timedNavigation(page, `${url}/tenders/${tenderId}/evaluation/runs/${run.id}`, matrix, matrixCells(25));
      await page.locator(matrix).screenshot({ path: path.join(dir, 'allocation-matrix-30x200.png') });
      process.stdout.write(`[bench] screenshots in ${dir}\n`);
    }

    process.stdout.write('\nProduction build (dist/client/browser)\n');
    process.stdout.write(table(['part', 'files', 'raw kB', 'gzip kB'], build));
    process.stdout.write(`\nWide tables in Chromium (${path.basename(CHROMIUM)}, headless), 30 vendors × 200 regions (${awarded} vendors awarded in the run); ${REPEAT} rounds\n`);
    process.stdout.write(table(
      ['screen', 'action', 'regions shown', 'median ms', 'max ms', 'longest task ms'],
      rows.map((r) => {
        const ms = r.samples.map((s) => s.ms);
        return [r.screen, r.action, r.shown, percentile(ms, 50).toFixed(0), Math.max(...ms).toFixed(0), Math.max(...r.samples.map((s) => s.longestTask)).toFixed(0)];
      }),
    ));
    process.stdout.write('Opening a page counts from navigation start (the app loads too); the other rows from the click.\n');
  } finally {
    await context.close();
    fs.rmSync(profile, { recursive: true, force: true });
  }
}

main()
  .catch((err: unknown) => {
    process.stderr.write(`[bench] failed: ${err instanceof Error ? err.stack : String(err)}\n`);
    process.exitCode = 1;
  })
  .finally(() => stopAll());
