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

  test('an award increment is honoured: loads of 25 t turn the 110/40 split (270) into 100/50 (280)', () => {
    // Hand-worked in increment.spec.ts: V1 (cap 110 t) may carry 4 loads of 25 t, so all of B goes to V2.
    const r = run({
      unit: 't',
      regions: [{ id: 'A', demand: 100 }, { id: 'B', demand: 50 }],
      vendors: [{ id: 'V1', fixedFee: 10, capacity: 110, prices: { A: 1, B: 2 } }, { id: 'V2', fixedFee: 20, capacity: null, prices: { A: 4, B: 3 } }],
      rules: { awardIncrement: 25 },
    });
    expect(r.status).toBe(0);
    expect(JSON.parse(r.stdout)).toMatchObject({ status: 'optimal', objective: 280, awards: [{ vendor: 'V1', quantity: 100 }, { vendor: 'V2', quantity: 50 }] });
  });

  test('a forecast that is not a whole multiple of the award increment exits 2, naming the region', () => {
    const p = baseProblem({ awardIncrement: 25 });
    p.regions[1].demand = 110;
    const r = run(p);
    expect(r.status).toBe(2);
    expect(r.stdout).toBe('');
    expect(r.stderr).toContain('regions[1].demand: Forecast quantity 110 is not a whole multiple of the award increment 25: every quantity awarded is.');
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
