import { readFileSync } from 'node:fs';
import { AwardInputError, closeSolverPool, solveAward, type EngineId } from './index';

/**
 * Command line: `npm run --silent award -- PROBLEM.json [--engine tendara|glpk|highs] [--time-limit S]`.
 * Prints the result JSON on stdout and exits 0 (infeasible included); invalid input → exit 2
 * with the messages on stderr; a file that cannot be read or parsed → exit 2 as well.
 */
async function main(argv: string[]): Promise<number> {
  const args = argv.slice();
  let engine: EngineId | undefined;
  let timeLimitSeconds: number | undefined;
  const files: string[] = [];
  while (args.length) {
    const a = args.shift()!;
    if (a === '--engine') engine = args.shift() as EngineId;
    else if (a === '--time-limit') timeLimitSeconds = Number(args.shift());
    else files.push(a);
  }
  if (files.length !== 1 || (engine && !['tendara', 'glpk', 'highs'].includes(engine)) || (timeLimitSeconds !== undefined && !(timeLimitSeconds > 0))) {
    process.stderr.write('usage: award PROBLEM.json [--engine tendara|glpk|highs] [--time-limit SECONDS]\n');
    return 2;
  }
  let input: unknown;
  try {
    input = JSON.parse(readFileSync(files[0], 'utf8'));
  } catch (err) {
    process.stderr.write(`Cannot read ${files[0]}: ${err instanceof Error ? err.message : String(err)}\n`);
    return 2;
  }
  try {
    const result = await solveAward(input, { engine, timeLimitSeconds });
    process.stdout.write(`${JSON.stringify(result, null, 2)}\n`);
    return 0;
  } catch (err) {
    if (err instanceof AwardInputError) {
      process.stderr.write(`Invalid award problem ${files[0]}:\n${err.errors.map((e) => `  ${e.field || '(problem)'}: ${e.message}`).join('\n')}\n`);
      return 2;
    }
    throw err;
  } finally {
    await closeSolverPool();
  }
}

main(process.argv.slice(2)).then(
  (code) => { process.exitCode = code; },
  (err: unknown) => { process.stderr.write(`${err instanceof Error ? err.stack : String(err)}\n`); process.exitCode = 1; },
);
