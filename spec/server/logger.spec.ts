import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import pino from 'pino';
import { LOG_BATCH_BYTES, logDestination } from '../../server/logger';
import { waitFor } from '../support/wait';

/**
 * The server's log lines are written asynchronously and in batches (server/logger.ts): none may be
 * lost or wait for more traffic to be written.
 */
// The destination opens its file asynchronously (until then there is no file), and a line read
// while it is being written has no newline yet: only whole lines count.
const lines = (file: string) =>
  fs.existsSync(file)
    ? fs.readFileSync(file, 'utf8').split('\n').slice(0, -1).map((l) => JSON.parse(l) as { msg: string; n?: number })
    : [];

test('a lone log line is written without more lines to follow, and a burst of lines is written whole and in order', async () => {
  const file = path.join(fs.mkdtempSync(path.join(os.tmpdir(), 'tendara-log-')), 'server.log');
  const dest = logDestination(file);
  const log = pino({ base: null }, dest);
  try {
    log.info('alone');
    // Far less than a batch: written by the timer, not by a full batch.
    expect(Buffer.byteLength(JSON.stringify({ level: 30, time: Date.now(), msg: 'alone' }))).toBeLessThan(LOG_BATCH_BYTES);
    await waitFor('the lone line in the file', () => lines(file).length === 1);
    expect(lines(file).map((l) => l.msg)).toEqual(['alone']);
    // A burst of several batches' worth.
    for (let n = 0; n < 500; n++) log.info({ n }, 'burst');
    await waitFor('all 501 lines in the file', () => lines(file).length === 501);
    expect(lines(file).slice(1).map((l) => l.n)).toEqual(Array.from({ length: 500 }, (_, n) => n));
  } finally {
    dest.end();
  }
});
