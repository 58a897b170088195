import { Collection, DecimalType, Entity, Enum, Index, ManyToOne, OneToMany, Property, Unique, type Opt } from '@mikro-orm/core';
import { TENDER_STATUSES, type AwardBasis, type BuyingBody, type TenderStatus } from '@shared/tenders';
import { BaseEntity } from './base.entity';
import { Region } from './region.entity';
import { User } from './user.entity';

/** A call for bids over many delivery regions. Times are stored in UTC. */
@Entity({ tableName: 'tender' })
// A buyer's tender list, a page at a time, newest closing first (queries/tenders.queries.ts).
@Index({ name: 'tender_created_by_id_closes_at_id_index', expression: 'create index "tender_created_by_id_closes_at_id_index" on "tender" ("created_by_id", "closes_at" desc, "id")' })
export class Tender extends BaseEntity {
  @Unique()
  @Property({ type: 'string', length: 40 })
  reference!: string;

  @Property({ type: 'string', length: 200 })
  title!: string;

  @Property({ type: 'string', length: 120 })
  commodity!: string;

  /** Unit of measure of forecasts, capacities and unit prices (t, m³, meals…). */
  @Property({ type: 'string', length: 20 })
  unit!: string;

  /** ISO 4217 code. */
  @Property({ type: 'string', length: 3 })
  currency!: string;

  @Property({ type: 'datetime' })
  closesAt!: Date;

  /** BCP 47 locale for money and dates in letters (e.g. en-GB, de-DE). */
  @Property({ type: 'string', length: 20, default: 'en-GB' })
  locale: string & Opt = 'en-GB';

  @Property({ type: 'integer', default: 10 })
  standstillDays: number & Opt = 10;

  /** Why no standstill applies (required when standstillDays is 0). */
  @Property({ type: 'text', nullable: true })
  standstillExemption?: string | null;

  /** The buying body's closure days ("2026-12-29"), sorted; a standstill never ends on one. */
  @Property({ type: 'json', default: '[]' })
  closureDays: string[] & Opt = [];

  /** Fixed once, in the approval's transaction: 23:59 in the tender's zone of the standstill's last day. */
  @Property({ type: 'datetime', nullable: true })
  standstillEndsAt?: Date | null;

  @Property({ type: 'text', default: '' })
  description: string & Opt = '';

  @Enum({ items: () => TENDER_STATUSES, nativeEnumName: 'tender_status', default: 'draft' })
  status: TenderStatus & Opt = 'draft';

  @ManyToOne({ entity: () => User, deleteRule: 'restrict' })
  createdBy!: User;

  @Property({ type: 'datetime', nullable: true })
  publishedAt?: Date | null;

  @Property({ type: 'datetime', nullable: true })
  closedAt?: Date | null;

  /** When the buyer cancelled the procedure before closing, and why. */
  @Property({ type: 'datetime', nullable: true })
  cancelledAt?: Date | null;

  @Property({ type: 'text', nullable: true })
  cancellationReason?: string | null;

  /** The award rules published with the tender (engine field names); locked at publish. */
  @Property({ type: 'json' })
  awardBasis: AwardBasis & Opt = { sourcing: 'split', soleRegions: [] };

  @Property({ type: 'json', nullable: true })
  buyingBody?: BuyingBody | null;

  /** IANA name; closing times are entered and shown in it. */
  @Property({ type: 'string', length: 64, default: 'UTC' })
  timeZone: string & Opt = 'UTC';

  /** Pre-tender estimate; never shown to vendors. */
  @Property({ type: new DecimalType('number'), precision: 16, scale: 2, nullable: true })
  estimatedValue?: number | null;

  @Property({ type: 'integer', default: 90 })
  bidValidityDays: number & Opt = 90;

  /** null: 5 days before closing. */
  @Property({ type: 'datetime', nullable: true })
  clarificationsCloseAt?: Date | null;

  @Property({ type: new DecimalType('number'), precision: 5, scale: 2, default: 20 })
  abnormallyLowPercent: number & Opt = 20;

  @OneToMany({ entity: () => Region, mappedBy: 'tender', orderBy: { position: 'asc' } })
  regions = new Collection<Region>(this);

  /**
   * How many regions the tender has, and the total of their forecasts: kept by PostgreSQL, in the
   * statement that writes the regions (the `region_totals_*` triggers on region,
   * Migration20261209100000), for the tender lists, which read them instead of counting and summing
   * every listed tender's regions. Never set here; lazy, so never loaded (or written back) with the
   * entity: read `regions` instead.
   */
  @Property({ type: 'integer', default: 0, lazy: true })
  regionCount?: number & Opt;

  /** See `regionCount`: numeric as the sum of the forecasts, `0` without regions. */
  @Property({ type: 'decimal', columnType: 'numeric', default: 0, lazy: true })
  totalForecast?: string & Opt;

  /**
   * The tender's own keys of its entry in the tender lists, as JSON without the braces: kept by
   * PostgreSQL (the `tender_summary_json` trigger, Migration20261211010000) before every insert and
   * update of the row. Never set here; lazy, so never loaded (or written back) with the entity.
   */
  @Property({ type: 'text', default: '', lazy: true })
  summaryJson?: string & Opt;
}
