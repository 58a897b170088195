// Quiet logs and a fixed session secret for the server tests. The database comes from the
// bootstrap (npm test): TEST_PG_URL and TEST_TEMPLATE_DB.
process.env['LOG_LEVEL'] ??= 'silent';
process.env['SESSION_SECRET'] ??= 'test-secret-test-secret-test-secret-0001';
