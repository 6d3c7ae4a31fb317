/**
 * The CLI's reversed-profile text (server/summary.ts) where a long line makes it long: more seams
 * than the text lists (the JSON has them all), and the forward check's grid notes.
 *
 * The survey: a plane two-layer model (500/2000 m/s over 6 m; closed-form first arrivals, METHODS
 * §1) with seeded pick noise of 0.2 ms, shots every 40 m along 400 m of receivers every 2 m, so
 * that the depth section changes pair at many places. What the text must show is what the JSON of
 * the same run holds; the number of seams listed is the summary's stated limit (SEAMS_SHOWN = 8,
 * "the ones whose step stands out most", in x order).
 */
import { afterAll, describe, expect, it } from 'vitest';
import { spawnSync } from 'node:child_process';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { readPickTable } from '../../lib/picks/index.js';
import { interpret } from '../../lib/interpret.js';
import type { Interpretation } from '../../lib/interpretation/shape.js';
import { forwardCheck } from '../../lib/model/forward-check.js';
import { seededNormal } from '../../lib/random.js';
import { formatSummary } from '../../server/summary.js';
import { range } from '../helpers/synthetic-survey.js';

const CLI = join('dist', 'server', 'cli.js');
const SEAMS_SHOWN = 8;

function slopebreak(...args: string[]) {
  const result = spawnSync(process.execPath, [CLI, ...args], { encoding: 'utf8', timeout: 120_000, maxBuffer: 256 * 1024 * 1024 });
  return { status: result.status, stdout: result.stdout, stderr: result.stderr };
}

/** Closed-form first arrivals (METHODS §1) of shots at `shots` on receivers 0…`length` m every 2 m, with seeded noise σ (s), as a pick table. */
function pickTable(shots: readonly number[], sigma: number, seed: number, length = 400): string {
  const tau = 2 * 6 * Math.sqrt(1 / 500 ** 2 - 1 / 2000 ** 2);
  const normal = seededNormal(seed);
  const lines = ['shot,source_x_m,receiver_x_m,time_ms'];
  shots.forEach((sourceX, k) => {
    for (const receiverX of range(length / 2 + 1, 0, 2)) {
      if (receiverX === sourceX) continue;
      const offset = Math.abs(receiverX - sourceX);
      lines.push([`S${k + 1}`, sourceX, receiverX, ((Math.min(offset / 500, offset / 2000 + tau) + sigma * normal()) * 1000).toFixed(3)].join(','));
    }
  });
  return `${lines.join('\n')}\n`;
}

/** The seam list printed under a depth section: each "x: (pair) to (pair), step …" entry. */
function printedSeams(text: string, iface: number): { header: string; entries: string[] } {
  const lines = text.split('\n');
  const start = lines.findIndex((line) => line.startsWith(`DEPTH SECTION, INTERFACE ${iface} `));
  const at = lines.findIndex((line, k) => k > start && line.startsWith('  seams'));
  expect(start, 'the depth section is printed').toBeGreaterThanOrEqual(0);
  expect(at, 'a seam list is printed').toBeGreaterThan(start);
  const body: string[] = [];
  for (let k = at + 1; k < lines.length && lines[k]!.startsWith('    '); k += 1) body.push(lines[k]!.trim());
  return { header: lines[at]!, entries: body.join(' ').split('; ') };
}

const grmSection = (result: Interpretation, iface = 1) => result.refractors.find((refractor) => refractor.interface === iface && refractor.method.startsWith('generalized'))!;

describe('slopebreak interpret: a long line with more seams than the text lists', () => {
  const folder = mkdtempSync(join(tmpdir(), 'slopebreak-seams-'));
  afterAll(() => rmSync(folder, { recursive: true, force: true }));
  const file = join(folder, 'long-line.csv');
  writeFileSync(file, pickTable(range(11, 0, 40), 0.0002, 3));
  const text = slopebreak('interpret', file);
  const jsonRun = slopebreak('interpret', file, '--json');
  const json = JSON.parse(jsonRun.stdout) as Interpretation;

  it(`prints the number of seams and only the ${SEAMS_SHOWN} whose steps are largest in standard errors, in x order`, () => {
    expect(text.status).toBe(0);
    expect(jsonRun.status).toBe(0);
    const seams = grmSection(json).seams!;
    // Precondition: many more seams than are listed.
    expect(seams.length).toBeGreaterThan(2 * SEAMS_SHOWN);
    const { header, entries } = printedSeams(text.stdout, 1);
    expect(header).toContain(`seams: ${seams.length} (the pair changes); the ${SEAMS_SHOWN} largest steps in standard errors`);
    expect(header).toContain('all of them in the JSON');
    expect(entries).toHaveLength(SEAMS_SHOWN);
    // Source: the JSON of the same run. Which seams: the largest |step|/SE of the JSON's (a seam without common receivers last), shown by x.
    const ratio = (seam: (typeof seams)[number]) => (seam.step === null ? -1 : Math.abs(seam.step) / Math.max(seam.stepSE ?? 0, 1e-9));
    const chosen = [...seams].sort((left, right) => ratio(right) - ratio(left)).slice(0, SEAMS_SHOWN).sort((left, right) => left.x - right.x);
    expect(entries.map((entry) => entry.split(':')[0])).toEqual(chosen.map((seam) => seam.x.toFixed(1)));
    // Each entry names the pairs on either side as the JSON does.
    entries.forEach((entry, k) => expect(entry).toContain(`(${chosen[k]!.fromPair}) to (${chosen[k]!.toPair}), step `));
    // Every unlisted seam stands out no more than the least of those listed.
    const least = Math.min(...chosen.map(ratio));
    for (const seam of seams.filter((entry) => !chosen.includes(entry))) expect(ratio(seam)).toBeLessThanOrEqual(least);
  });

  it('ranks seams by step in standard errors, not by step alone; a seam without common receivers comes last', () => {
    const section = grmSection(json);
    const [from, to] = [section.seams![0]!.fromPair, section.seams![0]!.toPair];
    // x = 10: a 1 m step of SE 10 m (0.1 SE); x = 20: no common receivers; x = 30…120: 0.05·k m of SE 0.01 m (5·k SE).
    const seams = [
      { x: 10, fromPair: from, toPair: to, step: 1, stepSE: 10, commonReceivers: 5 },
      { x: 20, fromPair: from, toPair: to, step: null, stepSE: null, commonReceivers: 0 },
      ...range(10, 1, 1).map((k) => ({ x: 20 + 10 * k, fromPair: from, toPair: to, step: 0.05 * k, stepSE: 0.01, commonReceivers: 5 })),
    ];
    const edited: Interpretation = { ...json, refractors: json.refractors.map((refractor) => (refractor === section ? { ...refractor, seams } : refractor)) };
    const { header, entries } = printedSeams(formatSummary(edited), 1);
    // Source: the steps and SEs given here — ranked by |step|/SE (5·k for x = 20 + 10k; 0.1 for x = 10; none for x = 20).
    expect(header).toContain(`seams: 12 (the pair changes); the ${SEAMS_SHOWN} largest steps in standard errors`);
    expect(entries.map((entry) => entry.split(':')[0])).toEqual(['50.0', '60.0', '70.0', '80.0', '90.0', '100.0', '110.0', '120.0']);
  });

  it(`with exactly ${SEAMS_SHOWN} seams the text lists them all, under the plain heading`, () => {
    const section = grmSection(json);
    const eight = section.seams!.slice(0, SEAMS_SHOWN);
    const trimmed: Interpretation = { ...json, refractors: json.refractors.map((refractor) => (refractor === section ? { ...refractor, seams: eight } : refractor)) };
    const { header, entries } = printedSeams(formatSummary(trimmed), 1);
    // Source: the JSON's seams — at the limit, nothing is left out, so nothing is ranked.
    expect(header).toBe('  seams (the pair changes; step = new pair − old pair where both cover, m):');
    expect(entries.map((entry) => entry.split(':')[0])).toEqual(eight.map((seam) => seam.x.toFixed(1)));
  });
});

describe('formatSummary: the forward check\'s grid notes', () => {
  // A short line (three shots 100 m apart): a forward check on the default grid, without notes.
  const outcome = readPickTable(pickTable([0, 100, 200], 0, 1, 200));
  if (!outcome.ok) throw new Error(outcome.problems.map((problem) => problem.message).join('; '));
  const result = interpret(outcome.value);

  it('prints no grid note when the forward check has none', () => {
    // Source: the JSON of the same run (no notes on a default grid for a 200 m line).
    expect(result.forwardCheck).not.toBeNull();
    expect(result.forwardCheck!.notes).toEqual([]);
    expect(formatSummary(result)).not.toContain('grid note');
  });

  it('prints each grid note, prefixed "grid note: ", in the FORWARD CHECK block (a node budget too small for the grid: spacing-coarsened)', () => {
    // A real note: the same kind of section checked with a budget of 2 000 nodes, which no CLI option reaches.
    const tiny = forwardCheck(
      { velocities: [500, 2000], interfaces: [{ x: [0], depth: [6] }] },
      [{ id: 'S1', x: 0, depth: 0 }],
      range(50, 2, 4).map((receiverX) => ({ shot: 'S1', receiverX, time: receiverX / 2000 })),
      { maxNodes: 2000 },
    );
    const notes = tiny.notes.map((note) => note.message);
    expect(tiny.notes.map((note) => note.code)).toEqual(['spacing-coarsened']);
    const withNotes: Interpretation = { ...result, forwardCheck: { ...result.forwardCheck!, notes: [...notes, 'interface 1 rises to -0.5 m, above the ground; it was held at the surface (depth 0) there'] } };
    const text = formatSummary(withNotes);
    // Source: the notes given (one from the grid solver itself, one written here): each printed whole, in order.
    const block = text.slice(text.indexOf('FORWARD CHECK'), text.indexOf('worst receivers'));
    const printed = block
      .split('\n')
      .filter((line) => line.startsWith('  '))
      .map((line) => line.trim())
      .join(' ')
      .split('grid note: ')
      .slice(1)
      .map((entry) => entry.trim());
    expect(printed).toEqual([...notes, 'interface 1 rises to -0.5 m, above the ground; it was held at the surface (depth 0) there']);
    for (const line of block.split('\n').filter((entry) => entry.includes('grid note: '))) expect(line.startsWith('  grid note: ')).toBe(true);
  });
});
