import type { ErrorRequestHandler, RequestHandler } from 'express';
import { DriverException, UniqueConstraintViolationException } from '@mikro-orm/core';
import { MulterError } from 'multer';
import { AppError } from './errors';
import { requestLogger } from './request-log';

const PROBLEM = 'application/problem+json';

/**
 * PostgreSQL data exceptions that only a value sent by the client can cause (the request schemas
 * should refuse such values first; this is the safety net that keeps them from becoming a 500).
 */
const CLIENT_DATA_ERRORS: Record<string, string> = {
  '22001': 'A text is longer than allowed.',
  '22003': 'A number is out of the range that can be stored.',
  '22007': 'A date or time is not valid.',
  '22008': 'A date or time is out of range.',
  '22021': 'A text contains characters that cannot be stored (such as NUL).',
  '22P02': 'A value is not in the expected form.',
  '22P05': 'A text contains characters that cannot be stored.',
};

function sqlState(err: unknown): string | undefined {
  if (!(err instanceof DriverException)) return undefined;
  return err.code ?? err.sqlState;
}

/** 404 for /api paths nobody declared. */
export const apiNotFound: RequestHandler = (req, _res, next) => {
  next(new AppError(404, 'Not found', `No API route ${req.method} ${req.originalUrl}.`));
};

/**
 * The one error handler: AppErrors as they are; body-parser and database errors mapped to clear
 * answers; everything else a 500 with a generic message (the full error goes to the log only).
 */
export const errorHandler: ErrorRequestHandler = (err, req, res, _next) => {
  let problem: AppError;
  // body-parser's errors carry a `type`.
  const type: unknown = (err as { type?: unknown } | null | undefined)?.type;
  if (err instanceof AppError) problem = err;
  else if (type === 'entity.parse.failed') {
    problem = new AppError(400, 'Malformed JSON', 'The request body is not valid JSON.', [{ field: '(body)', message: 'The request body is not valid JSON.' }]);
  } else if (type === 'entity.too.large') {
    problem = new AppError(413, 'Request too large', 'The request body is larger than allowed.');
  } else if (type === 'encoding.unsupported' || type === 'charset.unsupported') {
    problem = new AppError(415, 'Unsupported encoding', 'Send the body as UTF-8 JSON.');
  } else if (err instanceof MulterError) {
    problem = err.code === 'LIMIT_FILE_SIZE'
      ? new AppError(413, 'File too large', 'The file is larger than allowed.', [{ field: err.field ?? 'file', message: 'The file is larger than allowed (at most 5 MB).' }])
      : new AppError(400, 'Invalid upload', err.message, [{ field: err.field ?? 'file', message: err.message }]);
  } else if (err instanceof URIError) {
    // A path that is not valid percent-encoding, such as /api/tenders/%.
    problem = new AppError(400, 'Malformed path', 'The request path is not valid URL encoding.', [{ field: '(path)', message: 'The request path is not valid URL encoding.' }]);
  } else if (CLIENT_DATA_ERRORS[sqlState(err) ?? ''] !== undefined) {
    requestLogger(req).warn({ err }, 'database refused a value the request schemas let through');
    const message = CLIENT_DATA_ERRORS[sqlState(err)!];
    problem = new AppError(400, 'Invalid value', message, [{ field: '(body)', message }]);
  } else if (err instanceof UniqueConstraintViolationException) {
    problem = new AppError(409, 'Conflict', 'This would duplicate something that must be unique.');
  } else {
    requestLogger(req).error({ err }, 'unhandled error');
    problem = new AppError(500, 'Internal error', 'Something went wrong on our side. It has been logged; try again later.');
  }
  if (problem.status >= 500 && err instanceof AppError) requestLogger(req).error({ err }, 'server error');
  if (res.headersSent) return;
  res.status(problem.status).type(PROBLEM).json({
    type: 'about:blank',
    title: problem.title,
    status: problem.status,
    ...(problem.detail ? { detail: problem.detail } : {}),
    ...(problem.errors ? { errors: problem.errors } : {}),
  });
};
