import type { EntityManager } from '@mikro-orm/postgresql';

/**
 * The job row of an explanation (`run_explanation`, one per run), of a vendor's debrief
 * (`run_debrief`, one per run and vendor) or of a region worked out exactly (`run_region_check`,
 * one per run and region): all are queued, claimed, advanced and finished alike.
 */
export type ExplainJobKey =
  | { runId: string; vendorId?: undefined; region?: undefined }
  | { runId: string; vendorId: string; region?: undefined }
  | { runId: string; vendorId?: undefined; region: string };

function target(key: ExplainJobKey): { table: 'run_explanation' | 'run_debrief' | 'run_region_check'; columns: string[]; where: string; params: string[] } {
  const [table, columns, params]: ['run_explanation' | 'run_debrief' | 'run_region_check', string[], string[]] =
    key.vendorId !== undefined ? ['run_debrief', ['run_id', 'vendor_id'], [key.runId, key.vendorId]]
    : key.region !== undefined ? ['run_region_check', ['run_id', 'region'], [key.runId, key.region]]
    : ['run_explanation', ['run_id'], [key.runId]];
  return { table, columns, where: columns.map((c) => `${c} = ?`).join(' and '), params };
}

/**
 * Queues the job (a new row with `id`), or queues a failed one again; a queued, running or done
 * one is left as it is. Returns whether it was queued now.
 */
export async function queueExplainJob(tx: EntityManager, key: ExplainJobKey, id: string, requestedById: string): Promise<boolean> {
  const { table, columns, params } = target(key);
  const rows = await tx.execute<{ id: string }[]>(
    `insert into ${table} (id, ${columns.join(', ')}, requested_by_id, status) values (?, ${columns.map(() => '?').join(', ')}, ?, 'queued')
       on conflict (${columns.join(', ')}) do update set status = 'queued', error = null, progress_done = 0, requested_by_id = excluded.requested_by_id, updated_at = now()
       where ${table}.status = 'failed'
     returning id`,
    [id, ...params, requestedById],
  );
  return rows.length > 0;
}

/** Whether the vendor has a bid with prices in the run's stored problem and is not excluded by its rules. */
export async function runHasCompliantBid(em: EntityManager, runId: string, vendorId: string): Promise<boolean> {
  const [row] = await em.execute<{ found: boolean }[]>(
    `select exists (select 1 from jsonb_array_elements(problem->'vendors') v
        where v->>'id' = ? and v->'prices' <> '{}'::jsonb
          and not coalesce(problem->'rules'->'exclude', '[]'::jsonb) @> jsonb_build_array(v->>'id')) as found
       from run where id = ?`, [vendorId, runId],
  );
  return row?.found === true;
}

/**
 * Claims a queued job, or one a dead worker left running (its attempts counted); false when it is
 * done, failed or not there.
 */
export async function claimExplainJob(em: EntityManager, key: ExplainJobKey): Promise<boolean> {
  const { table, where, params } = target(key);
  const rows = await em.execute<{ id: string }[]>(
    `update ${table} set status = 'running', started_at = now(), attempts = attempts + 1, updated_at = now()
       where ${where} and status in ('queued', 'running') returning id`, params,
  );
  return rows.length > 0;
}

/** How far a running job is. */
export async function storeExplainProgress(em: EntityManager, key: ExplainJobKey, done: number, total: number): Promise<void> {
  const { table, where, params } = target(key);
  await em.execute(`update ${table} set progress_done = ?, progress_total = ?, updated_at = now() where ${where} and status = 'running'`, [done, total, ...params]);
}

/** Stores the result of a running job; false when it is no longer running (nothing stored). */
export async function finishExplainJob(tx: EntityManager, key: ExplainJobKey, result: unknown): Promise<boolean> {
  const { table, where, params } = target(key);
  const rows = await tx.execute<{ id: string }[]>(
    `update ${table} set status = 'done', result = ?::jsonb, error = null, computed_at = now(), progress_done = progress_total, updated_at = now()
       where ${where} and status = 'running' returning id`, [JSON.stringify(result), ...params],
  );
  return rows.length > 0;
}

/** Marks a running job failed, with the words its reader sees. */
export async function failExplainJob(em: EntityManager, key: ExplainJobKey, error: string): Promise<void> {
  const { table, where, params } = target(key);
  await em.execute(`update ${table} set status = 'failed', error = ?, updated_at = now() where ${where} and status = 'running'`, [error, ...params]);
}
