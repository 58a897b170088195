import type { RunView } from '@shared/evaluation';
import type { Browser } from './app';

/** Polls GET /api/runs/:id until the run has finished. */
export async function waitForRun(b: Browser, runId: string, timeoutMs = 120_000): Promise<RunView> {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const res = await b.get(`/api/runs/${runId}`);
    if (res.status !== 200) throw new Error(`GET run: ${res.status} ${JSON.stringify(res.body)}`);
    if (!['queued', 'solving'].includes(res.body.status)) return res.body as RunView;
    if (Date.now() > deadline) throw new Error(`run ${runId} still ${res.body.status} after ${timeoutMs} ms`);
    await new Promise((r) => setTimeout(r, 250));
  }
}
