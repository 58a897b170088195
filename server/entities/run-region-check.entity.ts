import { Entity, ManyToOne, Property, Unique, type Opt } from '@mikro-orm/core';
import type { RegionExplanation } from '@shared/explanation';
import { BaseEntity } from './base.entity';
import type { ExplanationJobStatus } from './run-explanation.entity';
import { Run } from './run.entity';
import { User } from './user.entity';

/**
 * One region of a run's explanation worked out exactly, on demand (server/award/explain.ts
 * `explainRegion`): the explanation gives the extra cost of a region as a range when its forced
 * re-solve was not proven within its share of the time; a buyer or compliance officer can have that
 * one region re-solved with the run's whole time limit. Kept beside the explanation, never written
 * into it: the explanation as first computed stays as it was.
 */
@Entity({ tableName: 'run_region_check' })
@Unique({ name: 'run_region_check_run_id_region_unique', properties: ['run', 'region'] })
export class RunRegionCheck extends BaseEntity {
  @ManyToOne({ entity: () => Run, deleteRule: 'cascade' })
  run!: Run;

  /** The region's code in the run's problem. */
  @Property({ type: 'string', length: 64 })
  region!: string;

  @Property({ type: 'string', length: 10, default: 'queued' })
  status: ExplanationJobStatus & Opt = 'queued';

  @ManyToOne({ entity: () => User, deleteRule: 'restrict' })
  requestedBy!: User;

  /** Re-solves done and to do (one: its forced re-solve). */
  @Property({ type: 'integer', default: 0 })
  progressDone: number & Opt = 0;

  @Property({ type: 'integer', default: 0 })
  progressTotal: number & Opt = 0;

  @Property({ type: 'json', nullable: true })
  result?: RegionExplanation | null;

  @Property({ type: 'text', nullable: true })
  error?: string | null;

  @Property({ type: 'datetime', nullable: true })
  startedAt?: Date | null;

  @Property({ type: 'datetime', nullable: true })
  computedAt?: Date | null;

  @Property({ type: 'integer', default: 0 })
  attempts: number & Opt = 0;
}
