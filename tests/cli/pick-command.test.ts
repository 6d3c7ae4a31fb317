/**
 * `slopebreak pick` and `slopebreak interpret` on gathers, as a user runs them (the built bin,
 * dist/server/cli.js). The gathers are the bundled demo gathers; the layers they were modelled
 * with (tests/tools/make-sample-gathers.ts) and the ray-geometry oracle
 * (tests/oracles/ray-geometry.ts) give the true first-arrival times the picks are checked against.
 */
import { spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { InterpretationSchema } from '../../lib/interpretation/shape.js';
import { readPickTable } from '../../lib/picks/index.js';
import { firstArrivalByRays } from '../oracles/ray-geometry.js';

const CLI = join('dist', 'server', 'cli.js');
const CORRAN = join('sample-surveys', 'corran-brae-culvert');
const CORRAN_FILES = readdirSync(CORRAN).filter((name) => name.endsWith('.sg2')).sort().map((name) => join(CORRAN, name));
const TALLIS = join('sample-surveys', 'tallis-moor-water-table.sgy');
const scratch = mkdtempSync(join(tmpdir(), 'slopebreak-pick-'));
afterAll(() => rmSync(scratch, { recursive: true, force: true }));

function slopebreak(...args: string[]) {
  const result = spawnSync(process.execPath, [CLI, ...args], { encoding: 'utf8', timeout: 60_000, maxBuffer: 64 * 2 ** 20 });
  return { status: result.status, stdout: result.stdout, stderr: result.stderr };
}

describe('slopebreak pick', () => {
  it('writes the picks of five SEG-2 gathers as a pick table with a sigma column, near the modelled first arrivals', () => {
    const out = join(scratch, 'corran.csv');
    const run = slopebreak('pick', ...CORRAN_FILES, '--out', out);
    expect(run.status, run.stderr).toBe(0);
    expect(run.stdout).toBe('');
    expect(run.stderr).toMatch(/shot C1-W: 24 traces, \d+ picks/);
    const table = readPickTable(readFileSync(out));
    if (!table.ok) throw new Error(table.problems[0]!.message);
    expect(table.value.columns.sigma).toBe(true);
    expect(table.value.shotIds.length).toBe(5);
    // Layers of make-sample-gathers.ts (Corran Brae), truth by the ray-geometry oracle; tolerance one sample + 1 ms.
    const within = table.value.picks.filter((pick) =>
      Math.abs(pick.time - firstArrivalByRays([380, 1100, 3200], [2.0, 4.5], Math.abs(pick.receiverX - pick.sourceX)).time) <= 0.000125 + 0.001);
    expect(within.length / table.value.picks.length).toBeGreaterThanOrEqual(0.9);
  });

  it('prints the table on standard output without --out, and reads SEG-Y with several shots', () => {
    const run = slopebreak('pick', TALLIS);
    expect(run.status, run.stderr).toBe(0);
    const table = readPickTable(Buffer.from(run.stdout));
    if (!table.ok) throw new Error(table.problems[0]!.message);
    expect(table.value.shotIds).toEqual(['SP1', 'SP2', 'SP3']);
  });

  it('takes the filter options and the geometry corrections', () => {
    const run = slopebreak('pick', CORRAN_FILES[0]!, '--band', '30-500', '--agc', '0.02', '--estimator', 'sta-lta', '--shot', 'renamed', '--source-x=-10', '--first-receiver-x', '0', '--receiver-spacing', '2');
    expect(run.status, run.stderr).toBe(0);
    const table = readPickTable(Buffer.from(run.stdout));
    if (!table.ok) throw new Error(table.problems[0]!.message);
    expect(table.value.shotIds).toEqual(['renamed']);
    expect(table.value.picks[0]!.sourceX).toBe(-10);
    expect(table.value.picks.every((pick) => Math.abs(pick.receiverX / 2 - Math.round(pick.receiverX / 2)) < 1e-9)).toBe(true);
  });

  it('refuses a bad option with exit 2 and a message naming it', () => {
    for (const args of [['--band', '300-30'], ['--agc', '-1'], ['--estimator', 'guess'], ['--first-receiver-x', '0'], ['--shot', ' '], ['--source-x', '9'.repeat(400)]]) {
      const run = slopebreak('pick', CORRAN_FILES[0]!, ...args);
      expect(run.status, args.join(' ')).toBe(2);
      expect(run.stderr).toContain(args[0]!);
    }
    expect(slopebreak('pick').status).toBe(2);
    const help = slopebreak('pick', '--help');
    expect(help.status).toBe(0);
    expect(help.stdout).toContain('pick options');
    expect(slopebreak('pick', ...CORRAN_FILES, '--shot', 'x').status).toBe(2);
  });

  it('refuses a band-pass past the Nyquist frequency with exit 1 and a message naming it', () => {
    const run = slopebreak('pick', CORRAN_FILES[0]!, '--band', '100-6000');
    expect(run.status).toBe(1);
    expect(run.stderr).toMatch(/Nyquist/);
  });

  it('refuses a truncated gather and a file that is no gather with exit 1, naming the file, and writes nothing', () => {
    const cut = join(scratch, 'cut.sg2');
    writeFileSync(cut, readFileSync(CORRAN_FILES[0]!).subarray(0, 4000));
    const out = join(scratch, 'never.csv');
    const run = slopebreak('pick', cut, '--out', out);
    expect(run.status).toBe(1);
    expect(run.stderr).toContain('cut.sg2');
    expect(existsSync(out)).toBe(false);
    const text = join(scratch, 'notes.txt');
    writeFileSync(text, 'hello\n');
    const notGather = slopebreak('pick', text);
    expect(notGather.status).toBe(1);
    expect(notGather.stderr).toMatch(/neither SEG-2 nor SEG-Y/);
  });
});

describe('slopebreak interpret on gathers', () => {
  it('picks and interprets SEG-2 gathers directly, recovering the modelled velocities within 10 %', () => {
    const run = slopebreak('interpret', ...CORRAN_FILES, '--json');
    expect(run.status, run.stderr).toBe(0);
    const result = InterpretationSchema.parse(JSON.parse(run.stdout));
    const velocities = result.layers.map((layer) => layer.velocity);
    // make-sample-gathers.ts modelled 380, 1100 and 3200 m/s.
    expect(velocities.length).toBeGreaterThanOrEqual(3);
    expect(Math.abs(velocities[0]! - 380) / 380).toBeLessThan(0.1);
    expect(Math.abs(velocities.at(-1)! - 3200) / 3200).toBeLessThan(0.1);
    expect(result.cautions.join(' ')).toMatch(/borehole/i);
  });

  it('refuses --out, and a pick table mixed with gathers', () => {
    expect(slopebreak('interpret', CORRAN_FILES[0]!, '--out', 'x.csv').status).toBe(2);
    expect(slopebreak('interpret', 'sample-surveys/millbrook-quarry-bedrock.csv', CORRAN_FILES[0]!).status).toBe(2);
  });
});
