import pino from 'pino';
import { setting } from './config';

/** Bytes of log lines gathered before one write (`logDestination`). */
export const LOG_BATCH_BYTES = 4096;
/** The longest a log line waits to be written when fewer than `LOG_BATCH_BYTES` are pending. */
export const LOG_FLUSH_MS = 250;

/**
 * Where log lines go: written asynchronously, gathered up to `LOG_BATCH_BYTES` per write and
 * written at the latest `LOG_FLUSH_MS` after they were logged. One write per line was the logger's
 * largest share of a signed-in request (sonic-boom, 3.6 % of the web process's CPU in bench:api
 * phase d, profiled); under load a write now carries about twenty request lines. pino flushes what
 * is pending when the process exits (also on an uncaught error); a process killed outright
 * (SIGKILL) loses at most the lines of the last `LOG_FLUSH_MS`.
 */
export function logDestination(dest: number | string): ReturnType<typeof pino.destination> {
  const stream = pino.destination({ dest, sync: false, minLength: LOG_BATCH_BYTES });
  const timer = setInterval(() => {
    try {
      stream.flush();
    } catch {
      clearInterval(timer); // the stream was destroyed: the process is ending
    }
  }, LOG_FLUSH_MS);
  timer.unref();
  stream.once('close', () => clearInterval(timer));
  return stream;
}

/**
 * The one structured logger of the server (JSON lines on stdout). Written asynchronously and in
 * batches (`logDestination`): no request waits for its log line to reach the file or pipe (a
 * synchronous write per request was a measurable share of GET /api/session, bench:api).
 */
export const logger = pino(loggerOptions(), logDestination(1));

/** The server logger's options: its level, its `app` field, and what it never writes (cookies, XSRF tokens, passwords). */
export function loggerOptions(): pino.LoggerOptions {
  return {
    level: setting('LOG_LEVEL'),
    base: { app: 'tendara' },
    redact: { paths: ['req.headers.cookie', 'req.headers["x-xsrf-token"]', 'password', '*.password'], remove: true },
  };
}
