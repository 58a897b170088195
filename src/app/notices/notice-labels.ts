import type { NoticeKind, NoticeStatus, NoticeSummary } from '@shared/notices';

/** Notice states in words; the icon beside them is never the only signal. */
export const NOTICE_STATUS_LABELS: Record<NoticeStatus, string> = {
  queued: 'Waiting to send',
  sent: 'Sent',
  failed: 'Not delivered',
};

/** A Material Symbols ligature per state, shown next to the label. */
export const NOTICE_STATUS_ICONS: Record<NoticeStatus, string> = {
  queued: 'schedule_send',
  sent: 'mark_email_read',
  failed: 'error',
};

export const NOTICE_KIND_LABELS: Record<NoticeKind, string> = {
  award: 'Award letter',
  regret: 'Regret letter',
  exclusion: 'Exclusion notice',
};

/** The date a reader cares about: when it went out, or when it was queued if it has not yet. */
export function noticeDate(notice: Pick<NoticeSummary, 'sentAt' | 'queuedAt'>): string {
  return notice.sentAt ?? notice.queuedAt;
}

export function anyQueued(notices: readonly Pick<NoticeSummary, 'status'>[]): boolean {
  return notices.some((notice) => notice.status === 'queued');
}
