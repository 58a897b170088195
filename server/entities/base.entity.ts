import { randomUUID } from 'node:crypto';
import { PrimaryKey, Property, type Opt } from '@mikro-orm/core';

/** Every entity has a UUID and its creation and last-change times (UTC). */
export abstract class BaseEntity {
  @PrimaryKey({ type: 'uuid' })
  id: string & Opt = randomUUID();

  @Property({ type: 'datetime', defaultRaw: 'now()' })
  createdAt: Date & Opt = new Date();

  @Property({ type: 'datetime', defaultRaw: 'now()', onUpdate: () => new Date() })
  updatedAt: Date & Opt = new Date();
}
