import { tenderIdParamSchema } from '@shared/tenders';
import { PDF, sendDownload, XLSX } from '../http/download';
import { route, type AnyRoute } from '../http/route';
import { reportPdf, reportWorkbook } from '../services/report/report.service';

const SUMMARY = 'tender and buying body, published award basis, clarifications and amendments, opening record, exclusions and abnormally low decisions, tabulation summary, scenarios compared, the chosen award with its allocation and explanation, drop-out and forecast checks, recommendation and approval, standstill, contracts, and the audit chain’s head hash';

export function reportRoutes(): AnyRoute[] {
  return [
    route({
      method: 'get', path: '/tenders/:id/report.pdf', tag: 'Evaluation', access: ['buyer', 'compliance'], params: tenderIdParamSchema, produces: PDF,
      summary: `The evaluation report as a PDF (Noto Sans embedded): ${SUMMARY}. After closing only.`,
      responses: { 409: 'Bids are sealed until closing, or the tender was cancelled' },
      handler: async ({ em, user, params, res }) => {
        const file = await reportPdf(em, user, params.id);
        sendDownload(res, { ...file, type: PDF });
      },
    }),
    route({
      method: 'get', path: '/tenders/:id/report.xlsx', tag: 'Evaluation', access: ['buyer', 'compliance'], params: tenderIdParamSchema, produces: XLSX,
      summary: `The evaluation report as a workbook, the same content as the PDF: ${SUMMARY}. After closing only.`,
      responses: { 409: 'Bids are sealed until closing, or the tender was cancelled' },
      handler: async ({ em, user, params, res }) => {
        const file = await reportWorkbook(em, user, params.id);
        sendDownload(res, { ...file, type: XLSX });
      },
    }),
  ];
}
