import { spawnSync } from 'node:child_process';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, resolve } from 'node:path';
import { baseProblem } from './support/problems';

// The command line as `npm run --silent award -- FILE` runs it (tsx server/award/cli.ts FILE).
jest.setTimeout(60_000);
const root = resolve(__dirname, '..', '..');
const dir = mkdtempSync(join(tmpdir(), 'tendara-award-'));
function run(problem: unknown): { status: number | null; stdout: string; stderr: string } {
  const file = join(dir, `p${Math.random().toString(36).slice(2)}.json`);
  writeFileSync(file, JSON.stringify(problem));
  const r = spawnSync(process.execPath, [join(root, 'node_modules', 'tsx', 'dist', 'cli.mjs'), join(root, 'server', 'award', 'cli.ts'), file], { cwd: root, encoding: 'utf8' });
  return { status: r.status, stdout: r.stdout, stderr: r.stderr };
}

describe('award command line', () => {
  test('prints the result JSON and exits 0', () => {
    const r = run(baseProblem());
    expect(r.status).toBe(0);
    expect(JSON.parse(r.stdout)).toMatchObject({ status: 'optimal', objective: 300, awards: [{ vendor: 'V1' }, { vendor: 'V2' }] });
  });

  test('an infeasible problem still exits 0, with its diagnosis', () => {
    const p = baseProblem();
    p.regions.push({ id: 'W', demand: 5 });
    const r = run(p);
    expect(r.status).toBe(0);
    expect(JSON.parse(r.stdout)).toMatchObject({ status: 'infeasible', diagnosis: ['region W: no vendor bid it.'] });
  });

  test('invalid input exits 2 with the field on stderr and nothing on stdout', () => {
    const p = baseProblem();
    p.regions[0].demand = -1;
    const r = run(p);
    expect(r.status).toBe(2);
    expect(r.stdout).toBe('');
    expect(r.stderr).toContain('regions[0].demand: Forecast quantity must be greater than 0.');
  });
});
