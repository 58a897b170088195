import type { EntityManager } from '@mikro-orm/postgresql';
import type { User } from '../../entities';
import { exportName } from '../../http/download';
import { buildReportWorkbook } from '../../workbooks/report-workbook';
import { reportContent } from './report-content';
import { buildReportPdf } from './report-pdf';

export async function reportPdf(em: EntityManager, user: User, tenderId: string): Promise<{ filename: string; content: Buffer }> {
  const content = await reportContent(em, user, tenderId);
  return { filename: exportName(content.tender.reference, 'evaluation-report.pdf'), content: await buildReportPdf(content) };
}

export async function reportWorkbook(em: EntityManager, user: User, tenderId: string): Promise<{ filename: string; content: Buffer }> {
  const content = await reportContent(em, user, tenderId);
  return { filename: exportName(content.tender.reference, 'evaluation-report.xlsx'), content: await buildReportWorkbook(content) };
}
