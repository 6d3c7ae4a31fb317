/**
 * timeTermDepth and timeTermDepths (lib/depth/time-term-depth.ts) against METHODS.md check case
 * 7.2 (values computed from the stated model, not published), closed forms, and central
 * differences of the depth formula (an independent route to the first-order SEs, relative step
 * 1e-6 as METHODS §3 asks).
 */
import { describe, expect, it } from 'vitest';
import { timeTermDepth, timeTermDepths, type Overburden } from '../../lib/depth/time-term-depth.js';
import { timeTerms, type TimeTermPick } from '../../lib/depth/time-term.js';
import type { Estimate } from '../../lib/depth/dipping-layer.js';
import { seededNormal } from '../../lib/random.js';
import { expectRelative, expectWithin } from '../helpers/expect-within.js';

const SOURCE_7_2 = 'METHODS.md check case 7.2 (computed from the stated model, not published)';
/** Half a unit in the third decimal of a depth printed in km. */
const HALF_MILLIMETRE_OF_KM = 0.5;
/** Central differences at relative step 1e-6 against the analytic first-order SE: ~1e-9 seen; 1e-6 relative. */
const DIFFERENCE_RELATIVE = 1e-6;

const exact = (value: number): Estimate => ({ value, standardError: 0 });

/** The depth formula written out afresh, for differencing: H from a, V_1…V_{n−1}, h_1…h_{n−2}, V_n. */
function depthFormula(timeTerm: number, velocities: readonly number[], upper: readonly number[], refractor: number): { thickness: number; depth: number } {
  const q = (velocity: number): number => Math.sqrt(1 / velocity ** 2 - 1 / refractor ** 2);
  let remaining = timeTerm;
  upper.forEach((thickness, index) => (remaining -= thickness * q(velocities[index]!)));
  const thickness = remaining / q(velocities[velocities.length - 1]!);
  return { thickness, depth: upper.reduce((sum, value) => sum + value, 0) + thickness };
}

/** First-order SE by central differences over (a, V_1…V_{n−1}, h_1…h_{n−2}, V_n), with Cov(a, V_n). */
function differencedSE(
  timeTerm: Estimate,
  velocities: readonly Estimate[],
  upper: readonly Estimate[],
  refractor: Estimate,
  covarianceTermVelocity: number,
  pick: 'thickness' | 'depth',
): number {
  const inputs = [timeTerm.value, ...velocities.map((v) => v.value), ...upper.map((h) => h.value), refractor.value];
  const errors = [timeTerm.standardError, ...velocities.map((v) => v.standardError), ...upper.map((h) => h.standardError), refractor.standardError];
  const evaluate = (values: number[]): number => {
    const n = velocities.length;
    return depthFormula(values[0]!, values.slice(1, 1 + n), values.slice(1 + n, 1 + n + upper.length), values[values.length - 1]!)[pick];
  };
  const gradient = inputs.map((value, index) => {
    const step = 1e-6 * Math.abs(value);
    const plus = [...inputs];
    const minus = [...inputs];
    plus[index] = value + step;
    minus[index] = value - step;
    return (evaluate(plus) - evaluate(minus)) / (2 * step);
  });
  let variance = gradient.reduce((sum, derivative, index) => sum + (derivative * errors[index]!) ** 2, 0);
  variance += 2 * gradient[0]! * gradient[gradient.length - 1]! * covarianceTermVelocity;
  return Math.sqrt(variance);
}

describe('timeTermDepth: METHODS.md check case 7.2', () => {
  it('timeTermDepth gives H = 33.733 km for a 3.3 s time term, crust 6.3 km/s over Pn 8.0 km/s', () => {
    const result = timeTermDepth(exact(3.3), { velocities: [exact(6300)], upperThicknesses: [] }, exact(8000));
    expect(result.ok).toBe(true);
    if (!result.ok) return;
    expectWithin(result.depth.value, 33_733, HALF_MILLIMETRE_OF_KM, `${SOURCE_7_2}: H`);
    expectWithin(result.thickness.value, 33_733, HALF_MILLIMETRE_OF_KM, `${SOURCE_7_2}: one layer, h = H`);
    expect(result.depthBelowSeaLevel).toBeNull();
  });

  it('timeTermDepth gives a lower crust of 10.314 km and the Moho at 30.314 km under 20 km of 5.8 km/s over 6.5 km/s', () => {
    const result = timeTermDepth(exact(3.3), { velocities: [exact(5800), exact(6500)], upperThicknesses: [exact(20_000)] }, exact(8000));
    expect(result.ok).toBe(true);
    if (!result.ok) return;
    expectWithin(result.thickness.value, 10_314, HALF_MILLIMETRE_OF_KM, `${SOURCE_7_2}: lower crust`);
    expectWithin(result.depth.value, 30_314, HALF_MILLIMETRE_OF_KM, `${SOURCE_7_2}: Moho depth`);
  });
});

describe('timeTermDepth standard errors', () => {
  it('timeTermDepth gives SE(H) = SE(a)/q for one layer with exact velocities (closed form)', () => {
    const result = timeTermDepth({ value: 3.3, standardError: 0.05 }, { velocities: [exact(6300)], upperThicknesses: [] }, exact(8000));
    if (!result.ok) throw new Error(result.message);
    const q = Math.sqrt(1 / 6300 ** 2 - 1 / 8000 ** 2);
    expectRelative(result.depth.standardError, 0.05 / q, 1e-12, 'closed form: ∂H/∂a = 1/q');
    expectRelative(result.depthConversionFactor.value, 1 / q, 1e-12, 'closed form: DCF = 1/q');
  });

  it('timeTermDepth propagates the SEs of the time term, both crustal velocities, the upper thickness and V_Pn as central differences do', () => {
    const timeTerm = { value: 3.3, standardError: 0.04 };
    const velocities = [
      { value: 5800, standardError: 60 },
      { value: 6500, standardError: 80 },
    ];
    const upper = [{ value: 20_000, standardError: 1500 }];
    const refractor = { value: 8000, standardError: 50 };
    const result = timeTermDepth(timeTerm, { velocities, upperThicknesses: upper }, refractor);
    if (!result.ok) throw new Error(result.message);
    for (const pick of ['thickness', 'depth'] as const) {
      expectRelative(result[pick].standardError, differencedSE(timeTerm, velocities, upper, refractor, 0, pick), DIFFERENCE_RELATIVE, `central differences: SE of the ${pick}`);
    }
  });

  it('timeTermDepth adds 2·(∂H/∂a)(∂H/∂V)·Cov(a, V) with Cov(a, V) = −V²·Cov(a, s), as central differences with that covariance do', () => {
    const timeTerm = { value: 3.3, standardError: 0.04 };
    const velocities = [{ value: 6300, standardError: 50 }];
    const refractor = { value: 8000, standardError: 40 };
    const slownessSE = 40 / 8000 ** 2;
    for (const correlation of [-0.8, 0.5]) {
      const covariance = correlation * timeTerm.standardError * slownessSE;
      const result = timeTermDepth(timeTerm, { velocities, upperThicknesses: [] }, refractor, { timeTermSlownessCovariance: covariance });
      if (!result.ok) throw new Error(result.message);
      const expected = differencedSE(timeTerm, velocities, [], refractor, -(8000 ** 2) * covariance, 'depth');
      expectRelative(result.depth.standardError, expected, DIFFERENCE_RELATIVE, `central differences with ρ(a, s) = ${correlation}`);
      const independent = timeTermDepth(timeTerm, { velocities, upperThicknesses: [] }, refractor);
      if (!independent.ok) throw new Error(independent.message);
      // ∂H/∂a > 0 and ∂H/∂V < 0: a positive Cov(a, s) is a negative Cov(a, V), which adds variance.
      if (correlation > 0) expect(result.depth.standardError).toBeGreaterThan(independent.depth.standardError);
      else expect(result.depth.standardError).toBeLessThan(independent.depth.standardError);
    }
  });

  it('timeTermDepth gives the depth below sea level H − elevation, with SE √(SE_H² + SE_elev²)', () => {
    const result = timeTermDepth({ value: 3.3, standardError: 0.05 }, { velocities: [exact(6300)], upperThicknesses: [] }, exact(8000), {
      elevation: { value: 1200, standardError: 5 },
    });
    if (!result.ok) throw new Error(result.message);
    expectWithin(result.depthBelowSeaLevel!.value, result.depth.value - 1200, 1e-9, 'closed form: H − elevation');
    expectRelative(result.depthBelowSeaLevel!.standardError, Math.hypot(result.depth.standardError, 5), 1e-12, 'closed form: independent errors add in quadrature');
    const plain = timeTermDepth(exact(3.3), { velocities: [exact(6300)], upperThicknesses: [] }, exact(8000), { elevation: -40 });
    if (!plain.ok) throw new Error(plain.message);
    expectWithin(plain.depthBelowSeaLevel!.value, 33_733 + 40, HALF_MILLIMETRE_OF_KM, `${SOURCE_7_2}: a station 40 m below sea level`);
  });
});

describe('timeTermDepth at the edges', () => {
  it('timeTermDepth refuses a refractor not faster than the crust (no-head-wave)', () => {
    const result = timeTermDepth(exact(3.3), { velocities: [exact(8200)], upperThicknesses: [] }, exact(8000));
    expect(result).toMatchObject({ ok: false, code: 'no-head-wave' });
  });

  it('timeTermDepth refuses a time term smaller than the upper layers take (delay-below-upper-layers), and a negative one', () => {
    const upper = timeTermDepth(exact(2.0), { velocities: [exact(5800), exact(6500)], upperThicknesses: [exact(20_000)] }, exact(8000));
    expect(upper).toMatchObject({ ok: false, code: 'delay-below-upper-layers' });
    const negative = timeTermDepth(exact(-0.1), { velocities: [exact(6300)], upperThicknesses: [] }, exact(8000));
    expect(negative).toMatchObject({ ok: false, code: 'delay-below-upper-layers' });
  });

  it('timeTermDepth names the field and the fix on misuse', () => {
    const overburden: Overburden = { velocities: [exact(6300)], upperThicknesses: [] };
    expect(() => timeTermDepth(exact(3.3), overburden, exact(8000), { elevation: Number.NaN })).toThrow(/options.elevation must be a finite height/);
    expect(() => timeTermDepth(exact(3.3), overburden, exact(8000), { elevation: { value: 10, standardError: -1 } })).toThrow(/options.elevation must be a finite height/);
    expect(() => timeTermDepth(exact(3.3), overburden, exact(8000), { timeTermSlownessCovariance: Number.POSITIVE_INFINITY })).toThrow(/timeTermSlownessCovariance must be finite/);
    expect(() => timeTermDepth({ value: 3.3, standardError: 0.01 }, overburden, { value: 8000, standardError: 10 }, { timeTermSlownessCovariance: 1e-8 })).toThrow(
      /exceeds SE\(a\)·SE\(s\).*a correlation beyond ±1/,
    );
    expect(() => timeTermDepth({ value: Number.NaN, standardError: 0 }, overburden, exact(8000))).toThrow(/delay and its standard error must be finite/);
    expect(() => timeTermDepth(exact(3.3), { velocities: [], upperThicknesses: [] }, exact(8000))).toThrow(/needs at least one layer velocity/);
    expect(() => timeTermDepth(exact(3.3), { velocities: [exact(6300)], upperThicknesses: [exact(1)] }, exact(8000))).toThrow(/need 0 upper thicknesses/);
  });
});

describe('timeTermDepths over a time-term inversion', () => {
  /** Invented crustal line: 10 shots, 60 stations, Pn 8 km/s under a 6.3 km/s crust whose Moho deepens from 30 to 40 km. */
  function crustalSurvey(): { rows: TimeTermPick[]; moho: Map<string, number> } {
    const normal = seededNormal(99);
    const q = Math.sqrt(1 / 6300 ** 2 - 1 / 8000 ** 2);
    const stationX = Array.from({ length: 60 }, (_, j) => j * 5000);
    const shotX = Array.from({ length: 10 }, (_, i) => 15_000 + i * 30_000);
    const depthAt = (x: number): number => 30_000 + (10_000 * x) / 295_000;
    const moho = new Map(stationX.map((x, j) => [`R${j + 1}`, depthAt(x)]));
    const rows: TimeTermPick[] = [];
    shotX.forEach((xs, i) =>
      stationX.forEach((xr, j) => {
        const distance = Math.abs(xr - xs);
        if (distance < 120_000) return;
        rows.push({ shot: `S${i + 1}`, station: `R${j + 1}`, distance, time: (depthAt(xs) + depthAt(xr)) * q + distance / 8000 + 0.03 * normal(), sigma: 0.03 });
      }),
    );
    return { rows, moho };
  }

  it('timeTermDepths converts every station term with the inversion’s velocity and its Cov(term, s), as timeTermDepth does term by term', () => {
    const { rows } = crustalSurvey();
    // One shot's delay is known from its own depth: a reference fixes the gauge to true delays.
    const q = Math.sqrt(1 / 6300 ** 2 - 1 / 8000 ** 2);
    const result = timeTerms(rows, { constraint: { kind: 'reference', terms: [{ side: 'shot', id: 'S1', value: (30_000 + (10_000 * 15_000) / 295_000) * q }] } });
    const overburden: Overburden = { velocities: [exact(6300)], upperThicknesses: [] };
    const depths = timeTermDepths(result, overburden, { elevations: new Map([['R5', 250]]) });
    expect(depths).toHaveLength(result.stationTerms.length);
    depths.forEach((depth, index) => {
      const term = result.stationTerms[index]!;
      expect(depth.id).toBe(term.id);
      const single = timeTermDepth(term, overburden, result.velocity, { timeTermSlownessCovariance: term.slownessCovariance ?? 0, ...(term.id === 'R5' ? { elevation: 250 } : {}) });
      expect(depth).toEqual({ id: term.id, ...single });
    });
    const withElevation = depths.find((depth) => depth.id === 'R5')!;
    expect(withElevation.ok && withElevation.depthBelowSeaLevel !== null).toBe(true);
    expect(depths.filter((depth) => depth.ok && depth.depthBelowSeaLevel !== null)).toHaveLength(1);
  });

  it('timeTermDepths recovers the invented Moho within 3 SE for ≥ 95 % of the stations (gauge fixed by a known shot delay)', () => {
    const { rows, moho } = crustalSurvey();
    const q = Math.sqrt(1 / 6300 ** 2 - 1 / 8000 ** 2);
    const result = timeTerms(rows, { constraint: { kind: 'reference', terms: [{ side: 'shot', id: 'S1', value: (30_000 + (10_000 * 15_000) / 295_000) * q }] } });
    const depths = timeTermDepths(result, { velocities: [exact(6300)], upperThicknesses: [] });
    // 3 SE, not 2: under a reference every station shares the reference shot's own error, so the
    // misses are correlated (tests/depth/time-term.test.ts explains); this checks the chain, not calibration.
    const inside = depths.filter((depth) => depth.ok && Math.abs(depth.depth.value - moho.get(depth.id)!) <= 3 * depth.depth.standardError).length;
    expect(inside / depths.length).toBeGreaterThanOrEqual(0.95);
  });

  it('timeTermDepths takes a term as independent of s when the inversion’s SEs are LSQR’s estimate (slownessCovariance null)', () => {
    const { rows } = crustalSurvey();
    const result = timeTerms(rows, { denseLimit: 1 });
    expect(result.covarianceMethod).toBe('lsqr-lower-bound');
    const overburden: Overburden = { velocities: [exact(6300)], upperThicknesses: [] };
    const depths = timeTermDepths(result, overburden);
    depths.forEach((depth, index) => {
      const term = result.stationTerms[index]!;
      expect(term.slownessCovariance).toBeNull();
      expect(depth).toEqual({ id: term.id, ...timeTermDepth(term, overburden, result.velocity) });
    });
  });

  it('timeTermDepths converts shot terms with side shot and refuses another side', () => {
    const { rows } = crustalSurvey();
    const result = timeTerms(rows);
    expect(timeTermDepths(result, { velocities: [exact(6300)], upperThicknesses: [] }, { side: 'shot' }).map((depth) => depth.id)).toEqual(result.shotTerms.map((term) => term.id));
    expect(() => timeTermDepths(result, { velocities: [exact(6300)], upperThicknesses: [] }, { side: 'both' as 'shot' })).toThrow(/options.side must be 'station' or 'shot'/);
  });
});
