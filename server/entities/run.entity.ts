import { Entity, Enum, Index, ManyToOne, Property, type Opt } from '@mikro-orm/core';
import type { AwardProblem, AwardResult } from '@shared/award';
import { RUN_STATUSES, type RunStatus } from '@shared/evaluation';
import { BaseEntity } from './base.entity';
import { Scenario } from './scenario.entity';
import { Tender } from './tender.entity';
import { User } from './user.entity';

/**
 * One solve of a scenario: the exact problem (bids and rules, as the engine's problem file), its
 * SHA-256, the engine's result and the timings. A child run re-solves its parent's stored problem:
 * without one vendor (drop-out check, `droppedVendor`) or with the forecasts scaled (forecast
 * sensitivity, `forecastChangePercent`, all regions or only `scaledRegion`).
 */
@Entity({ tableName: 'run' })
@Index({ properties: ['tender', 'createdAt'] })
export class Run extends BaseEntity {
  @ManyToOne({ entity: () => Tender, deleteRule: 'cascade' })
  tender!: Tender;

  @ManyToOne({ entity: () => Scenario, deleteRule: 'cascade' })
  scenario!: Scenario;

  @Enum({ items: () => RUN_STATUSES, nativeEnumName: 'run_status', default: 'queued' })
  status: RunStatus & Opt = 'queued';

  @ManyToOne({ entity: () => User, deleteRule: 'restrict' })
  requestedBy!: User;

  @Property({ type: 'datetime', nullable: true })
  startedAt?: Date | null;

  @Property({ type: 'datetime', nullable: true })
  finishedAt?: Date | null;

  @Property({ type: 'integer' })
  timeLimitSeconds!: number;

  /**
   * Lazy: 30 vendors × 200 regions is ~80 kB of JSON that run lists and status polls do not need
   * (bench:queue); load it with `populate: ['problem']`.
   */
  @Property({ type: 'json', lazy: true })
  problem!: AwardProblem;

  @Property({ type: 'string', length: 64 })
  inputDigest!: string;

  @Property({ type: 'json', nullable: true })
  result?: AwardResult | null;

  @Property({ type: 'integer', default: 0 })
  attempts: number & Opt = 0;

  /** Resilience: the run this one re-solves, and the vendor left out. */
  @ManyToOne({ entity: 'Run', nullable: true, deleteRule: 'cascade' })
  parent?: Run | null;

  @Property({ type: 'uuid', nullable: true })
  droppedVendor?: string | null;

  /** Forecast sensitivity: every forecast (or only `scaledRegion`'s) changed by this many per cent, e.g. -10. */
  @Property({ type: 'integer', nullable: true })
  forecastChangePercent?: number | null;

  /** Forecast sensitivity of one region alone: its code (null: all regions scaled). */
  @Property({ type: 'string', length: 64, nullable: true })
  scaledRegion?: string | null;
}
