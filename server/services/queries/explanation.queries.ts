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

function target(key: ExplainJobKey): { table: 'run_explanation' | 'run_debrief' | 'run_region_check'; where: string; params: string[] } {
  if (key.vendorId !== undefined) return { table: 'run_debrief', where: 'run_id = ? and vendor_id = ?', params: [key.runId, key.vendorId] };
  if (key.region !== undefined) return { table: 'run_region_check', where: 'run_id = ? and region = ?', params: [key.runId, key.region] };
  return { table: 'run_explanation', where: 'run_id = ?', params: [key.runId] };
}

/**
 * Queues the job (a new row with `id`), or queues a failed one again; a queued, running or done
 * one is left as it is. Returns whether it was queued now.
 */
export async function queueExplainJob(tx: EntityManager, key: ExplainJobKey, id: string, requestedById: string): Promise<boolean> {
  const rows = key.vendorId !== undefined
    ? await tx.execute<{ id: string }[]>(
      `insert into run_debrief (id, run_id, vendor_id, requested_by_id, status) values (?, ?, ?, ?, 'queued')
         on conflict (run_id, vendor_id) do update set status = 'queued', error = null, progress_done = 0, requested_by_id = excluded.requested_by_id, updated_at = now()
         where run_debrief.status = 'failed'
       returning id`,
      [id, key.runId, key.vendorId, requestedById],
    )
    : key.region !== undefined
    ? await tx.execute<{ id: string }[]>(
      `insert into run_region_check (id, run_id, region, requested_by_id, status) values (?, ?, ?, ?, 'queued')
         on conflict (run_id, region) do update set status = 'queued', error = null, progress_done = 0, requested_by_id = excluded.requested_by_id, updated_at = now()
         where run_region_check.status = 'failed'
       returning id`,
      [id, key.runId, key.region, requestedById],
    )
    : await tx.execute<{ id: string }[]>(
      `insert into run_explanation (id, run_id, requested_by_id, status) values (?, ?, ?, 'queued')
         on conflict (run_id) do update set status = 'queued', error = null, progress_done = 0, requested_by_id = excluded.requested_by_id, updated_at = now()
         where run_explanation.status = 'failed'
       returning id`,
      [id, key.runId, requestedById],
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
