/**
 * readPickTable on large inputs: a 10⁵-row table parses quickly, and inputs over the size limit
 * are refused before any decoding, with the line where the limit falls.
 *
 * The 10⁵ picks follow a direct wave, t = |x_receiver − x_source| / V (common practice), so each
 * time can be checked against the model it came from.
 */
import { describe, expect, it } from 'vitest';
import { DEFAULT_MAX_BYTES, readPickTable } from '../../lib/picks/index.js';
import { expectWithin } from '../helpers/expect-within.js';

const SHOTS = 1000;
const RECEIVERS_PER_SHOT = 100;
const DIRECT_WAVE_VELOCITY = 1500; // m/s
/**
 * Parse-time budget for 10⁵ rows: about 0.3 s was measured on the development machine; the
 * budget leaves over ten times that for a slow or busy CI runner while still catching a parser
 * that went quadratic (which would take minutes).
 */
const PARSE_BUDGET_MS = 5000;
/** Times are written with 6 decimals in ms, so they agree with the model to 0.5e-6 ms = 5e-10 s. */
const WRITTEN_TIME_TOLERANCE = 5e-10;

describe('readPickTable at scale', () => {
  it('readPickTable parses a 100,000-row table within the time budget', () => {
    const rows = ['shot,receiver,source_x_m,receiver_x_m,time_ms,sigma_ms'];
    for (let shot = 0; shot < SHOTS; shot += 1) {
      const sourceX = shot * 0.5;
      for (let receiver = 0; receiver < RECEIVERS_PER_SHOT; receiver += 1) {
        const receiverX = receiver * 5;
        const timeMs = (Math.abs(receiverX - sourceX) / DIRECT_WAVE_VELOCITY) * 1000;
        rows.push(`P${shot},G${receiver},${sourceX},${receiverX},${timeMs.toFixed(6)},0.3`);
      }
    }
    const bytes = Buffer.from(`${rows.join('\n')}\n`);
    const started = performance.now();
    const outcome = readPickTable(bytes);
    const elapsed = performance.now() - started;
    expect(outcome.ok).toBe(true);
    if (!outcome.ok) return;
    expect(outcome.value.picks).toHaveLength(SHOTS * RECEIVERS_PER_SHOT);
    expect(outcome.value.shotIds).toHaveLength(SHOTS);
    for (const index of [0, 1, 12_345, 99_999]) {
      const pick = outcome.value.picks[index];
      if (pick === undefined) throw new Error(`no pick ${index}`);
      expectWithin(pick.time, Math.abs(pick.receiverX - pick.sourceX) / DIRECT_WAVE_VELOCITY, WRITTEN_TIME_TOLERANCE, 'direct-wave model t = |x|/V (common practice)');
    }
    expect(elapsed, `parse took ${elapsed.toFixed(0)} ms`).toBeLessThan(PARSE_BUDGET_MS);
  });

  it('readPickTable refuses a 200 MiB table of valid rows when maxBytes is lowered to 100 MiB, naming the line', () => {
    const row = 'S1,0,10,25\n';
    const bytes = Buffer.alloc(200 * 2 ** 20, row);
    const maxBytes = 100 * 2 ** 20;
    const outcome = readPickTable(bytes, { maxBytes });
    expect(outcome.ok).toBe(false);
    if (outcome.ok) return;
    // Byte `maxBytes` (0-based) is the first one over the limit; each row is `row.length` bytes.
    const limitLine = 1 + Math.floor(maxBytes / row.length);
    expect(outcome.problems).toEqual([expect.objectContaining({ code: 'input-too-large', severity: 'error', line: limitLine, column: null })]);
    expect(outcome.problems[0]?.message).toContain('209,715,200 bytes (200.0 MiB)');
    expect(outcome.problems[0]?.message).toContain('104,857,600 bytes (100.0 MiB)');
    expect(outcome.problems[0]?.fix).toMatch(/split the survey .* by shot, or raise the limit/);
  });

  it('readPickTable refuses 270 MiB with the default 256 MiB limit, on line 1 when no line break comes first', () => {
    const bytes = Buffer.alloc(270 * 2 ** 20, 0x41);
    const started = performance.now();
    const outcome = readPickTable(bytes);
    const elapsed = performance.now() - started;
    expect(outcome.ok).toBe(false);
    if (outcome.ok) return;
    expect(outcome.problems).toEqual([expect.objectContaining({ code: 'input-too-large', line: 1 })]);
    expect(outcome.problems[0]?.message).toContain(`over the limit of 268,435,456 bytes (256.0 MiB)`);
    expect(DEFAULT_MAX_BYTES).toBe(256 * 2 ** 20);
    // No decoding or splitting: only a scan for line breaks, far below a parse of 270 MiB.
    expect(elapsed, `size check took ${elapsed.toFixed(0)} ms`).toBeLessThan(PARSE_BUDGET_MS);
  });

  it('readPickTable measures a text by its UTF-8 size, not its length', () => {
    const header = 'shot,source_x_m,receiver_x_m,time_ms\n';
    const text = `${header}${'Ö'.repeat(30)},0,10,25\n`;
    // 37 header bytes, then each Ö is 2 bytes in UTF-8 (RFC 3629): 37 + 60 + 9 = 106 bytes in 76 code units.
    const outcome = readPickTable(text, { maxBytes: 80 });
    expect(outcome.ok ? [] : outcome.problems).toEqual([
      expect.objectContaining({ code: 'input-too-large', line: 2, message: expect.stringContaining('is 106 bytes') }),
    ]);
    const atLimit = readPickTable(text, { maxBytes: 106 });
    expect(atLimit.ok ? [] : atLimit.problems.map((problem) => problem.code)).toEqual(['shot-too-few-picks']);
  });
});
