import { Entity, ManyToOne, Property, Unique, type Opt } from '@mikro-orm/core';
import type { VendorDebrief } from '@shared/explanation';
import { BaseEntity } from './base.entity';
import type { ExplanationJobStatus } from './run-explanation.entity';
import { Run } from './run.entity';
import { User } from './user.entity';
import { VendorOrganisation } from './vendor-organisation.entity';

/**
 * One vendor's debrief of one finished run (server/award/explain.ts `debriefVendor`): asked for
 * per vendor by a buyer or compliance officer, computed by a job on the solve queue and kept (the
 * run's problem and result never change). Never shown to vendors.
 */
@Entity({ tableName: 'run_debrief' })
@Unique({ name: 'run_debrief_run_id_vendor_id_unique', properties: ['run', 'vendor'] })
export class RunDebrief extends BaseEntity {
  @ManyToOne({ entity: () => Run, deleteRule: 'cascade' })
  run!: Run;

  @ManyToOne({ entity: () => VendorOrganisation, deleteRule: 'restrict' })
  vendor!: VendorOrganisation;

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
  result?: VendorDebrief | null;

  @Property({ type: 'text', nullable: true })
  error?: string | null;

  @Property({ type: 'datetime', nullable: true })
  startedAt?: Date | null;

  @Property({ type: 'datetime', nullable: true })
  computedAt?: Date | null;

  @Property({ type: 'integer', default: 0 })
  attempts: number & Opt = 0;
}
