/**
 * Reference-test assertions that put the source of the expected value in the failure message.
 */
import { expect } from 'vitest';

/** |actual − expected| ≤ tolerance (absolute). */
export function expectWithin(actual: number | null | undefined, expected: number, tolerance: number, source: string): void {
  const error = Math.abs((actual ?? Number.NaN) - expected);
  expect(
    typeof actual === 'number' && Number.isFinite(actual) && error <= tolerance,
    `${source}: got ${actual}, expected ${expected} ± ${tolerance} (off by ${error})`,
  ).toBe(true);
}

/** |actual − expected| ≤ relativeTolerance·|expected|. */
export function expectRelative(actual: number | null | undefined, expected: number, relativeTolerance: number, source: string): void {
  const value = actual ?? Number.NaN;
  // An expected value of exactly zero can only be matched absolutely.
  const error = expected === 0 ? Math.abs(value) : Math.abs(value - expected) / Math.abs(expected);
  expect(
    typeof actual === 'number' && Number.isFinite(actual) && error <= relativeTolerance,
    `${source}: got ${actual}, expected ${expected} within ${relativeTolerance * 100}% (off by ${(error * 100).toPrecision(3)}%)`,
  ).toBe(true);
}

/** Number of agreeing significant digits, −log10(|got − cert| / |cert|), as NIST StRD counts them. */
export function digitsOfAgreement(actual: number, certified: number): number {
  if (actual === certified) return 16;
  return -Math.log10(Math.abs(actual - certified) / Math.abs(certified));
}

export function expectDigits(actual: number, certified: number, digits: number, source: string): void {
  const got = digitsOfAgreement(actual, certified);
  expect(got >= digits, `${source}: got ${actual}, certified ${certified}: ${got.toFixed(1)} digits, need ${digits}`).toBe(true);
}
