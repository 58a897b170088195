import type { Response } from 'express';

export const XLSX = 'application/vnd.openxmlformats-officedocument.spreadsheetml.sheet';
export const CSV = 'text/csv; charset=utf-8';
export const PDF = 'application/pdf';

/**
 * The name of an exported file, from the tender's reference and what it holds:
 * `NHP-2026-014-bid-tabulation.xlsx`. Anything but letters, digits, ".", "_" and "-" becomes "_",
 * so a reference never breaks the Content-Disposition header or a file system.
 */
export function exportName(reference: string, what: string): string {
  return `${reference.replace(/[^A-Za-z0-9._-]/g, '_')}-${what}`;
}

/** Answers with a file to save (Content-Disposition: attachment), the one way every export is sent. */
export function sendDownload(res: Response, file: { filename: string; content: Buffer | string; type: string }): void {
  res.attachment(file.filename).type(file.type).send(file.content);
}
