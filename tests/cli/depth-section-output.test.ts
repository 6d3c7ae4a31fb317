/**
 * The CLI's reversed-profile output as a user reads it: the reversed pairs, the depth section under
 * every receiver and the forward check, on the bundled Ashcombe Hollow sample (an invented demo, see
 * sample-surveys/README.md); the --pair, --datum and --no-forward-check options and their usage
 * errors. The printed depths are the JSON's (the JSON itself is checked against outside references
 * in tests/interpret/reversed-profiles.test.ts); here, that the table shows them row by row.
 */
import { describe, expect, it } from 'vitest';
import { spawnSync } from 'node:child_process';
import { join } from 'node:path';
import type { Interpretation } from '../../lib/interpretation/shape.js';

const CLI = join('dist', 'server', 'cli.js');
const SAMPLE = join('sample-surveys', 'ashcombe-hollow-undulating-bedrock.csv');

function slopebreak(...args: string[]) {
  const result = spawnSync(process.execPath, [CLI, ...args], { encoding: 'utf8', timeout: 60_000 });
  return { status: result.status, stdout: result.stdout, stderr: result.stderr };
}

describe('slopebreak interpret: the depth section', () => {
  const text = slopebreak('interpret', SAMPLE);
  const json = JSON.parse(slopebreak('interpret', SAMPLE, '--json').stdout) as Interpretation;

  it('prints the reversed pairs, one row per pair of the JSON', () => {
    expect(text.status).toBe(0);
    const block = text.stdout.slice(text.stdout.indexOf('REVERSED PAIRS'), text.stdout.indexOf('DEPTH SECTION'));
    for (const pair of json.reversedPairs) expect(block).toContain(pair.id);
  });

  it('prints the depth under every receiver by plus-minus and GRM, the rows equal to the JSON points', () => {
    const start = text.stdout.indexOf('DEPTH SECTION, INTERFACE 1');
    expect(start).toBeGreaterThan(0);
    const block = text.stdout.slice(start, text.stdout.indexOf('FORWARD CHECK'));
    const table = block.slice(0, block.indexOf('  seams'));
    const rows = table.split('\n').filter((line) => /^\s+\d/.test(line));
    const grm = json.refractors.find((refractor) => refractor.method.startsWith('generalized'))!;
    const plus = json.refractors.find((refractor) => refractor.method.startsWith('plus-minus'))!;
    const positions = new Set([...grm.points, ...plus.points].map((point) => point.x));
    expect(rows).toHaveLength(positions.size);
    // A row in the middle: x, the plus-minus depth and the GRM depth as the JSON has them (2 decimals at these SEs).
    const point = grm.points[Math.floor(grm.points.length / 2)]!;
    const row = rows.find((line) => line.trim().startsWith(`${point.x.toFixed(1)} `))!;
    expect(row).toContain(point.depth.toFixed(2));
    expect(row).toContain(point.pair!);
    expect(block).toContain('seams');
  });

  it('prints the forward check overall and per shot', () => {
    const block = text.stdout.slice(text.stdout.indexOf('FORWARD CHECK'));
    expect(block).toContain(`overall RMS ${json.forwardCheck!.overallRms!.toFixed(2)}`);
    for (const shot of json.forwardCheck!.perShot) expect(block).toContain(shot.shot);
    expect(block).toContain('worst receivers');
  });

  it('--pair limits the pairs to those named; --no-forward-check drops the check', () => {
    const run = slopebreak('interpret', SAMPLE, '--json', '--pair', 'S1-W:S1-E', '--pair', 'S2-W:S2-E', '--no-forward-check');
    expect(run.status).toBe(0);
    const result = JSON.parse(run.stdout) as Interpretation;
    expect(new Set(result.reversedPairs.map((pair) => pair.id))).toEqual(new Set(['S1-W → S1-E', 'S2-W → S2-E']));
    expect(result.forwardCheck).toBeNull();
    expect(slopebreak('interpret', SAMPLE, '--no-forward-check').stdout).not.toContain('FORWARD CHECK');
  });

  it('a malformed --pair or --datum is a usage error (exit 2) naming the option and the form it takes', () => {
    const pair = slopebreak('interpret', SAMPLE, '--pair', 'S1-W');
    expect(pair.status).toBe(2);
    expect(pair.stderr).toContain('--pair takes FORWARD:REVERSE');
    const datum = slopebreak('interpret', SAMPLE, '--datum', 'sea-level');
    expect(datum.status).toBe(2);
    expect(datum.stderr).toContain('--datum takes an elevation in metres');
  });
});
