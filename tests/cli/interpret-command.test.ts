/**
 * The `slopebreak` command as a user runs it: the built bin (dist/server/cli.js, built by
 * `npm test` before vitest runs), on the bundled sample surveys and on bad input.
 */
import { describe, expect, it } from 'vitest';
import { spawnSync } from 'node:child_process';
import { mkdtempSync, readdirSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { InterpretationSchema } from '../../lib/interpretation/shape.js';

const CLI = join('dist', 'server', 'cli.js');
const SAMPLES = readdirSync('sample-surveys').filter((name) => name.endsWith('.csv'));

function slopebreak(...args: string[]) {
  const result = spawnSync(process.execPath, [CLI, ...args], { encoding: 'utf8', timeout: 30_000 });
  return { status: result.status, stdout: result.stdout, stderr: result.stderr };
}

describe('slopebreak interpret', () => {
  it('finds at least two sample surveys to run on', () => {
    expect(SAMPLES.length).toBeGreaterThanOrEqual(2);
  });

  for (const sample of SAMPLES) {
    it(`--json on ${sample} prints JSON of the documented shape, with cautions`, () => {
      const run = slopebreak('interpret', join('sample-surveys', sample), '--json');
      expect(run.stderr).toBe('');
      expect(run.status).toBe(0);
      const parsed = InterpretationSchema.parse(JSON.parse(run.stdout));
      expect(parsed.layers.length).toBeGreaterThanOrEqual(2);
      expect(parsed.cautions.join(' ')).toMatch(/borehole/i);
      expect(parsed.cautions.join(' ')).toMatch(/licensed/i);
      expect(parsed.source).toBe(sample);
    });

    it(`prints a readable summary of ${sample}: layers, depths by both methods, warnings, cautions`, () => {
      const run = slopebreak('interpret', join('sample-surveys', sample));
      expect(run.status).toBe(0);
      for (const heading of ['LAYERS', 'DEPTH BELOW EACH SHOT', 'FIT TO THE PICKS', 'WARNINGS', 'CAUTIONS']) {
        expect(run.stdout).toContain(heading);
      }
      expect(run.stdout).toMatch(/intercept-time/);
      expect(run.stdout).toMatch(/crossover-distance/);
      expect(run.stdout).not.toMatch(/NaN|undefined/);
    });
  }

  it('--robust and --bootstrap change the fit method and add intervals', () => {
    const run = slopebreak('interpret', join('sample-surveys', SAMPLES[0]!), '--json', '--robust', '--bootstrap', '200', '--seed', '3');
    expect(run.status).toBe(0);
    const parsed = InterpretationSchema.parse(JSON.parse(run.stdout));
    expect(parsed.options.fitMethod).toBe('huber');
    expect(parsed.options.bootstrapReplicates).toBe(200);
    const withIntervals = parsed.shots.flatMap((shot) => shot.sides).filter((side) => side.depths.bootstrap !== null);
    expect(withIntervals.length).toBeGreaterThan(0);
  });

  it('refuses a bad table with every problem on stderr, line by line, exit 1 and nothing on stdout', () => {
    const folder = mkdtempSync(join(tmpdir(), 'slopebreak-cli-'));
    const file = join(folder, 'bad.csv');
    writeFileSync(file, 'shot,source_x_m,receiver_x_m,time_ms\nS1,0,2,4.1\nS1,0,4,-8\nS1,0,6,abc\n');
    const run = slopebreak('interpret', file);
    expect(run.status).toBe(1);
    expect(run.stdout).toBe('');
    expect(run.stderr).toMatch(/refused/);
    expect(run.stderr).toMatch(/line 3/);
    expect(run.stderr).toMatch(/line 4/);
  });

  it('exits 1 with a reason when nothing could be interpreted (every pick excluded)', () => {
    const folder = mkdtempSync(join(tmpdir(), 'slopebreak-cli-'));
    const file = join(folder, 'excluded.csv');
    writeFileSync(file, 'shot,source_x_m,receiver_x_m,time_ms,branch\nS1,0,2,4,x\nS1,0,4,8,x\nS1,0,6,12,x\n');
    const run = slopebreak('interpret', file);
    expect(run.status).toBe(1);
    expect(run.stderr).toMatch(/nothing could be interpreted/);
    expect(run.stdout).toMatch(/nothing-interpreted/);
  });

  it('stops quietly when its output pipe is closed early (| head)', () => {
    const result = spawnSync('sh', ['-c', `"${process.execPath}" ${CLI} interpret sample-surveys/${SAMPLES[0]} --json | head -c 10 >/dev/null; echo "status \${PIPESTATUS:-done}"`], {
      encoding: 'utf8',
      timeout: 30_000,
    });
    expect(result.stderr).not.toMatch(/EPIPE|Error/);
  });

  it('says plainly when the file cannot be read (exit 1)', () => {
    const run = slopebreak('interpret', join('sample-surveys', 'no-such-survey.csv'));
    expect(run.status).toBe(1);
    expect(run.stderr).toMatch(/cannot read .*no-such-survey\.csv: no such file; check the path/);
    expect(slopebreak('interpret', 'sample-surveys').stderr).toMatch(/it is a folder/);
  });

  it('rejects bad options with a usage message (exit 2)', () => {
    expect(slopebreak('interpret').status).toBe(2);
    const badFit = slopebreak('interpret', 'x.csv', '--fit', 'median');
    expect(badFit.status).toBe(2);
    expect(badFit.stderr).toMatch(/--fit takes one of/);
    expect(slopebreak('interpret', 'x.csv', '--bootstrap', 'many').status).toBe(2);
    expect(slopebreak('interpret', 'x.csv', '--no-such-option').status).toBe(2);
    expect(slopebreak('frobnicate').status).toBe(2);
  });

  it('prints its version and the JSON Schema of the interpretation', () => {
    expect(slopebreak('--version').stdout.trim()).toMatch(/^\d+\.\d+\.\d+$/);
    const schema = JSON.parse(slopebreak('schema').stdout) as { properties: Record<string, unknown> };
    for (const key of ['units', 'layers', 'shots', 'refractors', 'residuals', 'warnings', 'cautions']) {
      expect(schema.properties).toHaveProperty(key);
    }
  });
});
