import type { ErrorRequestHandler, RequestHandler } from 'express';
import { UniqueConstraintViolationException } from '@mikro-orm/core';
import { MulterError } from 'multer';
import { AppError } from './errors';

const PROBLEM = 'application/problem+json';

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
  } else if (err instanceof UniqueConstraintViolationException) {
    problem = new AppError(409, 'Conflict', 'This would duplicate something that must be unique.');
  } else {
    req.log?.error({ err }, 'unhandled error');
    problem = new AppError(500, 'Internal error', 'Something went wrong on our side. It has been logged; try again later.');
  }
  if (problem.status >= 500 && err instanceof AppError) req.log?.error({ err }, 'server error');
  if (res.headersSent) return;
  res.status(problem.status).type(PROBLEM).json({
    type: 'about:blank',
    title: problem.title,
    status: problem.status,
    ...(problem.detail ? { detail: problem.detail } : {}),
    ...(problem.errors ? { errors: problem.errors } : {}),
  });
};
