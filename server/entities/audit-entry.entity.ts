import { Entity, Index, ManyToOne, PrimaryKey, Property } from '@mikro-orm/core';
import { Tender } from './tender.entity';
import { User } from './user.entity';

/**
 * The audit trail: append-only (the migration revokes UPDATE and DELETE through a trigger), each
 * entry chained to the one before by SHA-256 so that a changed or removed entry shows.
 */
@Entity({ tableName: 'audit_entry' })
@Index({ properties: ['tender', 'seq'] })
export class AuditEntry {
  @PrimaryKey({ type: 'bigint', autoincrement: true })
  seq!: string;

  @Property({ type: 'datetime' })
  at!: Date;

  @ManyToOne({ entity: () => Tender, nullable: true, deleteRule: 'restrict' })
  tender?: Tender | null;

  @ManyToOne({ entity: () => User, nullable: true, deleteRule: 'restrict' })
  actor?: User | null;

  @Property({ type: 'string', length: 80 })
  action!: string;

  @Property({ type: 'string', length: 200 })
  subject!: string;

  @Property({ type: 'json' })
  detail!: Record<string, unknown>;

  @Property({ type: 'string', length: 64, nullable: true })
  beforeDigest?: string | null;

  @Property({ type: 'string', length: 64, nullable: true })
  afterDigest?: string | null;

  @Property({ type: 'string', length: 64 })
  prevHash!: string;

  @Property({ type: 'string', length: 64 })
  hash!: string;
}
