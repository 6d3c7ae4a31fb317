/**
 * The CLI's crustal options on the bundled crustal sample (invented data): --earth, --no-time-terms
 * and --time-term-gradient reach the pipeline (their values are echoed in the JSON options), a bad
 * --earth value is a usage error (exit 2) naming the choices, and the text summary shows the
 * earth-curvature and time-term blocks with the phase names of the trade (Pg, Pn).
 */
import { describe, expect, it } from 'vitest';
import { spawnSync } from 'node:child_process';
import type { Interpretation } from '../../lib/interpretation/shape.js';

const CLI = 'dist/server/cli.js';
const SAMPLE = 'sample-surveys/vellmark-crustal-profile.csv';
const slopebreak = (...args: string[]) => spawnSync(process.execPath, [CLI, ...args], { encoding: 'utf8', timeout: 120_000, maxBuffer: 256 * 1024 * 1024 });

describe('crustal options of slopebreak interpret', () => {
  it('prints the earth-curvature and time-term blocks on the crustal sample, in km, s and km/s', () => {
    const run = slopebreak('interpret', SAMPLE);
    expect(run.status).toBe(0);
    expect(run.stdout).toContain('EARTH CURVATURE  spherical earth (asked: auto)');
    expect(run.stdout).toContain('TIME TERMS  (Pn, branch 2');
    expect(run.stdout).toMatch(/\n {2}1 +Pg +6\.2/);
    expect(run.stdout).toContain('station-off-line');
  });

  it('passes --earth flat, --no-time-terms and --time-term-gradient to the pipeline', () => {
    const flat = JSON.parse(slopebreak('interpret', SAMPLE, '--json', '--earth', 'flat', '--no-time-terms').stdout) as Interpretation;
    expect(flat.options.earthModel).toBe('flat');
    expect(flat.options.timeTerms).toBe(false);
    expect(flat.timeTerms).toBeNull();
    expect(flat.earthCurvature!.applied).toBe(false);
    expect(flat.warnings.some((warning) => warning.code === 'flat-earth-bias')).toBe(true);
    const gradient = JSON.parse(slopebreak('interpret', SAMPLE, '--json', '--time-term-gradient').stdout) as Interpretation;
    expect(gradient.options.timeTermGradient).toBe(true);
    expect(gradient.timeTerms).not.toBeNull();
  });

  it('solves time terms by default on crustal tables only; --time-terms turns them on for an engineering line (common practice: Pn delays are the crustal reading; engineering lines use delay-time sections)', () => {
    const engineering = 'sample-surveys/millbrook-quarry-bedrock.csv';
    const plain = JSON.parse(slopebreak('interpret', engineering, '--json').stdout) as Interpretation;
    expect(plain.options.timeTerms).toBe(false);
    expect(plain.timeTerms).toBeNull();
    const asked = JSON.parse(slopebreak('interpret', engineering, '--json', '--time-terms').stdout) as Interpretation;
    expect(asked.options.timeTerms).toBe(true);
    expect(asked.timeTerms).not.toBeNull();
    const both = slopebreak('interpret', engineering, '--time-terms', '--no-time-terms');
    expect(both.status).toBe(2);
    expect(both.stderr).toContain('contradict');
  });

  it('refuses an unknown earth model with exit 2 and the choices', () => {
    const run = slopebreak('interpret', SAMPLE, '--earth', 'round');
    expect(run.status).toBe(2);
    expect(run.stderr).toContain('--earth takes auto, flat or spherical, got "round"');
  });
});
