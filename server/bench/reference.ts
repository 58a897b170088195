import { existsSync, readFileSync } from 'node:fs';
import { join, resolve } from 'node:path';
import type { AwardProblem } from '../../shared/award';

/**
 * Reader for the published capacitated facility location instances kept beside the project in
 * ../shared/reference (Beasley 1988, OR-Library "cap"; Holmberg, Rönnqvist & Yuan 1999; Yang, Chu &
 * Chen 2012, sole award only). They are
 * read in place and never copied into the project. Vendors are the facilities, regions the customers.
 */
// AWARD_REFERENCE_DIR points elsewhere (a checkout that is not beside ../shared, such as a second worktree).
export const REFERENCE_DIR = process.env.AWARD_REFERENCE_DIR ?? resolve(__dirname, '..', '..', '..', 'shared', 'reference');

export interface ReferenceEntry {
  file: string;
  set: 'orlib-cap' | 'holmberg' | 'yang';
  name: string;
  vendors: number;
  regions: number;
  splitOptimum: number | null;
  soleOptimum: number | null;
}

export function referenceAvailable(dir = REFERENCE_DIR): boolean {
  return existsSync(join(dir, 'optima.csv'));
}

/** optima.csv: file,set,vendors,regions,split_optimum,sole_optimum (empty when unpublished). */
export function readOptima(dir = REFERENCE_DIR): ReferenceEntry[] {
  const lines = readFileSync(join(dir, 'optima.csv'), 'utf8').trim().split(/\r?\n/).slice(1);
  return lines.map((line) => {
    const [file, set, vendors, regions, split, sole] = line.split(',');
    const num = (s: string | undefined) => (s && s.trim() !== '' ? Number(s) : null);
    return {
      file, set: set as ReferenceEntry['set'], name: file.replace(/^.*\//, '').replace(/\.txt$/, ''),
      vendors: Number(vendors), regions: Number(regions), splitOptimum: num(split), soleOptimum: num(sole),
    };
  });
}

/**
 * Parses "m n / K_1..K_m / F_1..F_m / d_1..d_n / n lines of C_1j..C_mj" where C_ij is the cost of
 * serving region j's whole demand from vendor i, so the unit price is C_ij / d_j.
 */
export function readInstance(entry: ReferenceEntry, sourcing: 'split' | 'sole', dir = REFERENCE_DIR): AwardProblem {
  const nums = readFileSync(join(dir, entry.file), 'utf8').trim().split(/\s+/).map(Number);
  let k = 0;
  const m = nums[k++];
  const n = nums[k++];
  const caps = nums.slice(k, (k += m));
  const fees = nums.slice(k, (k += m));
  const demand = nums.slice(k, (k += n));
  const prices: Record<string, number>[] = caps.map(() => ({}));
  for (let j = 0; j < n; j++) {
    for (let i = 0; i < m; i++) prices[i][`R${j + 1}`] = nums[k++] / demand[j];
  }
  if (k !== nums.length) throw new Error(`${entry.file}: expected ${k} numbers, found ${nums.length}`);
  return {
    unit: 'units',
    regions: demand.map((d, j) => ({ id: `R${j + 1}`, demand: d })),
    vendors: caps.map((c, i) => ({ id: `V${i + 1}`, fixedFee: fees[i], capacity: c, prices: prices[i] })),
    rules: { sourcing },
    options: { timeLimitSeconds: 60, relativeGap: 0 },
  };
}

/** The README's tolerance for published (rounded) optima: absolute 0.01 plus relative 1e-7. */
export function matchesPublished(objective: number, published: number): boolean {
  return Math.abs(objective - published) <= 0.01 + 1e-7 * Math.abs(published);
}
