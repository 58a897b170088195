import type { EntityManager } from '@mikro-orm/postgresql';
import type { OpeningRecordView } from '@shared/compliance';
import { isSealed } from '@shared/tenders';
import { OpeningRecord, type User } from '../entities';
import { AppError } from '../http/errors';
import { buildOpeningRecordWorkbook } from '../workbooks/opening-record-workbook';
import { findVisibleTender } from './tender-access';
import { exportName } from '../http/download';

/**
 * The opening record of a closed tender (buyer owning it, compliance, admin). None exists before
 * closing, nor for a tender closed before opening records were kept (migration 20261203020000):
 * 404 saying which.
 */
export async function openingRecordOf(em: EntityManager, user: User, tenderId: string): Promise<OpeningRecordView> {
  const tender = await findVisibleTender(em, user, tenderId);
  if (isSealed(tender.status)) {
    throw new AppError(404, 'Not found', 'The opening record is made when the tender closes; this tender has not closed yet.');
  }
  const record = await em.findOne(OpeningRecord, { tender: tenderId });
  if (!record) throw new AppError(404, 'Not found', 'This tender was closed before opening records were kept: it has none. Its audit trail lists every bid received and withdrawn.');
  return { record: record.content, digest: record.digest, algorithm: 'sha256-canonical-json' };
}

export async function openingRecordWorkbook(em: EntityManager, user: User, tenderId: string): Promise<{ filename: string; content: Buffer }> {
  const view = await openingRecordOf(em, user, tenderId);
  const { timeZone } = await findVisibleTender(em, user, tenderId);
  const content = await buildOpeningRecordWorkbook(view, timeZone);
  return { filename: exportName(view.record.tender.reference, 'opening-record.xlsx'), content };
}
