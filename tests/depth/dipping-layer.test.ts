import { describe, expect, it } from 'vitest';
import {
  DIPPING_OUTPUTS,
  STEEP_DIP,
  dippingLayer,
  dippingLayers,
  reciprocalTimeCheck,
  type ReversedBranchPair,
} from '../../lib/depth/dipping-layer.js';
import type { BranchParameters } from '../../lib/depth/types.js';
import { seededNormal } from '../../lib/random.js';
import { reversedBranches, type DippingModel, type ExactBranch } from '../oracles/dipping-refractor.js';
import { expectRelative, expectWithin } from '../helpers/expect-within.js';

const CASE_5 = 'METHODS.md check case 5.1 (computed from the stated model by Fermat minimisation over refraction points, not a published value)';
const CASE_52 = 'METHODS.md check case 5.2 (computed from the stated model by Fermat minimisation, not a published value)';
const CASE_53 = 'METHODS.md check case 5.3 (computed from the stated model by Fermat minimisation, not a published value)';
const ORACLE = 'Fermat-minimisation oracle (tests/oracles/dipping-refractor.ts)';

/** Half a unit in the last printed digit. */
const HALF_3DP = 0.5e-3;
/**
 * Depths of case 5.1 from its printed (rounded) inputs: half the last printed digit (5e-6 m) plus
 * the effect of the inputs' own rounding (τ to 1e-8 s, velocities to 1e-4 m/s: about 2e-6 m).
 */
const CASE_51_DEPTH_TOLERANCE = 1e-5;
const HALF_5DP = 0.5e-5;
const HALF_2DP = 0.5e-2;
/** METHODS 5.3 states "within 1e-5": read relative for velocities (4000 m/s from 5-decimal ms inputs), absolute in m and degrees. */
const CASE_53_TOLERANCE = 1e-5;
/** The acceptance bounds of the brief for exact synthetic data (the tighter EXACT bound is also asserted). */
const VELOCITY_RELATIVE = 0.01;
const DIP_DEGREES = 0.5;
const DEPTH_RELATIVE = 0.02;
/** Two-point slopes of exact oracle times: only the oracle's rounding (≈1e−15 s) remains. */
const EXACT_RELATIVE = 1e-7;
/** Central differences at relative step 1e-6 agree with an exact derivative to about 1e-6 relative. */
const DIFFERENCE_RELATIVE = 1e-5;
const DIFFERENCE_STEP = 1e-6;
/** Monte Carlo with 20 000 draws: SE of an SE estimate ≈ 1/√(2·20000) = 0.5 %; 3 % leaves room for curvature. */
const MONTE_CARLO_DRAWS = 20000;
const MONTE_CARLO_RELATIVE = 0.03;
const SEED = 5150;

const degrees = (radians: number): number => (radians * 180) / Math.PI;
const radians = (degreesValue: number): number => (degreesValue * Math.PI) / 180;

const exact = (slowness: number, intercept: number): BranchParameters => ({
  slowness,
  intercept,
  slownessVariance: 0,
  interceptVariance: 0,
  covariance: 0,
});
const exactPair = (branches: { forward: ExactBranch; reverse: ExactBranch }): ReversedBranchPair => ({
  forward: exact(branches.forward.slowness, branches.forward.intercept),
  reverse: exact(branches.reverse.slowness, branches.reverse.intercept),
});

/** METHODS 5.1 as printed. */
const CASE_51_PAIR: ReversedBranchPair = {
  forward: exact(1 / 1715.0711, 25.67844e-3),
  reverse: exact(1 / 4069.9703, 66.16214e-3),
};
const CASE_51_DIRECT = { slowness: 1 / 600, variance: 0 };
const CASE_51_MODEL: DippingModel = { velocities: [600, 2400], interfaces: [{ depthAtOrigin: 8, dip: radians(6) }] };

/** METHODS 5.3 as printed. */
const CASE_53_PAIRS: readonly ReversedBranchPair[] = [
  { forward: exact(1 / 1308.1495, 18.83034e-3), reverse: exact(1 / 1763.4588, 48.43603e-3) },
  { forward: exact(1 / 2463.2869, 32.02157e-3), reverse: exact(1 / 11019.8626, 79.30403e-3) },
];
const CASE_53_DIRECT = { slowness: 1 / 500, variance: 0 };
const CASE_53_MODEL: DippingModel = {
  velocities: [500, 1500, 4000],
  interfaces: [
    { depthAtOrigin: 5, dip: radians(3) },
    { depthAtOrigin: 15, dip: radians(8) },
  ],
};

function onlyInterface(direct: { slowness: number; variance: number }, pair: ReversedBranchPair, spreadLength: number) {
  const result = dippingLayer(direct, pair, spreadLength);
  const found = result.interfaces[0];
  if (found === undefined) throw new Error(`dippingLayer gave no interface: ${result.notes.map((note) => note.message).join('; ')}`);
  return { result, found };
}

describe('dippingLayer and dippingLayers: METHODS.md check cases', () => {
  it('the Fermat oracle reproduces the forward and reverse branches printed in case 5.1', () => {
    const branches = reversedBranches(CASE_51_MODEL, 1, 120, 40, 80);
    if (branches === null) throw new Error('oracle: no head wave');
    expectWithin(1 / branches.forward.slowness, 1715.0711, 0.5e-4, `${CASE_5}: V_d`);
    expectWithin(branches.forward.intercept * 1000, 25.67844, HALF_5DP, `${CASE_5}: τ_A (ms)`);
    expectWithin(1 / branches.reverse.slowness, 4069.9703, 0.5e-4, `${CASE_5}: V_u`);
    expectWithin(branches.reverse.intercept * 1000, 66.16214, HALF_5DP, `${CASE_5}: τ_B (ms)`);
    expectWithin(branches.reciprocalTime * 1000, 95.64639, HALF_5DP, `${CASE_5}: t_AB (ms)`);
  });

  it('dippingLayer recovers V_2, α, θ_c, h_A, z_A, h_B, z_B of case 5.1 from its printed branches', () => {
    const { result, found } = onlyInterface(CASE_51_DIRECT, CASE_51_PAIR, 120);
    expectWithin(found.refractorVelocity.value, 2400.0, HALF_3DP, `${CASE_5}: V_2`);
    expectWithin(degrees(found.dip.value), 6.0, HALF_5DP, `${CASE_5}: α (°)`);
    expectWithin(degrees(found.criticalAngle.value), 14.47751, HALF_5DP, `${CASE_5}: θ_c (°)`);
    expectWithin(found.perpendicularDepthA.value, 7.95618, CASE_51_DEPTH_TOLERANCE, `${CASE_5}: h_A`);
    expectWithin(found.verticalDepthA.value, 8.0, CASE_51_DEPTH_TOLERANCE, `${CASE_5}: z_A`);
    expectWithin(found.perpendicularDepthB.value, 20.49959, CASE_51_DEPTH_TOLERANCE, `${CASE_5}: h_B`);
    expectWithin(found.verticalDepthB.value, 20.61251, CASE_51_DEPTH_TOLERANCE, `${CASE_5}: z_B`);
    expect(result.notes).toEqual([]);
  });

  it('dippingLayer uses the exact V_2 = 2·cos α·V_u·V_d/(V_u + V_d), not the harmonic mean (case 5.1: 2413.22 vs 2400.00 m/s)', () => {
    const { found } = onlyInterface(CASE_51_DIRECT, CASE_51_PAIR, 120);
    const harmonic = (2 * 1715.0711 * 4069.9703) / (1715.0711 + 4069.9703);
    expectWithin(harmonic, 2413.22, HALF_2DP, `${CASE_5}: the harmonic mean alone`);
    expectWithin(harmonic * Math.cos(found.dip.value), 2400.0, HALF_2DP, `${CASE_5}: times cos α`);
    expectWithin(found.refractorVelocity.value, harmonic * Math.cos(found.dip.value), 1e-6, 'METHODS.md §5 exact form s_2 = (p_d + p_u)/(2·cos α)');
  });

  it('dippingLayer satisfies the consistency τ_B − τ_A = 2L·sin α·cos θ_c/V_1 = 40.48370 ms of case 5.2', () => {
    const { found } = onlyInterface(CASE_51_DIRECT, CASE_51_PAIR, 120);
    const difference = (CASE_51_PAIR.reverse.intercept - CASE_51_PAIR.forward.intercept) * 1000;
    expectWithin(difference, 40.4837, HALF_5DP, `${CASE_52}: τ_B − τ_A (ms)`);
    const predicted = ((2 * 120 * Math.sin(found.dip.value) * Math.cos(found.criticalAngle.value)) / 600) * 1000;
    expectWithin(predicted, 40.4837, HALF_5DP, `${CASE_52}: 2L·sin α·cos θ_c/V_1 (ms)`);
    // h_B − h_A = L·sin α up to the rounding of the printed inputs.
    expectWithin(found.consistencyMisfit.value, 0, 1e-5, `${CASE_52}: consistency misfit (m)`);
  });

  it('the Fermat oracle reproduces the four branches printed in case 5.3', () => {
    const printed = [
      [1308.1495, 18.83034, 1763.4588, 48.43603],
      [2463.2869, 32.02157, 11019.8626, 79.30403],
    ];
    printed.forEach(([forwardVelocity, forwardIntercept, reverseVelocity, reverseIntercept], index) => {
      const branches = reversedBranches(CASE_53_MODEL, index + 1, 150, 60, 100);
      if (branches === null) throw new Error('oracle: no head wave');
      expectWithin(1 / branches.forward.slowness, forwardVelocity ?? Number.NaN, 0.5e-4, `${CASE_53}: branch ${index + 2} forward velocity`);
      expectWithin(branches.forward.intercept * 1000, forwardIntercept ?? Number.NaN, HALF_5DP, `${CASE_53}: branch ${index + 2} τ_A (ms)`);
      expectWithin(1 / branches.reverse.slowness, reverseVelocity ?? Number.NaN, 0.5e-4, `${CASE_53}: branch ${index + 2} reverse velocity`);
      expectWithin(branches.reverse.intercept * 1000, reverseIntercept ?? Number.NaN, HALF_5DP, `${CASE_53}: branch ${index + 2} τ_B (ms)`);
    });
  });

  it('dippingLayers strips case 5.3 to 1500 and 4000 m/s, dips 3° and 8°, 5/15 m under A and 12.86117/36.08113 m under B', () => {
    const result = dippingLayers(CASE_53_DIRECT, CASE_53_PAIRS, 150);
    expect(result.notes).toEqual([]);
    const expected = [
      { velocity: 1500, dip: 3, depthA: 5, depthB: 12.86117 },
      { velocity: 4000, dip: 8, depthA: 15, depthB: 36.08113 },
    ];
    expect(result.interfaces).toHaveLength(2);
    expected.forEach((value, index) => {
      const found = result.interfaces[index];
      expectRelative(found?.refractorVelocity.value, value.velocity, CASE_53_TOLERANCE, `${CASE_53}: V_${index + 2}`);
      expectWithin(degrees(found?.dip.value ?? Number.NaN), value.dip, CASE_53_TOLERANCE, `${CASE_53}: dip ${index + 1} (°)`);
      expectWithin(found?.verticalDepthA.value, value.depthA, CASE_53_TOLERANCE, `${CASE_53}: depth ${index + 1} under A`);
      expectWithin(found?.verticalDepthB.value, value.depthB, CASE_53_TOLERANCE, `${CASE_53}: depth ${index + 1} under B`);
    });
  });
});

describe('dippingLayers against the Fermat oracle (explicit ray geometry, exact two-point slopes)', () => {
  const spreadLength = 120;
  const mirrored = (model: DippingModel): DippingModel => ({
    velocities: model.velocities,
    interfaces: model.interfaces.map((known) => ({
      depthAtOrigin: known.depthAtOrigin + spreadLength * Math.tan(known.dip),
      dip: -known.dip,
    })),
  });

  function recover(model: DippingModel): ReturnType<typeof dippingLayers> {
    const pairs = model.interfaces.map((_, index) => {
      const branches = reversedBranches(model, index + 1, spreadLength, 50, 90);
      if (branches === null) throw new Error(`oracle: no head wave along interface ${index + 1}`);
      return exactPair(branches);
    });
    return dippingLayers({ slowness: 1 / (model.velocities[0] ?? Number.NaN), variance: 0 }, pairs, spreadLength);
  }

  function expectRecovered(model: DippingModel, label: string): void {
    const result = recover(model);
    expect(result.notes, label).toEqual([]);
    expect(result.interfaces).toHaveLength(model.interfaces.length);
    model.interfaces.forEach((known, index) => {
      const found = result.interfaces[index];
      const velocity = model.velocities[index + 1] ?? Number.NaN;
      const depthA = known.depthAtOrigin;
      const depthB = known.depthAtOrigin + spreadLength * Math.tan(known.dip);
      const where = `${ORACLE}, ${label}, interface ${index + 1}`;
      expectRelative(found?.refractorVelocity.value, velocity, VELOCITY_RELATIVE, `${where}: V within 1 %`);
      expectWithin(degrees(found?.dip.value ?? Number.NaN), degrees(known.dip), DIP_DEGREES, `${where}: dip within 0.5°`);
      expectRelative(found?.verticalDepthA.value, depthA, DEPTH_RELATIVE, `${where}: depth under A within 2 %`);
      expectRelative(found?.verticalDepthB.value, depthB, DEPTH_RELATIVE, `${where}: depth under B within 2 %`);
      expectRelative(found?.refractorVelocity.value, velocity, EXACT_RELATIVE, `${where}: V (exact data)`);
      expectWithin(found?.dip.value, known.dip, EXACT_RELATIVE, `${where}: dip in rad (exact data)`);
      expectRelative(found?.verticalDepthA.value, depthA, EXACT_RELATIVE, `${where}: z_A (exact data)`);
      expectRelative(found?.verticalDepthB.value, depthB, EXACT_RELATIVE, `${where}: z_B (exact data)`);
      expectRelative(found?.perpendicularDepthA.value, depthA * Math.cos(known.dip), EXACT_RELATIVE, `${where}: h_A = z_A·cos δ`);
    });
  }

  for (const dip of [-10, -5, -2, 0, 2, 5, 10]) {
    it(`dippingLayer recovers a 600/2400 m/s refractor dipping ${dip}° from both shots, and its mirror image`, () => {
      // 12 m below the shallower shot, so the refractor stays below the surface along the spread.
      const depthAtOrigin = 12 + Math.max(0, -spreadLength * Math.tan(radians(dip)));
      const model: DippingModel = { velocities: [600, 2400], interfaces: [{ depthAtOrigin, dip: radians(dip) }] };
      expectRecovered(model, `two layers, dip ${dip}°`);
      // Shots exchanged: the same ground seen from the other end dips the other way.
      expectRecovered(mirrored(model), `two layers, dip ${dip}°, shots exchanged`);
    });
  }

  // Depths under A chosen so that both interfaces stay below the surface and apart along the spread.
  for (const [upperDip, upperDepth, lowerDip, lowerDepth] of [
    [-3, 10, 8, 24],
    [3, 6, -6, 30],
    [0, 6, 5, 28],
    [-5, 14, -8, 40],
  ] as const) {
    it(`dippingLayers recovers three layers 450/1400/3800 m/s with dips ${upperDip}° and ${lowerDip}° from both shots`, () => {
      const model: DippingModel = {
        velocities: [450, 1400, 3800],
        interfaces: [
          { depthAtOrigin: upperDepth, dip: radians(upperDip) },
          { depthAtOrigin: lowerDepth, dip: radians(lowerDip) },
        ],
      };
      expectRecovered(model, `three layers, dips ${upperDip}°/${lowerDip}°`);
      expectRecovered(mirrored(model), `three layers, dips ${upperDip}°/${lowerDip}°, shots exchanged`);
    });
  }
});

describe('dippingLayers: propagated standard errors', () => {
  /** Inputs θ of case 5.3 with SEs: 1 % on V_1, 0.5 % on each apparent slowness, 0.3 ms on τ, ρ(p, τ) = −0.9. */
  function withUncertainty(pair: ReversedBranchPair): ReversedBranchPair {
    const spread = (branch: BranchParameters): BranchParameters => {
      const slownessSE = 0.005 * branch.slowness;
      const interceptSE = 0.3e-3;
      return { ...branch, slownessVariance: slownessSE ** 2, interceptVariance: interceptSE ** 2, covariance: -0.9 * slownessSE * interceptSE };
    };
    return { forward: spread(pair.forward), reverse: spread(pair.reverse) };
  }
  const direct = { slowness: 1 / 500, variance: (0.01 / 500) ** 2 };
  const pairs = CASE_53_PAIRS.map(withUncertainty);

  function evaluate(theta: readonly number[]): number[] {
    const at = (column: number): number => theta[column] ?? Number.NaN;
    const result = dippingLayers(
      { slowness: at(0), variance: 0 },
      pairs.map((_, index) => ({
        forward: exact(at(1 + 4 * index), at(2 + 4 * index)),
        reverse: exact(at(3 + 4 * index), at(4 + 4 * index)),
      })),
      150,
    );
    return result.interfaces.flatMap((found) => DIPPING_OUTPUTS.map((name) => found[name].value));
  }
  const theta = [direct.slowness, ...pairs.flatMap((pair) => [pair.forward.slowness, pair.forward.intercept, pair.reverse.slowness, pair.reverse.intercept])];

  it('dippingLayers Jacobian equals central differences (relative step 1e-6) over all nine inputs of case 5.3', () => {
    const result = dippingLayers(direct, pairs, 150);
    expect(result.jacobian).toHaveLength(2 * DIPPING_OUTPUTS.length);
    theta.forEach((value, column) => {
      const step = DIFFERENCE_STEP * Math.abs(value);
      const plus = evaluate(theta.map((entry, index) => (index === column ? entry + step : entry)));
      const minus = evaluate(theta.map((entry, index) => (index === column ? entry - step : entry)));
      result.jacobian.forEach((row, output) => {
        const difference = ((plus[output] ?? Number.NaN) - (minus[output] ?? Number.NaN)) / (2 * step);
        const scaleOfRow = Math.max(...theta.map((entry, index) => Math.abs((result.jacobian[output]?.[index] ?? 0) * entry))) / Math.abs(value);
        expectWithin(row[column], difference, DIFFERENCE_RELATIVE * scaleOfRow + 1e-12, `central differences: output ${output}, input ${column}`);
      });
    });
  });

  it('dippingLayer SEs of V_2, α, z_A and z_B agree with a seeded Monte Carlo of correlated inputs (case 5.1)', () => {
    const pair = withUncertainty(CASE_51_PAIR);
    const directReading = { slowness: 1 / 600, variance: (0.01 / 600) ** 2 };
    const { found } = onlyInterface(directReading, pair, 120);
    const normal = seededNormal(SEED);
    const draw = (branch: BranchParameters): BranchParameters => {
      const slownessSE = Math.sqrt(branch.slownessVariance);
      const interceptSE = Math.sqrt(branch.interceptVariance);
      const correlation = branch.covariance / (slownessSE * interceptSE);
      const first = normal();
      const second = correlation * first + Math.sqrt(1 - correlation ** 2) * normal();
      return exact(branch.slowness + slownessSE * first, branch.intercept + interceptSE * second);
    };
    const samples: number[][] = [];
    for (let index = 0; index < MONTE_CARLO_DRAWS; index += 1) {
      const slowness = directReading.slowness + Math.sqrt(directReading.variance) * normal();
      const one = dippingLayer({ slowness, variance: 0 }, { forward: draw(pair.forward), reverse: draw(pair.reverse) }, 120).interfaces[0];
      if (one !== undefined) samples.push([one.refractorVelocity.value, one.dip.value, one.verticalDepthA.value, one.verticalDepthB.value]);
    }
    expect(samples.length).toBe(MONTE_CARLO_DRAWS);
    const spreadOf = (column: number): number => {
      const values = samples.map((sample) => sample[column] ?? Number.NaN);
      const mean = values.reduce((sum, value) => sum + value, 0) / values.length;
      return Math.sqrt(values.reduce((sum, value) => sum + (value - mean) ** 2, 0) / (values.length - 1));
    };
    const linearised = [found.refractorVelocity, found.dip, found.verticalDepthA, found.verticalDepthB];
    linearised.forEach((estimate, column) => {
      expect(estimate.standardError).toBeGreaterThan(0);
      expectRelative(estimate.standardError, spreadOf(column), MONTE_CARLO_RELATIVE, `Monte Carlo (seed ${SEED}, ${MONTE_CARLO_DRAWS} draws): SE of output ${column}`);
    });
  });

  it('dippingLayer SE(z_A) and SE(z_B) equal √(gᵀ·Σ·g) with g from central differences and each branch’s slope–intercept covariance kept', () => {
    const pair = withUncertainty(CASE_51_PAIR);
    const { found } = onlyInterface({ slowness: 1 / 600, variance: 0 }, pair, 120);
    const values = (forward: BranchParameters, reverse: BranchParameters): number[] => {
      const one = dippingLayer({ slowness: 1 / 600, variance: 0 }, { forward, reverse }, 120).interfaces[0];
      return [one?.verticalDepthA.value ?? Number.NaN, one?.verticalDepthB.value ?? Number.NaN];
    };
    const nudge = (branch: BranchParameters, field: 'slowness' | 'intercept', step: number): BranchParameters => ({ ...branch, [field]: branch[field] + step });
    const gradient = (output: number, side: 'forward' | 'reverse', field: 'slowness' | 'intercept'): number => {
      const step = DIFFERENCE_STEP * Math.abs(pair[side][field]);
      const shifted = (sign: number): number[] =>
        side === 'forward' ? values(nudge(pair.forward, field, sign * step), pair.reverse) : values(pair.forward, nudge(pair.reverse, field, sign * step));
      return ((shifted(1)[output] ?? Number.NaN) - (shifted(-1)[output] ?? Number.NaN)) / (2 * step);
    };
    [found.verticalDepthA, found.verticalDepthB].forEach((estimate, output) => {
      let variance = 0;
      let varianceWithoutCovariance = 0;
      for (const side of ['forward', 'reverse'] as const) {
        const slownessGradient = gradient(output, side, 'slowness');
        const interceptGradient = gradient(output, side, 'intercept');
        const block = pair[side];
        const diagonal = slownessGradient ** 2 * block.slownessVariance + interceptGradient ** 2 * block.interceptVariance;
        variance += diagonal + 2 * slownessGradient * interceptGradient * block.covariance;
        varianceWithoutCovariance += diagonal;
      }
      expectRelative(estimate.standardError, Math.sqrt(variance), DIFFERENCE_RELATIVE, `JCGM 100:2008 §5.2 with central-difference gradients: SE of output ${output}`);
      // The covariance term matters here, so a propagation that dropped it would be caught.
      expect(Math.abs(Math.sqrt(varianceWithoutCovariance) / Math.sqrt(variance) - 1)).toBeGreaterThan(100 * DIFFERENCE_RELATIVE);
    });
  });
});

describe('dippingLayers: edges stated in the doc comment', () => {
  it('dippingLayers notes apparent-velocity-impossible when V_1·|p| > 1 and stops the stack there', () => {
    const slow = { forward: exact(1 / 1200, 0.03), reverse: exact(1 / 480, 0.05) }; // 480 m/s < V_1 = 500 m/s
    const result = dippingLayers(CASE_53_DIRECT, [CASE_53_PAIRS[0]!, slow], 150);
    expect(result.interfaces).toHaveLength(1);
    expect(result.jacobian).toHaveLength(DIPPING_OUTPUTS.length);
    expect(result.notes.map((note) => [note.code, note.interface])).toEqual([['apparent-velocity-impossible', 2]]);
    expect(result.notes[0]?.message).toMatch(/branch 3, reverse side: apparent velocity 480.m\/s is not faster than the top layer/);
    const alone = dippingLayer(CASE_53_DIRECT, slow, 150);
    expect(alone.interfaces).toEqual([]);
    expect(alone.notes.map((note) => note.code)).toEqual(['apparent-velocity-impossible']);
  });

  it('dippingLayer treats V_1·|p| = 1 exactly as apparent-velocity-impossible, so no standard error is infinite or NaN', () => {
    const uncertain = { slowness: 1 / 600, variance: 1e-12 };
    const grazing = dippingLayer(uncertain, { forward: exact(1 / 600, 0.02), reverse: exact(1 / 4000, 0.06) }, 120);
    expect(grazing.interfaces).toEqual([]);
    expect(grazing.notes.map((note) => note.message)).toEqual([expect.stringMatching(/branch 2, forward side/)]);
    expect(grazing.notes.map((note) => note.code)).toEqual(['apparent-velocity-impossible']);
  });

  it('dippingLayers notes no-critical-ray when Snell’s law asks for a sine beyond 1 at an upper interface, and stops', () => {
    // Branch 3 at 520 m/s forward: ψ_1 ≈ 74°, and V_2/V_1 = 3 makes the sine ≈ 2.8 at interface 1.
    const result = dippingLayers(CASE_53_DIRECT, [CASE_53_PAIRS[0]!, { forward: exact(1 / 520, 0.03), reverse: exact(1 / 3000, 0.07) }], 150);
    expect(result.interfaces).toHaveLength(1);
    expect(result.notes.map((note) => [note.code, note.interface])).toEqual([['no-critical-ray', 2]]);
    expect(result.notes[0]?.message).toMatch(/branch 3, forward side: its ray cannot pass down through interface 1/);
    expect(result.interfaces.every((found) => Number.isFinite(found.refractorVelocity.value))).toBe(true);
  });

  it('dippingLayer notes critical-angle-not-positive when p_d + p_u ≤ 0 and returns no interface', () => {
    const result = dippingLayer(CASE_51_DIRECT, { forward: exact(1 / 3000, 0.02), reverse: exact(-1 / 3000, 0.06) }, 120);
    expect(result.interfaces).toEqual([]);
    expect(result.notes.map((note) => note.code)).toEqual(['critical-angle-not-positive']);
  });

  it('dippingLayer notes apparent-slowness-not-positive for p_u ≤ 0, keeps the signs and gives a dip steeper than θ_c', () => {
    const result = dippingLayer(CASE_51_DIRECT, { forward: exact(1 / 700, 0.02), reverse: exact(-1 / 20000, 0.06) }, 120);
    const found = result.interfaces[0];
    expect(found).toBeDefined();
    expect(result.notes.map((note) => note.code)).toContain('apparent-slowness-not-positive');
    expect(found!.dip.value).toBeGreaterThan(found!.criticalAngle.value);
    expectWithin(found!.dip.value, 0.5 * (Math.asin(600 / 700) + Math.asin(600 / 20000)), 1e-12, 'METHODS.md §5: α = ½[asin(V_1·p_d) − asin(V_1·p_u)] with the sign of p_u kept');
    const zero = dippingLayer(CASE_51_DIRECT, { forward: exact(1 / 700, 0.02), reverse: exact(0, 0.06) }, 120);
    expect(zero.notes.map((note) => note.code)).toContain('apparent-slowness-not-positive');
  });

  it('dippingLayer notes dip-steep beyond 15° (common practice) and not at 14°', () => {
    // 1000/2400 m/s: θ_c = 24.6°, so both apparent slownesses stay positive at these dips.
    const at = (dip: number) => {
      const model: DippingModel = { velocities: [1000, 2400], interfaces: [{ depthAtOrigin: 4, dip: radians(dip) }] };
      const branches = reversedBranches(model, 1, 120, 60, 80);
      if (branches === null) throw new Error('oracle: no head wave');
      return dippingLayer({ slowness: 1 / 1000, variance: 0 }, exactPair(branches), 120);
    };
    expect(degrees(STEEP_DIP)).toBeCloseTo(15, 12);
    const steep = at(16);
    expect(steep.notes.map((note) => note.code)).toEqual(['dip-steep']);
    expectWithin(degrees(steep.interfaces[0]?.dip.value ?? Number.NaN), 16, 1e-6, `${ORACLE}: the steep dip is still returned`);
    expect(at(14).notes).toEqual([]);
  });

  it('dippingLayer notes depth-not-positive for a negative intercept and keeps the value', () => {
    const result = dippingLayer(CASE_51_DIRECT, { forward: exact(1 / 1715.0711, -0.005), reverse: exact(1 / 4069.9703, 66.16214e-3 - 30.67844e-3) }, 120);
    expect(result.interfaces[0]?.perpendicularDepthA.value).toBeLessThan(0);
    expect(result.notes.map((note) => note.code)).toEqual(['depth-not-positive']);
  });

  it('dippingLayers goes on below a non-positive depth: the deeper interface is still returned', () => {
    const [upper, lower] = CASE_53_PAIRS;
    const bad = { ...upper!, forward: { ...upper!.forward, intercept: -0.002 } };
    const result = dippingLayers(CASE_53_DIRECT, [bad, lower!], 150);
    expect(result.interfaces).toHaveLength(2);
    expect(result.interfaces[0]?.perpendicularDepthA.value).toBeLessThan(0);
    expect(result.notes.filter((note) => note.code === 'depth-not-positive').map((note) => note.interface)).toContain(1);
    expect(Number.isFinite(result.interfaces[1]?.verticalDepthA.value)).toBe(true);
  });

  it('dippingLayer notes dip-inconsistent when τ_B is 2 ms off the plane, beyond 3 SE plus the tolerance, and not within it', () => {
    const shifted = { ...CASE_51_PAIR, reverse: { ...CASE_51_PAIR.reverse, intercept: CASE_51_PAIR.reverse.intercept + 0.002 } };
    const off = dippingLayer(CASE_51_DIRECT, shifted, 120);
    expect(off.notes.map((note) => note.code)).toEqual(['dip-inconsistent']);
    expect(off.interfaces[0]?.consistencyMisfit.value).toBeGreaterThan(0.5);
    // The same misfit with a 1 ms SE on τ_B is within 3 SE.
    const uncertain = { ...shifted, reverse: { ...shifted.reverse, interceptVariance: 1e-6 } };
    expect(dippingLayer(CASE_51_DIRECT, uncertain, 120).notes).toEqual([]);
    // A tolerance wider than the misfit silences it.
    expect(dippingLayer(CASE_51_DIRECT, shifted, 120, { consistencyTolerance: 1 }).notes).toEqual([]);
  });

  it('dippingLayers gives no interfaces and no notes for no branch pairs', () => {
    expect(dippingLayers(CASE_51_DIRECT, [], 120)).toEqual({ interfaces: [], jacobian: [], covariance: [], notes: [] });
  });

  it('dippingLayers throws with a message on misuse', () => {
    expect(() => dippingLayers({ slowness: 0, variance: 0 }, [CASE_51_PAIR], 120)).toThrow(/direct-wave slowness must be positive/);
    expect(() => dippingLayers(CASE_51_DIRECT, [CASE_51_PAIR], 0)).toThrow(/spread length .* must be positive/);
    expect(() => dippingLayers(CASE_51_DIRECT, [{ ...CASE_51_PAIR, reverse: { ...CASE_51_PAIR.reverse, intercept: Number.NaN } }], 120)).toThrow(
      /branch 2 reverse intercept must be a finite number/,
    );
    expect(() => dippingLayers(CASE_51_DIRECT, [{ ...CASE_51_PAIR, forward: { ...CASE_51_PAIR.forward, slownessVariance: -1 } }], 120)).toThrow(
      /branch 2 forward variances must not be negative/,
    );
    expect(() => dippingLayers(CASE_51_DIRECT, [CASE_51_PAIR], 120, { consistencyTolerance: -1 })).toThrow(/consistencyTolerance/);
  });

  it('dippingLayers does not change its input', () => {
    const frozen = Object.freeze(CASE_53_PAIRS.map((pair) => Object.freeze({ forward: Object.freeze({ ...pair.forward }), reverse: Object.freeze({ ...pair.reverse }) })));
    expect(() => dippingLayers(Object.freeze({ ...CASE_53_DIRECT }), frozen, 150)).not.toThrow();
  });
});

describe('reciprocalTimeCheck (METHODS.md §5 and §6: |t_AB − t_BA| > √2·σ_pick + tolerance)', () => {
  it('reciprocalTimeCheck gives the misfit and flags it beyond √2·σ_pick + tolerance', () => {
    const result = reciprocalTimeCheck(0.09565, 0.0961, 0.0002, 0.0001);
    expectWithin(result.misfit, -0.00045, 1e-15, 'METHODS.md §6: misfit t_AB − t_BA');
    expectWithin(result.limit, Math.SQRT2 * 0.0002 + 0.0001, 1e-15, 'METHODS.md §6: limit √2·σ_pick + tolerance');
    expect(result.exceeds).toBe(true);
    expect(reciprocalTimeCheck(0.09565, 0.0959, 0.0002, 0.0001).exceeds).toBe(false); // 0.25 ms < 0.383 ms
  });

  it('reciprocalTimeCheck does not flag a misfit exactly at the limit, and flags any difference when σ and tolerance are 0', () => {
    expect(reciprocalTimeCheck(0.25, 0.125, 0, 0.125).exceeds).toBe(false);
    expect(reciprocalTimeCheck(0.1, 0.1 + 1e-12, 0, 0).exceeds).toBe(true);
    expect(reciprocalTimeCheck(0.1, 0.1, 0, 0).exceeds).toBe(false);
  });

  it('reciprocalTimeCheck agrees with the reciprocal time of the Fermat oracle for case 5.1 (t_AB = t_BA)', () => {
    const forward = reversedBranches(CASE_51_MODEL, 1, 120, 40, 80);
    if (forward === null) throw new Error('oracle: no head wave');
    const atNearShot = forward.reverse.intercept + forward.reverse.slowness * 120; // the reverse line at A
    expect(reciprocalTimeCheck(forward.reciprocalTime, atNearShot, 0, 1e-12).exceeds).toBe(false);
  });

  it('reciprocalTimeCheck throws with a message on misuse', () => {
    expect(() => reciprocalTimeCheck(Number.NaN, 0.1, 0, 0)).toThrow(/reciprocal times must be finite/);
    expect(() => reciprocalTimeCheck(0.1, 0.1, -1, 0)).toThrow(/pick standard error/);
    expect(() => reciprocalTimeCheck(0.1, 0.1, 0, Number.POSITIVE_INFINITY)).toThrow(/tolerance/);
  });
});
