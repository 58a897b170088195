import type { EntityManager } from '@mikro-orm/postgresql';
import type PgBoss from 'pg-boss';
import { NOTIFICATION_SETTING, type NotificationKind } from '@shared/notifications';
import { QUEUES } from '../../jobs/queue';
import type { OutgoingMail } from '../../mail/mailer';
import type { RenderedMail } from '../../mail/templates';
import { recordNotificationOnce, usersWithSettingOff } from '../queries/notifications.queries';

/** What a service needs to send notifications: the queue, and the address links point to. */
export interface NotifyDeps {
  boss: PgBoss;
  publicUrl: string;
}

export interface Recipient {
  id: string;
  email: string;
  name: string;
}

export interface Notification {
  kind: NotificationKind;
  /** The event's subject (recommendation, question, amendment or tender id): with kind and recipient, the key that is sent once. */
  subjectId: string;
  tenderId: string | null;
  recipients: readonly Recipient[];
  /** The mail for one recipient (renderMail with a template of templates/). */
  render: (recipient: Recipient) => RenderedMail;
}

/**
 * pg-boss's `db` option: its job insert runs in our transaction, so the mail is queued if and only
 * if the transaction commits. pg-boss writes `$1…$n`; MikroORM's `execute` takes `?` bindings.
 */
function inTransaction(tx: EntityManager) {
  return {
    async executeSql(text: string, values: unknown[] = []): Promise<{ rows: unknown[] }> {
      const bindings: unknown[] = [];
      const sql = text.replace(/\$(\d+)/g, (_, n: string) => {
        const value = values[Number(n) - 1] ?? null;
        // The query builder would spread an array into several bindings: objects go as JSON text.
        bindings.push(value !== null && typeof value === 'object' && !(value instanceof Date) ? JSON.stringify(value) : value);
        return '?';
      });
      // eslint-disable-next-line no-restricted-syntax -- runs pg-boss's own statement in our transaction; no SQL of ours
      return { rows: await tx.execute<unknown[]>(sql, bindings) };
    },
  };
}

/** Queues one e-mail inside the caller's transaction. */
export async function enqueueMailIn(tx: EntityManager, boss: PgBoss, mail: OutgoingMail): Promise<void> {
  await boss.send(QUEUES.mail, mail, { db: inTransaction(tx) });
}

/**
 * Sends a notification once per (kind, subject, recipient), inside the caller's transaction: a row
 * of `notification_sent` is inserted with `on conflict do nothing`, and the mail is queued (in the
 * same transaction) only when the row is new. A retried request, a second run of a job or a job
 * running on two workers at once therefore sends nothing more. A reminder is skipped for a person
 * who turned that kind off; legal notices (no setting) always go. Returns how many were queued.
 */
export async function notifyOnce(tx: EntityManager, boss: PgBoss, n: Notification): Promise<number> {
  if (!n.recipients.length) return 0;
  const setting = NOTIFICATION_SETTING[n.kind];
  let off = new Set<string>();
  if (setting) {
    const column = setting === 'closingReminders' ? 'closing_reminders' : 'decision_updates';
    off = new Set(await usersWithSettingOff(tx, n.recipients.map((r) => r.id), column));
  }
  let queued = 0;
  for (const recipient of n.recipients) {
    if (off.has(recipient.id)) continue;
    const mail = n.render(recipient);
    const recorded = await recordNotificationOnce(tx, { kind: n.kind, subjectId: n.subjectId, recipientId: recipient.id, tenderId: n.tenderId, subject: mail.subject });
    if (!recorded) continue;
    await enqueueMailIn(tx, boss, { to: recipient.email, subject: mail.subject, text: mail.text, html: mail.html });
    queued += 1;
  }
  return queued;
}
