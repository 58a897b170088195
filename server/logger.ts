import pino from 'pino';
import { setting } from './config';

/**
 * The one structured logger of the server (JSON lines on stdout). Written asynchronously: a
 * request no longer waits for its log line to reach the file or pipe (a synchronous write per
 * request was a measurable share of GET /api/session, bench:api); lines still pending are
 * flushed when the process exits.
 */
export const logger = pino(
  {
    level: setting('LOG_LEVEL'),
    base: { app: 'tendara' },
    redact: { paths: ['req.headers.cookie', 'req.headers["x-xsrf-token"]', 'password', '*.password'], remove: true },
  },
  pino.destination({ dest: 1, sync: false }),
);
