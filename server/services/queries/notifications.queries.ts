import type { EntityManager } from '@mikro-orm/postgresql';
import { LIVE_BID_STATUSES } from '@shared/tenders';
import { sqlList, uuidArray } from '../sql';

/** A person a notification goes to. */
export interface PersonRow {
  id: string;
  email: string;
  name: string;
}

/** A person's stored choice of notifications (no row: all on). */
export interface NotificationSettingRow {
  closing_reminders: boolean;
  decision_updates: boolean;
}

export async function notificationSettingRow(em: EntityManager, userId: string): Promise<NotificationSettingRow | null> {
  const [row] = await em.execute<NotificationSettingRow[]>(
    'select closing_reminders, decision_updates from notification_setting where user_id = ?', [userId],
  );
  return row ?? null;
}

export async function upsertNotificationSetting(tx: EntityManager, userId: string, setting: NotificationSettingRow): Promise<void> {
  await tx.execute(
    `insert into notification_setting (user_id, closing_reminders, decision_updates, updated_at) values (?, ?, ?, now())
     on conflict (user_id) do update set closing_reminders = excluded.closing_reminders, decision_updates = excluded.decision_updates, updated_at = now()`,
    [userId, setting.closing_reminders, setting.decision_updates],
  );
}

/** Of `userIds`, those who turned the setting `column` off (a column name from the type, never input). */
export async function usersWithSettingOff(tx: EntityManager, userIds: readonly string[], column: keyof NotificationSettingRow): Promise<string[]> {
  const rows = await tx.execute<{ user_id: string }[]>(
    `select user_id from notification_setting where user_id = any(?::uuid[]) and not ${column}`,
    [uuidArray(userIds)],
  );
  return rows.map((r) => r.user_id);
}

/** One notification sent, as its row of `notification_sent`. */
export interface NotificationSentInput {
  kind: string;
  subjectId: string;
  recipientId: string;
  tenderId: string | null;
  subject: string;
}

/** Records the notification unless it was sent already (kind, subject, recipient); true when recorded now. */
export async function recordNotificationOnce(tx: EntityManager, n: NotificationSentInput): Promise<boolean> {
  const inserted = await tx.execute<{ id: string }[]>(
    `insert into notification_sent (id, kind, subject_id, recipient_id, tender_id, subject)
     values (gen_random_uuid(), ?, ?, ?, ?, ?) on conflict on constraint notification_sent_once do nothing returning id`,
    [n.kind, n.subjectId, n.recipientId, n.tenderId, n.subject],
  );
  return inserted.length > 0;
}

/** A tender with its buyer, as a decision's notification names them. */
export interface DecisionTenderRow {
  reference: string;
  title: string;
  time_zone: string;
  standstill_ends_at: Date | string | null;
  buyer_id: string;
  buyer_email: string;
  buyer_name: string;
  buyer_active: boolean;
}

export async function decisionTenderRow(tx: EntityManager, tenderId: string): Promise<DecisionTenderRow> {
  const [row] = await tx.execute<DecisionTenderRow[]>(
    `select t.reference, t.title, t.time_zone, t.standstill_ends_at, u.id as buyer_id, u.email as buyer_email, u.name as buyer_name, u.active as buyer_active
       from tender t join app_user u on u.id = t.created_by_id where t.id = ?`,
    [tenderId],
  );
  return row;
}

/** Every active compliance officer, by e-mail. */
export async function activeComplianceOfficers(tx: EntityManager): Promise<PersonRow[]> {
  return tx.execute<PersonRow[]>(`select id, email, name from app_user where role = 'compliance' and active order by email`);
}

/** An open tender due for a closing reminder. */
export interface ReminderTenderRow {
  id: string;
  reference: string;
  title: string;
  closes_at: Date | string;
  time_zone: string;
}

/**
 * The open, published tenders closing after `from` and at or before `until`, published more than
 * `hours` before their closing time; by closing time.
 */
export async function tendersClosingBetween(em: EntityManager, from: Date, until: Date, hours: number): Promise<ReminderTenderRow[]> {
  return em.execute<ReminderTenderRow[]>(
    `select id, reference, title, closes_at, time_zone from tender
      where status = 'open' and published_at is not null and closes_at > ? and closes_at <= ?
        and published_at < closes_at - make_interval(hours => ?)
      order by closes_at`,
    [from, until, hours],
  );
}

/** A vendor's person to remind, with the organisation's name and whether it has a draft. */
export interface PersonToRemindRow extends PersonRow {
  organisation: string;
  has_draft: boolean;
}

/**
 * Every approved, active person of each invited organisation that has no live bid in the tender (a
 * draft, a withdrawn bid or nothing), by organisation and e-mail.
 */
export async function peopleWithoutLiveBid(tx: EntityManager, tenderId: string): Promise<PersonToRemindRow[]> {
  return tx.execute<PersonToRemindRow[]>(
    `select u.id, u.email, u.name, o.name as organisation,
            exists (select 1 from bid d where d.tender_id = i.tender_id and d.vendor_organisation_id = o.id and d.status = 'draft') as has_draft
       from invitation i join vendor_organisation o on o.id = i.vendor_organisation_id
       join app_user u on u.vendor_organisation_id = o.id and u.active and u.role = 'vendor' and u.membership = 'approved'
      where i.tender_id = ?
        and not exists (select 1 from bid b where b.tender_id = i.tender_id and b.vendor_organisation_id = o.id and b.status in (${sqlList(LIVE_BID_STATUSES)}))
      order by o.name, u.email`,
    [tenderId],
  );
}

/** A notified tender whose standstill has ended, with its (active) buyer. */
export interface StandstillEndedRow {
  id: string;
  reference: string;
  title: string;
  standstill_ends_at: Date | string;
  time_zone: string;
  buyer_id: string;
  email: string;
  name: string;
}

/** The notified tenders whose standstill ended by `now` and whose buyer has not been told yet. */
export async function standstillEndedUntold(em: EntityManager, now: Date): Promise<StandstillEndedRow[]> {
  return em.execute<StandstillEndedRow[]>(
    `select t.id, t.reference, t.title, t.standstill_ends_at, t.time_zone, u.id as buyer_id, u.email, u.name
       from tender t join app_user u on u.id = t.created_by_id and u.active
      where t.status = 'notified' and t.standstill_ends_at is not null and t.standstill_ends_at <= ?
        and not exists (select 1 from notification_sent n where n.kind = 'standstill-ended' and n.subject_id = t.id)`,
    [now],
  );
}
