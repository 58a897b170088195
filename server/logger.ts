import pino from 'pino';

/** The one structured logger of the server (JSON lines on stdout). */
export const logger = pino({
  level: process.env['LOG_LEVEL'] ?? 'info',
  base: { app: 'tendara' },
  redact: { paths: ['req.headers.cookie', 'req.headers["x-xsrf-token"]', 'password', '*.password'], remove: true },
});
