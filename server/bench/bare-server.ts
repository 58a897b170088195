import express from 'express';

/**
 * The yardstick of `npm run bench:api`: Express 5 itself (the same package as the app) with one
 * route and no middleware, in a process of its own started the same way as the server. It answers
 * GET /api/session with a body shaped like the app's signed-in answer, so the two differ only by
 * what Tendara adds on top of the framework.
 */
const app = express();
app.disable('x-powered-by');
app.get('/api/session', (_req, res) => {
  res.json({ user: { id: '00000000-0000-4000-8000-000000000000', email: 'bidder001@saltway.test', name: 'Bidder 001', role: 'vendor', vendorOrganisation: { id: '00000000-0000-4000-8000-000000000001', name: 'Saltway Supply 001' } } });
});
const server = app.listen(Number(process.env['PORT']), process.env['HOST'] ?? '127.0.0.1', () => {
  process.stdout.write(`${JSON.stringify({ msg: 'bare express listening' })}\n`);
});
process.once('SIGTERM', () => server.close(() => process.exit(0)));
