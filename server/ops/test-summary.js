// Adds up the jest JSON reports given as arguments and prints CI's summary line:
//   N passed, N failed, N skipped
// `--check NAME=passed|failed|skipped` (lint, typecheck) counts as one test each.
// Exits 1 when a test or check failed or a suite could not run (a suite that fails to load counts as one failure).
const fs = require('node:fs');

let passed = 0, failed = 0, skipped = 0;
const args = process.argv.slice(2);
const files = [];
for (let i = 0; i < args.length; i++) {
  if (args[i] !== '--check') {
    files.push(args[i]);
    continue;
  }
  const [name, outcome] = String(args[++i]).split('=');
  if (outcome === 'passed') passed += 1;
  else if (outcome === 'skipped') skipped += 1;
  else {
    console.error(`[tendara] ${name} failed (see its output above)`);
    failed += 1;
  }
}
for (const file of files) {
  let report;
  try {
    report = JSON.parse(fs.readFileSync(file, 'utf8'));
  } catch {
    console.error(`[tendara] no readable test report in ${file}: that test run ended abnormally (see its output above)`);
    failed += 1;
    continue;
  }
  passed += report.numPassedTests;
  failed += report.numFailedTests;
  skipped += report.numPendingTests + report.numTodoTests;
  // Suites that crashed before running any test (syntax error, failed import) report no tests.
  for (const suite of report.testResults) {
    if (suite.status === 'failed' && suite.assertionResults.every((a) => a.status !== 'failed')) {
      console.error(`[tendara] suite failed to run: ${suite.name}\n${suite.message}`);
      failed += 1;
    }
  }
}
console.log(`${passed} passed, ${failed} failed, ${skipped} skipped`);
process.exit(failed > 0 ? 1 : 0);
