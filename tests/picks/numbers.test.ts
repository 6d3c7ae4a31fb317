/**
 * Strict decimals and exact unit scaling (lib/picks/numbers.ts).
 *
 * Outside references: the international foot is 0.3048 m exactly (NIST SP 811, 2008, appendix B;
 * recalled from memory); Python's `fractions.Fraction` (standard library) computes the exact
 * product of a decimal and a unit size, and `float()` of a Fraction is correctly rounded, so it is
 * the oracle for "the double nearest the exact value".
 */
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { LENGTH_UNITS, TIME_UNITS } from '../../lib/units.js';
import { decimalScale, readDecimal, UNIT_SCALE, writeDecimal } from '../../lib/picks/numbers.js';
import { runPythonJson } from '../helpers/python.js';

const FOOT = decimalScale(LENGTH_UNITS.ft);
const KILOMETRE = decimalScale(LENGTH_UNITS.km);
const MILLISECOND = decimalScale(TIME_UNITS.ms);
const SEED = 20240611;

function valueOf(text: string, scale = UNIT_SCALE): number {
  const reading = readDecimal(text, scale);
  if (!reading.ok) throw new Error(`${text} was refused: ${reading.fault}`);
  return reading.value;
}

describe('readDecimal syntax', () => {
  it.each(['12', '-12', '+12', '12.5', '12.', '.5', '-.5', '1e3', '1E-3', '1.5e+3', '007', '0.000'])(
    'readDecimal accepts the plain decimal %s with the value Number gives it',
    (text) => {
      expect(valueOf(text)).toBe(Number(text) === 0 ? 0 : Number(text));
    },
  );

  it.each([
    ['', 'empty'],
    [' 1 ', 'syntax'],
    ['0x10', 'syntax'],
    ['0b1', 'syntax'],
    ['1,5', 'syntax'],
    ['1_000', 'syntax'],
    ['1.2.3', 'syntax'],
    ['.', 'syntax'],
    ['-', 'syntax'],
    ['e5', 'syntax'],
    ['1e', 'syntax'],
    ['1e+', 'syntax'],
    ['12ms', 'syntax'],
    ['١٢', 'syntax'],
    ['NaN', 'not-finite'],
    ['nan', 'not-finite'],
    ['Infinity', 'not-finite'],
    ['-inf', 'not-finite'],
    ['1e999', 'overflow'],
    ['-1e309', 'overflow'],
  ])('readDecimal refuses %j as %s', (text, fault) => {
    expect(readDecimal(text)).toEqual({ ok: false, fault });
  });

  it('readDecimal turns -0 into 0 and an underflowing decimal into 0', () => {
    expect(Object.is(valueOf('-0'), 0)).toBe(true);
    expect(Object.is(valueOf('-1e-999'), 0)).toBe(true);
  });

  it('readDecimal reports overflow when the unit scaling, not the cell, leaves the double range', () => {
    expect(valueOf('1e308')).toBe(1e308);
    expect(readDecimal('1e308', KILOMETRE)).toEqual({ ok: false, fault: 'overflow' });
  });

  it('readDecimal clamps an exponent of more than eleven digits and still gives 0 or overflow', () => {
    expect(readDecimal('1e99999999999999999999', MILLISECOND)).toEqual({ ok: false, fault: 'overflow' });
    expect(valueOf('1e-99999999999999999999', KILOMETRE)).toBe(0);
  });
});

describe('readDecimal unit conversion', () => {
  it('readDecimal reads feet as 0.3048 m exactly (NIST SP 811: the international foot)', () => {
    // NIST SP 811 (2008) appendix B: 1 ft = 0.3048 m exactly (recalled from memory).
    expect(valueOf('1', FOOT)).toBe(0.3048);
    expect(valueOf('100', FOOT)).toBe(30.48);
    expect(valueOf('-3', FOOT)).toBe(-0.9144);
    // 5280 ft = 1 statute mile = 1609.344 m exactly (same definition).
    expect(valueOf('5280', FOOT)).toBe(1609.344);
  });

  it('readDecimal reads km as 1000 m and ms as 0.001 s with a single rounding', () => {
    expect(valueOf('1.5', KILOMETRE)).toBe(1500);
    expect(valueOf('0.001', KILOMETRE)).toBe(1);
    expect(valueOf('12.3', MILLISECOND)).toBe(0.0123);
    // 38.1149 ms from METHODS.md check case 1.1 (computed from the stated model).
    expect(valueOf('38.1149', MILLISECOND)).toBe(0.0381149);
    expect(valueOf('2.5', decimalScale(TIME_UNITS.s))).toBe(2.5);
  });

  it('readDecimal agrees bit for bit with Python fractions (exact product, one rounding)', () => {
    const texts = fc.sample(
      fc.tuple(fc.integer({ min: -99_999_999, max: 99_999_999 }), fc.integer({ min: 0, max: 9 }), fc.integer({ min: -30, max: 30 })).map(
        ([mantissa, decimals, exponent]) => {
          const digits = String(Math.abs(mantissa)).padStart(decimals + 1, '0');
          const point = digits.length - decimals;
          const sign = mantissa < 0 ? '-' : '';
          return `${sign}${digits.slice(0, point)}${decimals > 0 ? `.${digits.slice(point)}` : ''}${exponent === 0 ? '' : `e${exponent}`}`;
        },
      ),
      { seed: SEED, numRuns: 400 },
    );
    const sizes = { ft: LENGTH_UNITS.ft, km: LENGTH_UNITS.km, ms: TIME_UNITS.ms };
    const expected = runPythonJson<Record<string, string[]>>(
      [
        'import json, sys',
        'from fractions import Fraction',
        'request = json.load(sys.stdin)',
        // repr(float) is the shortest round-trip decimal, like ECMAScript String(number).
        "out = {unit: [repr(float(Fraction(t) * Fraction(size))) for t in request['texts']] for unit, size in request['sizes'].items()}",
        'print(json.dumps(out))',
      ].join('\n'),
      { texts, sizes: { ft: '0.3048', km: '1000', ms: '0.001' } },
      ['fractions', 'json'],
    );
    for (const [unit, size] of Object.entries(sizes)) {
      const scale = decimalScale(size);
      texts.forEach((text, index) => {
        const oracle = Number(expected[unit]?.[index]);
        expect(valueOf(text, scale), `Python Fraction(${text}) * ${unit}`).toBe(oracle === 0 ? 0 : oracle);
      });
    }
  });
});

describe('writeDecimal', () => {
  it('writeDecimal shifts the shortest decimal for power-of-ten units', () => {
    expect(writeDecimal(0.0123, MILLISECOND)).toBe('12.3');
    expect(writeDecimal(1500, KILOMETRE)).toBe('1.5');
    expect(writeDecimal(2.5e-9, MILLISECOND)).toBe('0.0000025');
    expect(writeDecimal(1e300, MILLISECOND)).toBe('1e303');
    expect(writeDecimal(-0, UNIT_SCALE)).toBe('0');
  });

  it('writeDecimal then readDecimal gives back the identical double in m, km, ms and s', () => {
    const scales = [UNIT_SCALE, KILOMETRE, MILLISECOND, decimalScale(TIME_UNITS.s)];
    fc.assert(
      fc.property(fc.double({ noNaN: true, noDefaultInfinity: true, min: -1e300, max: 1e300 }), fc.constantFrom(...scales), (value, scale) => {
        expect(valueOf(writeDecimal(value, scale), scale)).toBe(value === 0 ? 0 : value);
      }),
      { seed: SEED, numRuns: 2000 },
    );
  });

  it('writeDecimal in feet reads back within two units in the last place', () => {
    // Division by 0.3048 and the exact re-multiplication each round once: at most 2 ulp apart.
    const TWO_ULP = 2 * Number.EPSILON;
    fc.assert(
      fc.property(fc.double({ noNaN: true, noDefaultInfinity: true, min: -1e6, max: 1e6 }), (value) => {
        const back = valueOf(writeDecimal(value, FOOT), FOOT);
        expect(Math.abs(back - value)).toBeLessThanOrEqual(TWO_ULP * Math.abs(value));
      }),
      { seed: SEED, numRuns: 1000 },
    );
  });

  it('writeDecimal refuses a value that is not finite, or overflows in the unit', () => {
    expect(() => writeDecimal(Number.NaN)).toThrow(/cannot write NaN/);
    expect(() => writeDecimal(1.7e308, MILLISECOND)).not.toThrow();
    expect(() => writeDecimal(1.7e308, FOOT)).toThrow(/finite decimal/);
  });

  it('decimalScale refuses a unit size that is not finite and positive', () => {
    expect(decimalScale(0.3048)).toEqual({ coefficient: 3048n, exponent: -4, size: 0.3048 });
    expect(() => decimalScale(0)).toThrow(/finite positive/);
    expect(() => decimalScale(Number.POSITIVE_INFINITY)).toThrow(/finite positive/);
  });
});
