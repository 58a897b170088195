import { Writable } from 'node:stream';
import express from 'express';
import pino from 'pino';
import request from 'supertest';
import { inSeries } from '../../server/http/in-series';
import { requestLog, requestLogger } from '../../server/http/request-log';
import { cookies } from '../../server/http/cookies';
import { loggerOptions } from '../../server/logger';

/**
 * The request log line (server/http/request-log.ts) is written by a child of the server's logger
 * without redaction (it holds no header or body); every other line keeps the logger's redaction.
 */
function memoryLogger() {
  const lines: Record<string, unknown>[] = [];
  const sink = new Writable({
    write(chunk: Buffer, _enc, done) {
      for (const l of chunk.toString('utf8').split('\n').filter(Boolean)) lines.push(JSON.parse(l) as Record<string, unknown>);
      done();
    },
  });
  return { logger: pino({ ...loggerOptions(), level: 'info' }, sink), lines };
}

test('one line per API request: its id, method, path without the query, status and time; nothing of its headers', async () => {
  const { logger, lines } = memoryLogger();
  const app = express();
  app.use(inSeries(requestLog(logger), cookies()));
  app.get('/api/thing', (req, res) => {
    // A line of the request's own logger, with what the redaction must remove.
    requestLogger(req, logger).warn({ password: 'hunter2', req: { headers: { cookie: 'tendara.sid=s%3Asecret' } }, detail: { password: 'x' } }, 'careful');
    res.json({ cookies: req.cookies });
  });
  const answer = await request(app).get('/api/thing?q=secret').set('Cookie', 'a=1; b=%2F2').set('X-Request-Id', 'req-1');
  expect(answer.status).toBe(200);
  expect(answer.headers['x-request-id']).toBe('req-1');
  expect(answer.body).toEqual({ cookies: { a: '1', b: '/2' } });
  const done = lines.find((l) => l['msg'] === 'request completed')!;
  expect(done).toMatchObject({ app: 'tendara', req: { id: 'req-1', method: 'GET', url: '/api/thing' }, res: { statusCode: 200 } });
  expect(typeof done['responseTime']).toBe('number');
  expect(JSON.stringify(done)).not.toContain('secret');
  const careful = lines.find((l) => l['msg'] === 'careful')!;
  expect(careful).toBeDefined();
  expect(JSON.stringify(careful)).not.toContain('hunter2');
  expect(JSON.stringify(careful)).not.toContain('s%3Asecret');
  expect(careful['detail']).toEqual({});
  // The same logger outside a request still redacts too.
  logger.info({ password: 'hunter2' }, 'plain');
  expect(JSON.stringify(lines.find((l) => l['msg'] === 'plain'))).not.toContain('hunter2');
});

test('a request without cookies has an empty cookies object; not an API path: no line', async () => {
  const { logger, lines } = memoryLogger();
  const app = express();
  app.use(inSeries(requestLog(logger), cookies()));
  app.get('/{*any}', (req, res) => {
    res.json({ cookies: req.cookies });
  });
  expect((await request(app).get('/api/x')).body).toEqual({ cookies: {} });
  expect((await request(app).get('/page')).body).toEqual({ cookies: {} });
  expect(lines.filter((l) => l['msg'] === 'request completed').map((l) => (l['req'] as { url: string }).url)).toEqual(['/api/x']);
});
