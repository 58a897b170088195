import { existsSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import Ajv, { type ErrorObject } from 'ajv-draft-04';
import addFormats from 'ajv-formats';
import { parse } from 'csv-parse/sync';
import { REFERENCE_DIR } from '../../server/bench/reference';

/**
 * The published OCDS 1.1.5 schema and codelists, read in place from ../shared/reference/ocds-1.1.5
 * beside the checkout (never copied into the project; OCDS_REFERENCE_DIR points elsewhere, e.g. from
 * a second worktree). Validation is local: the package schema's reference to the release schema is
 * resolved by the release schema's own `id`, nothing is fetched.
 */
export const OCDS_DIR = process.env['OCDS_REFERENCE_DIR'] ?? join(REFERENCE_DIR, 'ocds-1.1.5');

export function ocdsReferenceAvailable(): boolean {
  return existsSync(join(OCDS_DIR, 'release-package-schema.json')) && existsSync(join(OCDS_DIR, 'release-schema.json'));
}

type Schema = { definitions?: Record<string, Schema>; properties?: Record<string, Schema>; items?: Schema; $ref?: string; codelist?: string };

let validator: ((data: unknown) => ErrorObject[]) | undefined;
let releaseSchema: Schema | undefined;

/** Every error of the package against release-package-schema.json (draft 4) and the release schema it names; [] when valid. */
export function schemaErrors(pkg: unknown): ErrorObject[] {
  if (!validator) {
    releaseSchema = JSON.parse(readFileSync(join(OCDS_DIR, 'release-schema.json'), 'utf8')) as Schema;
    const packageSchema = JSON.parse(readFileSync(join(OCDS_DIR, 'release-package-schema.json'), 'utf8')) as object;
    // allErrors: report every problem, not the first; the OCDS keywords (codelist, merge rules…)
    // are annotations, declared so that strict mode accepts them and still refuses anything unknown.
    const ajv = new Ajv({ allErrors: true, allowUnionTypes: true, strictTypes: false });
    ajv.addVocabulary(['codelist', 'openCodelist', 'deprecated', 'wholeListMerge', 'omitWhenMerged', 'versionId']);
    addFormats(ajv);
    ajv.addSchema(releaseSchema);
    const validate = ajv.compile(packageSchema);
    validator = (data) => (validate(data) ? [] : [...(validate.errors ?? [])]);
  }
  return validator(pkg);
}

const codelists = new Map<string, { codes: Set<string>; deprecated: Set<string> }>();
function codelist(file: string): { codes: Set<string>; deprecated: Set<string> } {
  let list = codelists.get(file);
  if (!list) {
    const rows = parse<Record<string, string>>(readFileSync(join(OCDS_DIR, 'codelists', file), 'utf8'), { columns: true, skip_empty_lines: true });
    list = { codes: new Set(rows.map((r) => r['Code'])), deprecated: new Set(rows.filter((r) => r['Deprecated']).map((r) => r['Code'])) };
    codelists.set(file, list);
  }
  return list;
}

/**
 * Every value of a field the release schema ties to a codelist (open or closed) that is not a current
 * code of that codelist's CSV, as "path: value is not in file.csv"; `checked` counts the codelist
 * fields seen (so a test can show the walk found some). The schema is walked beside the data, so
 * every codelist field is checked, not a chosen few.
 */
export function codelistCheck(pkg: { releases: unknown[] }): { checked: number; problems: string[] } {
  schemaErrors(pkg); // loads the release schema
  const problems: string[] = [];
  let checked = 0;
  const resolve = (s: Schema): Schema => (s.$ref?.startsWith('#/definitions/') ? resolve(releaseSchema!.definitions![s.$ref.slice(14)]) : s);
  const walk = (value: unknown, raw: Schema, path: string): void => {
    const schema = resolve(raw);
    if (value === null || value === undefined) return;
    if (schema.codelist) {
      const list = codelist(schema.codelist);
      for (const code of Array.isArray(value) ? value : [value]) {
        checked += 1;
        if (!list.codes.has(String(code))) problems.push(`${path}: ${String(code)} is not in ${schema.codelist}`);
        else if (list.deprecated.has(String(code))) problems.push(`${path}: ${String(code)} is deprecated in ${schema.codelist}`);
      }
      return;
    }
    if (Array.isArray(value)) {
      if (schema.items) value.forEach((v, i) => walk(v, schema.items!, `${path}[${i}]`));
      return;
    }
    if (typeof value === 'object' && schema.properties) {
      for (const [key, v] of Object.entries(value)) if (schema.properties[key]) walk(v, schema.properties[key], `${path}.${key}`);
    }
  };
  pkg.releases.forEach((r, i) => walk(r, releaseSchema!, `releases[${i}]`));
  return { checked, problems };
}
