import { Entity, OneToOne, ManyToOne, Property, type Opt } from '@mikro-orm/core';
import type { ExplanationResult } from '@shared/explanation';
import { BaseEntity } from './base.entity';
import { Run } from './run.entity';
import { User } from './user.entity';

/** Where an explanation job is: `queued` → `running` → `done` or `failed` (a failed one may be asked for again). */
export type ExplanationJobStatus = 'queued' | 'running' | 'done' | 'failed';

/**
 * "Why this award" and the debrief of one finished run (server/award/explain.ts), computed once by
 * a job on the solve queue and kept: the run's problem and result never change, so neither does it.
 */
@Entity({ tableName: 'run_explanation' })
export class RunExplanation extends BaseEntity {
  @OneToOne({ entity: () => Run, owner: true, deleteRule: 'cascade', unique: 'run_explanation_run_id_unique' })
  run!: Run;

  @Property({ type: 'string', length: 10, default: 'queued' })
  status: ExplanationJobStatus & Opt = 'queued';

  @ManyToOne({ entity: () => User, deleteRule: 'restrict' })
  requestedBy!: User;

  /** Re-solves done and to do (progress while it runs). */
  @Property({ type: 'integer', default: 0 })
  progressDone: number & Opt = 0;

  @Property({ type: 'integer', default: 0 })
  progressTotal: number & Opt = 0;

  @Property({ type: 'json', nullable: true })
  result?: ExplanationResult | null;

  @Property({ type: 'text', nullable: true })
  error?: string | null;

  @Property({ type: 'datetime', nullable: true })
  startedAt?: Date | null;

  @Property({ type: 'datetime', nullable: true })
  computedAt?: Date | null;

  @Property({ type: 'integer', default: 0 })
  attempts: number & Opt = 0;
}
