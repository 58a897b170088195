import { spawn } from 'node:child_process';
import net from 'node:net';
import path from 'node:path';
import { createTestDatabase } from '../../support/db';

const root = path.join(__dirname, '..', '..', '..');

function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const s = net.createServer();
    s.once('error', reject);
    s.listen(0, '127.0.0.1', () => {
      const port = (s.address() as net.AddressInfo).port;
      s.close(() => resolve(port));
    });
  });
}

/** Starts the built server (dist/) with the demo data on a fresh database, as `npm start` would. */
export default async function globalSetup(): Promise<void> {
  const databaseUrl = await createTestDatabase();
  const env = {
    ...process.env,
    DATABASE_URL: databaseUrl,
    NODE_ENV: 'production',
    LOG_LEVEL: 'warn',
    SESSION_SECRET: process.env['SESSION_SECRET'] ?? 'e2e-secret-e2e-secret-e2e-secret-000001',
  };
  const seeded = spawn(process.execPath, [path.join(root, 'dist/server/ops/seed.js'), 'demo'], { env, stdio: 'inherit' });
  await new Promise<void>((resolve, reject) => seeded.on('exit', (code) => (code === 0 ? resolve() : reject(new Error(`seed exited ${code}`)))));

  const port = await freePort();
  const mailPort = await freePort();
  const server = spawn(process.execPath, [path.join(root, 'dist/server/main.js')], {
    env: {
      ...env,
      PORT: String(port),
      MAIL_CATCHER_PORT: String(mailPort),
      SMTP_URL: `smtp://127.0.0.1:${mailPort}`,
      CLIENT_DIST: path.join(root, 'dist/client/browser'),
    },
    stdio: ['ignore', 'inherit', 'inherit'],
  });
  const url = `http://127.0.0.1:${port}`;
  const deadline = Date.now() + 30_000;
  for (;;) {
    if (server.exitCode !== null) throw new Error('the server exited during start-up');
    try {
      const res = await fetch(`${url}/api/session`);
      if (res.status === 401) break;
    } catch {
      // not listening yet
    }
    if (Date.now() > deadline) throw new Error('the server did not start within 30 s');
    await new Promise((r) => setTimeout(r, 200));
  }
  process.env['E2E_BASE_URL'] = url;
  process.env['E2E_DATABASE_URL'] = databaseUrl;
  (globalThis as { __E2E_SERVER__?: unknown }).__E2E_SERVER__ = server;
}
