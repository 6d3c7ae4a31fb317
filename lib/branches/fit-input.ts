/**
 * What every line fit refuses before it starts, as a value (`FitRefusal`), in one place so the
 * least-squares, Theil–Sen and Huber fits refuse the same input the same way.
 *
 * A fit is refused, in this order of checks, when:
 * - an offset or time is not a finite number, or a sigma that the fit uses is not a positive
 *   finite number (`not-finite`, naming the first such pick by its 1-based position);
 * - there are too few picks for a line *with* an uncertainty (`too-few-picks`): a free line needs
 *   3 picks and a line through the origin 2 (one residual degree of freedom for σ̂), except a
 *   weighted least-squares fit, whose sigmas are absolute, which needs only as many picks as
 *   parameters (2 free, 1 through the origin);
 * - the offsets cannot fix a slope (`offsets-all-equal`): every offset equal (free line), or every
 *   offset zero (line through the origin).
 * Arrays of different lengths are a programming error and throw.
 */
import type { FitRefusal } from './types.js';

export interface FitInputRules {
  readonly throughOrigin: boolean;
  /** True when the fit weights picks by the sigmas (absolute uncertainties). */
  readonly weighted: boolean;
}

export function refuseFitInput(
  offsets: readonly number[],
  times: readonly number[],
  sigmas: readonly number[] | null,
  rules: FitInputRules,
): FitRefusal | null {
  if (offsets.length !== times.length || (sigmas !== null && sigmas.length !== offsets.length)) {
    throw new RangeError(
      `line fit: offsets (${offsets.length}), times (${times.length})${sigmas ? ` and sigmas (${sigmas.length})` : ''} must have the same length`,
    );
  }
  const count = offsets.length;
  for (let position = 0; position < count; position += 1) {
    const offset = offsets[position] as number;
    const time = times[position] as number;
    if (!Number.isFinite(offset) || !Number.isFinite(time)) {
      return refusal(
        'not-finite',
        `pick ${position + 1} of ${count} has offset ${offset} m and time ${time} s, which is not a finite number; ` +
          'remove the pick or correct the value in the pick table',
      );
    }
    if (rules.weighted && sigmas !== null) {
      const sigma = sigmas[position] as number;
      if (!(sigma > 0) || !Number.isFinite(sigma)) {
        return refusal(
          'not-finite',
          `pick ${position + 1} of ${count} has sigma ${sigma} s, so its weight 1/σ² is not a finite positive number; ` +
            'give every pick a positive uncertainty or leave the sigma column out',
        );
      }
    }
  }
  const parameters = rules.throughOrigin ? 1 : 2;
  const needed = rules.weighted ? parameters : parameters + 1;
  if (count < needed) {
    const line = rules.throughOrigin ? 'a line through the origin' : 'a line with a free intercept';
    const reason = rules.weighted ? '' : ' so that its scatter gives a standard error';
    return refusal(
      'too-few-picks',
      `${line} needs at least ${needed} picks${reason}, found ${count}; add picks or merge the branch with its neighbour`,
    );
  }
  const first = offsets[0] as number;
  const degenerate = rules.throughOrigin ? offsets.every((offset) => offset === 0) : offsets.every((offset) => offset === first);
  if (degenerate) {
    return refusal(
      'offsets-all-equal',
      rules.throughOrigin
        ? `all ${count} picks are at zero offset, so no slope can be fitted through the origin; add picks away from the source`
        : `all ${count} picks are at the same offset (${first} m), so no slope can be fitted; add picks at other offsets`,
    );
  }
  return null;
}

function refusal(code: FitRefusal['code'], message: string): FitRefusal {
  return { ok: false, code, message };
}
