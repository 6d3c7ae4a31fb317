/**
 * Golden files guard regressions; they never prove physics (the reference tests do that). Each
 * sample survey's interpretation is compared with tests/golden/<name>.json; rewrite them only with
 * `REGEN=1 npx vitest run tests/golden` and review the diff before committing.
 */
import { describe, expect, it } from 'vitest';
import { existsSync, readdirSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { readPickTable } from '../../lib/picks/index.js';
import { interpret } from '../../lib/interpret.js';

const SAMPLES = readdirSync('sample-surveys').filter((name) => name.endsWith('.csv'));
const REGENERATE = process.env.REGEN === '1';

/** Round to 9 significant digits so the files do not churn on the last bit of floating point. */
function rounded(value: unknown): unknown {
  if (typeof value === 'number') return Number.isFinite(value) ? Number(value.toPrecision(9)) : value;
  if (Array.isArray(value)) return value.map(rounded);
  if (value && typeof value === 'object') return Object.fromEntries(Object.entries(value).map(([key, entry]) => [key, rounded(entry)]));
  return value;
}

describe('golden interpretations of the sample surveys', () => {
  for (const sample of SAMPLES) {
    it(`interpret(${sample}) matches its golden file`, () => {
      const outcome = readPickTable(readFileSync(join('sample-surveys', sample)));
      expect(outcome.ok).toBe(true);
      if (!outcome.ok) return;
      const result = rounded(JSON.parse(JSON.stringify(interpret(outcome.value, { sourceName: sample, softwareVersion: 'golden' }))));
      const file = join('tests', 'golden', sample.replace(/\.csv$/, '.json'));
      if (REGENERATE || !existsSync(file)) {
        if (!REGENERATE) throw new Error(`${file} is missing: run REGEN=1 npx vitest run tests/golden and review it`);
        writeFileSync(file, `${JSON.stringify(result, null, 2)}\n`);
        return;
      }
      expect(result).toEqual(JSON.parse(readFileSync(file, 'utf8')));
    });
  }
});
