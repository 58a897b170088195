import { existsSync } from 'node:fs';
import { join } from 'node:path';
import Piscina from 'piscina';
import type { RegionInput } from '@shared/bids';
import type { BidWorkbookResult } from './bid-layout';
import type { ParseBidOptions } from './bid-workbook-parse';
import type { RegionFileHint, RegionImportResult } from './region-import';
import type { WorkbookTask, WorkbookTaskResult } from './workbook-worker';

/**
 * Uploaded workbooks are unzipped, checked and parsed in worker threads, so a large or hostile
 * file never holds up the thread that answers requests. The worker is `workbook-worker.ts`: run
 * from the build as compiled JavaScript, and from the source (tests) through tsx.
 */
let pool: Piscina | undefined;

function workerOptions(): { filename: string; execArgv: string[] } {
  const compiled = join(__dirname, 'workbook-worker.js');
  if (existsSync(compiled)) return { filename: compiled, execArgv: process.execArgv };
  return { filename: join(__dirname, 'workbook-worker.ts'), execArgv: [...process.execArgv, '--import', 'tsx'] };
}

function workbookPool(): Piscina {
  if (!pool) {
    pool = new Piscina({
      ...workerOptions(),
      // Uploads are rare next to requests: two at once at most, threads kept a while for the next.
      maxThreads: 2,
      minThreads: 0,
      idleTimeout: 30_000,
    });
  }
  return pool;
}

/** Test hook: when set, every task waits at this gate (see `passGate` in workbook-worker.ts). */
let gate: SharedArrayBuffer | undefined;
export function holdWorkbookTasksAt(next: SharedArrayBuffer | undefined): void {
  gate = next;
}

/** The thread that ran the last task (tests check it is not the main thread). */
export let lastWorkbookThreadId: number | undefined;

async function run<K extends WorkbookTask['kind']>(task: WorkbookTask & { kind: K }): Promise<Extract<WorkbookTaskResult, { kind: K }>> {
  const answer = (await workbookPool().run({ ...task, gate })) as Extract<WorkbookTaskResult, { kind: K }>;
  lastWorkbookThreadId = answer.threadId;
  return answer;
}

/** {@link parseBidWorkbook}, in a worker thread. */
export async function parseBidWorkbookOffThread(buffer: Buffer, regions: RegionInput[], options: ParseBidOptions = {}): Promise<BidWorkbookResult> {
  return (await run({ kind: 'bid', data: buffer, regions, options })).result;
}

/** {@link parseRegionFile}, in a worker thread. */
export async function parseRegionFileOffThread(buffer: Buffer, hint: RegionFileHint = {}): Promise<RegionImportResult> {
  return (await run({ kind: 'regions', data: buffer, hint })).result;
}

/** {@link cleanWorkbookCopy}, in a worker thread. */
export async function cleanWorkbookCopyOffThread(buffer: Buffer): Promise<{ ok: true; content: Buffer } | { ok: false; message: string }> {
  const { result } = await run({ kind: 'clean', data: buffer });
  return result.ok ? { ok: true, content: Buffer.from(result.content.buffer, result.content.byteOffset, result.content.byteLength) } : result;
}

/** Stops the worker threads (at shutdown, and in tests). */
export async function closeWorkbookPool(): Promise<void> {
  const current = pool;
  pool = undefined;
  await current?.close({ force: true });
}
