import { threadId } from 'node:worker_threads';
import type { RegionInput } from '@shared/bids';
import { parseBidWorkbook, type ParseBidOptions } from './bid-workbook-parse';
import type { BidWorkbookResult } from './bid-layout';
import { cleanWorkbookCopy } from './clean-copy';
import { parseRegionFile, type RegionFileHint, type RegionImportResult } from './region-import';

/**
 * The worker thread that checks and reads uploaded workbooks (see workbook-pool.ts). Unzipping and
 * parsing a workbook is synchronous work of up to a second or more; here it never holds up a
 * request. Everything it returns is plain data.
 */

export type WorkbookTask =
  | { kind: 'bid'; data: Uint8Array; regions: RegionInput[]; options: ParseBidOptions; gate?: SharedArrayBuffer }
  | { kind: 'regions'; data: Uint8Array; hint: RegionFileHint; gate?: SharedArrayBuffer }
  | { kind: 'clean'; data: Uint8Array; gate?: SharedArrayBuffer };

export type WorkbookTaskResult =
  | { kind: 'bid'; threadId: number; result: BidWorkbookResult }
  | { kind: 'regions'; threadId: number; result: RegionImportResult }
  | { kind: 'clean'; threadId: number; result: { ok: true; content: Uint8Array } | { ok: false; message: string } };

/**
 * A test's hold on the task: the worker sets the gate's first slot to 1 and waits until the test
 * sets it to 2. Waiting blocks this thread only; were the task ever run on the main thread, the
 * server would stop answering and the test that uses the gate would fail.
 */
function passGate(gate: SharedArrayBuffer | undefined): void {
  if (!gate) return;
  const slots = new Int32Array(gate);
  Atomics.store(slots, 0, 1);
  Atomics.notify(slots, 0);
  while (Atomics.load(slots, 0) === 1) Atomics.wait(slots, 0, 1);
}

export default async function runWorkbookTask(task: WorkbookTask): Promise<WorkbookTaskResult> {
  passGate(task.gate);
  const buffer = Buffer.from(task.data.buffer, task.data.byteOffset, task.data.byteLength);
  switch (task.kind) {
    case 'bid':
      return { kind: 'bid', threadId, result: await parseBidWorkbook(buffer, task.regions, task.options) };
    case 'regions':
      return { kind: 'regions', threadId, result: await parseRegionFile(buffer, task.hint) };
    case 'clean':
      return { kind: 'clean', threadId, result: await cleanWorkbookCopy(buffer) };
  }
}
