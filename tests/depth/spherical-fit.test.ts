import { describe, expect, it } from 'vitest';
import { fitSphericalLayers, predictedFlatBias, type SphericalPick } from '../../lib/depth/index.js';
import { sphericalBranchTime, type SphericalModel } from '../../lib/model/index.js';
import { seededNormal } from '../../lib/random.js';
import { expectRelative, expectWithin } from '../helpers/expect-within.js';
import { runPythonJson } from '../helpers/python.js';

const METHODS_10_2 = 'METHODS.md check case 10.2 (computed from the stated model, not a published value)';
const RADIUS = 6_371_000;
const CASE_10_2: Required<SphericalModel> = { velocities: [6300, 8000], thicknesses: [35_000], radius: RADIUS };
/** iasp91-like crust (KennettEngdahl1991; tests/fixtures/earth-models): 20 km 5.8 / 15 km 6.5 / 8.04 km/s. */
const IASP91_CRUST: Required<SphericalModel> = { velocities: [5800, 6500, 8040], thicknesses: [20_000, 15_000], radius: RADIUS };
/** A flat first guess, as a flat interpretation would give it. */
const FLAT_START = { velocities: [6000, 7800], thicknesses: [30_000] };
/** Exact data: the fit solves to rounding; 1e-8 relative is far above what the LM stop leaves (1e-10 relative steps). */
const EXACT_RELATIVE = 1e-8;

function range(first: number, last: number, step: number): number[] {
  const values: number[] = [];
  for (let value = first; value <= last + 1e-9; value += step) values.push(value);
  return values;
}

function exactPicks(model: SphericalModel, branches: readonly { branch: number; offsets: readonly number[] }[], sigma: number | null = null): SphericalPick[] {
  return branches.flatMap(({ branch, offsets }) =>
    offsets.map((offset) => {
      const time = sphericalBranchTime(model, branch, offset);
      if (time === null) throw new Error(`branch ${branch} does not reach ${offset} m`);
      return { offset, time, sigma, branch };
    }),
  );
}

/** METHODS 10.2 as the brief of this test states it: Pg 10–150 km and Pn 200–600 km, every 10 km. */
const PG_OFFSETS = range(10_000, 150_000, 10_000);
const PN_OFFSETS = range(200_000, 600_000, 10_000);
const picks102 = exactPicks(CASE_10_2, [
  { branch: 1, offsets: PG_OFFSETS },
  { branch: 2, offsets: PN_OFFSETS },
]);

function withNoise(picks: readonly SphericalPick[], seed: number, sigma: number): SphericalPick[] {
  const normal = seededNormal(seed);
  return picks.map((pick) => ({ ...pick, time: pick.time + sigma * normal(), sigma }));
}

describe('fitSphericalLayers: METHODS.md check case 10.2', () => {
  it('recovers H = 35 km (within 0.01 km) and V_m = 8.0 km/s (within 0.01 %) from exact spherical times, starting flat', () => {
    const fit = fitSphericalLayers(picks102, FLAT_START, { radius: RADIUS });
    expect(fit.converged).toBe(true);
    expect(fit.notes).toEqual([]);
    expectWithin(fit.depths[0], 35_000, 10, `${METHODS_10_2}: Moho depth (brief: within 0.01 km)`);
    expectRelative(fit.model.velocities[1], 8000, 1e-4, `${METHODS_10_2}: mantle velocity (brief: within 0.01 %)`);
    // Exact data leave nothing to misfit: every parameter comes back to rounding.
    expectRelative(fit.model.thicknesses[0], 35_000, EXACT_RELATIVE, 'exact data: H');
    expectRelative(fit.model.velocities[0], 6300, EXACT_RELATIVE, 'exact data: V_c');
    expectRelative(fit.model.velocities[1], 8000, EXACT_RELATIVE, 'exact data: V_m');
    expect(fit.rms).toBeLessThan(1e-9);
    expect(fit.model.radius).toBe(RADIUS);
    expect(fit.iterations).toBeGreaterThan(0);
    expect(fit.degreesOfFreedom).toBe(picks102.length - 3);
    expect(fit.weighted).toBe(false);
    expect(fit.refractedRay).toBe('turning-chord');
    expect(fit.references).toContain('Muller1971');
  });

  it('the flat fit of those data gives V = 8.0468 km/s and H = 34.882 km (METHODS 10.2), and predictedFlatBias reproduces flat − truth', () => {
    // Independent route: scipy Fermat times of the sphere, numpy straight lines, the two-layer intercept-time formula.
    const flat = runPythonJson<{ pnVelocity: number; pnIntercept: number; pgVelocity: number; depthTrueCrust: number; depthFittedCrust: number }>(
      `
import json, sys
import numpy as np
from scipy.optimize import minimize_scalar
m = json.load(sys.stdin)
R, H, vc, vm = m['radius'], m['depth'], m['crust'], m['mantle']
rm = R - H
def chord(r1, r2, a):
    return np.sqrt(r1 * r1 + r2 * r2 - 2 * r1 * r2 * np.cos(a))
def pn(x):
    D = x / R
    f = lambda a: 2 * chord(R, rm, a) / vc + 2 * rm * np.sin((D - 2 * a) / 2) / vm
    return minimize_scalar(f, bounds=(0, D / 2), method='bounded', options=dict(xatol=1e-13)).fun
xn = np.array(m['pn'], float); tn = np.array([pn(x) for x in xn])
slope, intercept = np.polyfit(xn, tn, 1)
xg = np.array(m['pg'], float); tg = 2 * R * np.sin(xg / (2 * R)) / vc
pg = 1 / ((xg @ tg) / (xg @ xg))
V = 1 / slope
h = lambda v1: intercept * v1 * V / (2 * np.sqrt(V**2 - v1**2))
print(json.dumps(dict(pnVelocity=V, pnIntercept=intercept, pgVelocity=pg, depthTrueCrust=h(vc), depthFittedCrust=h(pg))))
`,
      { radius: RADIUS, depth: 35_000, crust: 6300, mantle: 8000, pn: PN_OFFSETS, pg: PG_OFFSETS },
    );
    expectWithin(flat.pnVelocity, 8046.8, 0.05, `${METHODS_10_2}: flat Pn velocity over 200–600 km (8.0468 km/s)`);
    // METHODS' 34.882 km uses the true crustal 6.3 km/s; the Pg line through the origin reads 6300.09 m/s and gives 34.8833 km.
    expectWithin(flat.depthTrueCrust, 34_882, 0.5, `${METHODS_10_2}: flat Moho depth with V_c = 6.3 km/s (34.882 km)`);

    const fit = fitSphericalLayers(picks102, FLAT_START, { radius: RADIUS });
    const bias = predictedFlatBias(fit.model, picks102);
    const relative = 1e-3; // the brief's tolerance on (flat − truth)
    expectRelative(bias.velocityBias[1], flat.pnVelocity - 8000, relative, 'numpy polyfit on scipy Fermat times: flat V_m − 8000 m/s');
    expectRelative(bias.velocityBias[0], flat.pgVelocity - 6300, relative, 'numpy line through the origin on the Pg chords: flat V_c − 6300 m/s');
    expectRelative(bias.depthBias[0], flat.depthFittedCrust - 35_000, relative, 'two-layer intercept-time depth from the numpy lines − 35 km');
    expectRelative(bias.thicknessBias[0], flat.depthFittedCrust - 35_000, relative, 'thickness bias = depth bias for one layer');
    expectRelative(bias.flatIntercepts[1], flat.pnIntercept, 1e-9, 'numpy polyfit intercept of Pn');
    expect(bias.flatIntercepts[0]).toBe(0);
    expectRelative(bias.flatVelocities[1], flat.pnVelocity, 1e-9, 'numpy polyfit slope of Pn');
    expectRelative(bias.flatDepths[0], flat.depthFittedCrust, 1e-9, 'two-layer intercept-time formula');
    expect(bias.notes).toEqual([]);
  });

  it('matches scipy.optimize.least_squares on the same spherical model and noisy picks: parameters and σ̂²(JᵀWJ)⁻¹ standard errors', () => {
    const noisy = withNoise(picks102, 1010, 0.05);
    const fit = fitSphericalLayers(noisy, FLAT_START, { radius: RADIUS });
    const reference = runPythonJson<{ parameters: number[]; se: number[] }>(
      `
import json, sys
import numpy as np
from scipy.optimize import brentq, least_squares
d = json.load(sys.stdin)
R = d['radius']; picks = d['picks']
def forward(theta):
    v1, v2, h = theta
    rm = R - h
    out = []
    for p in picks:
        D = p['offset'] / R
        if p['branch'] == 1:
            out.append(2 * R * np.sin(D / 2) / v1)
            continue
        # turning chord in the mantle: closest approach b below the Moho, ray parameter b/v2
        def X(b):
            b1 = b / v2 * v1
            return 2 * (np.arccos(b1 / R) - np.arccos(b1 / rm)) + 2 * np.arccos(b / rm)
        b = brentq(lambda b: X(b) - D, 1.0, rm * (1 - 1e-15), xtol=1e-9, rtol=1e-15)
        b1 = b / v2 * v1
        L = np.sqrt(R**2 - b1**2) - np.sqrt(rm**2 - b1**2)
        out.append(2 * L / v1 + 2 * np.sqrt(rm**2 - b**2) / v2)
    return np.array(out)
t = np.array([p['time'] for p in picks]); s = np.array([p['sigma'] for p in picks])
res = least_squares(lambda th: (t - forward(th)) / s, d['start'], x_scale='jac', jac='3-point', xtol=1e-15, ftol=1e-15, gtol=1e-15, max_nfev=2000)
J = res.jac
chi2 = float(res.fun @ res.fun)
cov = chi2 / (len(t) - 3) * np.linalg.inv(J.T @ J)
print(json.dumps(dict(parameters=res.x.tolist(), se=np.sqrt(np.diag(cov)).tolist())))
`,
      { radius: RADIUS, picks: noisy, start: [...FLAT_START.velocities, ...FLAT_START.thicknesses] },
    );
    const parameters = [...fit.model.velocities, ...fit.model.thicknesses];
    const se = [...(fit.velocitySE ?? []), ...(fit.thicknessSE ?? [])];
    parameters.forEach((value, index) => {
      // Both minimise the same χ²; they agree far inside the statistical uncertainty (1e-4 SE).
      expectWithin(value, reference.parameters[index] ?? Number.NaN, 1e-4 * (reference.se[index] ?? Number.NaN), `scipy least_squares parameter ${index + 1}`);
      // scipy's 3-point Jacobian is good to ~1e-8; 1e-4 relative on an SE is ample.
      expectRelative(se[index], reference.se[index] ?? Number.NaN, 1e-4, `scipy σ̂²(JᵀJ)⁻¹ standard error ${index + 1}`);
    });
    expect(fit.weighted).toBe(true);
    expectRelative(fit.depthSE?.[0], fit.thicknessSE?.[0] ?? Number.NaN, 1e-12, 'one layer: SE(depth) = SE(thickness)');
    expectRelative(fit.covariance?.[2]?.[2], (fit.thicknessSE?.[0] ?? Number.NaN) ** 2, 1e-12, 'covariance diagonal = SE²');
    expectRelative(fit.residualVariance, fit.chiSquare / fit.degreesOfFreedom, 1e-12, 'σ̂² = χ²/(n − p)');
    expectRelative(fit.covariance?.[0]?.[1], (fit.residualVariance ?? Number.NaN) * (fit.unscaledCovariance?.[0]?.[1] ?? Number.NaN), 1e-12, 'C = σ̂²·(JᵀWJ)⁻¹');
    const rms = Math.sqrt(fit.residuals.reduce((sum, residual) => sum + residual ** 2, 0) / fit.residuals.length);
    expect(fit.rms).toBe(rms);
    expectWithin(fit.residuals[0], (noisy[0]?.time ?? Number.NaN) - (sphericalBranchTime(fit.model, 1, 10_000) ?? Number.NaN), 1e-12, 'residual = observed − fitted');
  });

  it('coverage check: with σ = 0.05 s noise over 50 seeds the fitted H lies within 2 SE of the truth in ≥ 90 % of fits', () => {
    // A ±2 SE interval covers 95.4 % for an honest SE; ≥ 45 of 50 fails by chance with probability ≈ 2.6 %
    // (binomial), and the seeds are fixed, so the outcome is reproducible. Over-confident SEs (e.g. half size) cover ~68 %.
    let depthCovered = 0;
    let velocityCovered = 0;
    const seeds = range(1, 50, 1);
    for (const seed of seeds) {
      const fit = fitSphericalLayers(withNoise(picks102, seed, 0.05), FLAT_START, { radius: RADIUS });
      expect(fit.converged, `seed ${seed}`).toBe(true);
      if (Math.abs((fit.depths[0] ?? Number.NaN) - 35_000) <= 2 * (fit.depthSE?.[0] ?? 0)) depthCovered += 1;
      if (Math.abs((fit.model.velocities[1] ?? Number.NaN) - 8000) <= 2 * (fit.velocitySE?.[1] ?? 0)) velocityCovered += 1;
    }
    expect(depthCovered / seeds.length, `H within 2 SE in ${depthCovered} of ${seeds.length}`).toBeGreaterThanOrEqual(0.9);
    expect(velocityCovered / seeds.length, `V_m within 2 SE in ${velocityCovered} of ${seeds.length}`).toBeGreaterThanOrEqual(0.9);
  });
});

describe('fitSphericalLayers: three shells (iasp91-like crust)', () => {
  const picks = exactPicks(IASP91_CRUST, [
    { branch: 1, offsets: range(10_000, 100_000, 10_000) },
    { branch: 2, offsets: range(100_000, 250_000, 10_000) },
    { branch: 3, offsets: range(200_000, 600_000, 20_000) },
  ]);

  it('recovers 20 km 5.8 / 15 km 6.5 / 8.04 km/s from exact spherical times, starting from a rough flat guess', () => {
    const fit = fitSphericalLayers(picks, { velocities: [5500, 6800, 7900], thicknesses: [15_000, 18_000] }, { radius: RADIUS });
    expect(fit.converged).toBe(true);
    IASP91_CRUST.velocities.forEach((velocity, index) => expectRelative(fit.model.velocities[index], velocity, EXACT_RELATIVE, `exact data: v_${index + 1}`));
    IASP91_CRUST.thicknesses.forEach((thickness, index) => expectRelative(fit.model.thicknesses[index], thickness, EXACT_RELATIVE, `exact data: h_${index + 1}`));
    expect(fit.depths).toHaveLength(2);
    expectRelative(fit.depths[1], 35_000, EXACT_RELATIVE, 'exact data: Moho depth h_1 + h_2');
  });

  it('depth SEs follow C_z = L·C_h·Lᵀ: SE(z_2)² = Var h_1 + Var h_2 + 2·Cov', () => {
    const fit = fitSphericalLayers(withNoise(picks, 77, 0.05), { velocities: [5500, 6800, 7900], thicknesses: [15_000, 18_000] }, { radius: RADIUS });
    const covariance = fit.covariance ?? [];
    const expected = Math.sqrt((covariance[3]?.[3] ?? Number.NaN) + (covariance[4]?.[4] ?? Number.NaN) + 2 * (covariance[3]?.[4] ?? Number.NaN));
    expectRelative(fit.depthSE?.[1], expected, 1e-12, 'L·C_h·Lᵀ for two thicknesses');
    expectRelative(fit.depthSE?.[0], fit.thicknessSE?.[0] ?? Number.NaN, 1e-12, 'SE(z_1) = SE(h_1)');
  });

  it('predictedFlatBias matches numpy lines and the METHODS §2 intercept-time recursion; flat velocities increase', () => {
    const flat = runPythonJson<{ velocities: number[]; thicknesses: number[] }>(
      `
import json, sys
import numpy as np
d = json.load(sys.stdin)
slow, tau = [], []
for b in (1, 2, 3):
    x = np.array([p['offset'] for p in d['picks'] if p['branch'] == b]); t = np.array([p['time'] for p in d['picks'] if p['branch'] == b])
    if b == 1:
        slow.append((x @ t) / (x @ x)); tau.append(0.0)
    else:
        s, i = np.polyfit(x, t, 1); slow.append(s); tau.append(i)
q = lambda i, n: np.sqrt(slow[i]**2 - slow[n]**2)
h1 = tau[1] / (2 * q(0, 1))
h2 = (tau[2] - 2 * h1 * q(0, 2)) / (2 * q(1, 2))
print(json.dumps(dict(velocities=[1 / s for s in slow], thicknesses=[h1, h2])))
`,
      { picks },
    );
    const bias = predictedFlatBias(IASP91_CRUST, picks);
    bias.flatVelocities.forEach((velocity, index) => expectRelative(velocity, flat.velocities[index] ?? Number.NaN, 1e-9, `numpy line, v_${index + 1}`));
    bias.flatThicknesses.forEach((thickness, index) => expectRelative(thickness, flat.thicknesses[index] ?? Number.NaN, 1e-9, `METHODS §2 recursion, h_${index + 1}`));
    expectRelative(bias.depthBias[1], (flat.thicknesses[0] ?? Number.NaN) + (flat.thicknesses[1] ?? Number.NaN) - 35_000, 1e-6, 'flat Moho − 35 km');
    expect(bias.flatVelocities[1] ?? 0).toBeGreaterThan(bias.flatVelocities[0] ?? Number.POSITIVE_INFINITY);
    expect(bias.flatVelocities[2] ?? 0).toBeGreaterThan(bias.flatVelocities[1] ?? Number.POSITIVE_INFINITY);
    // Pn reads 47 m/s fast as in METHODS 10.2; the depths err by about a hundred metres either way
    // (h_1 −118 m, h_2 +168 m: the lower crust is read fast too, 6520.7 m/s).
    expect(bias.velocityBias[2] ?? 0).toBeGreaterThan(40);
    expect(bias.velocityBias[1] ?? 0).toBeGreaterThan(10);
    expect(bias.thicknessBias.every((value) => value !== null)).toBe(true);
  });

  it('flat velocities still increase when the refractor is barely faster than the shell above (the derived ordering of branch slopes)', () => {
    // v_2 = 7999 over 200 km under v_3 = 8000: branch 2's turning chord ends (3224.8 km) with p = r_2/v_2,
    // just above branch 3's largest p = r_2/v_3 at its critical distance (3029.5 km). Picks where the two overlap.
    const close: Required<SphericalModel> = { velocities: [6000, 7999, 8000], thicknesses: [10_000, 200_000], radius: RADIUS };
    const closePicks = exactPicks(close, [
      { branch: 1, offsets: range(10_000, 80_000, 10_000) },
      { branch: 2, offsets: range(3_100_000, 3_220_000, 20_000) },
      { branch: 3, offsets: range(3_040_000, 3_200_000, 20_000) },
    ]);
    const bias = predictedFlatBias(close, closePicks);
    expect(bias.flatVelocities[2] ?? 0).toBeGreaterThan(bias.flatVelocities[1] ?? Number.POSITIVE_INFINITY);
    expect(bias.notes.filter((note) => note.code === 'velocity-not-increasing')).toEqual([]);
    expect(bias.thicknessBias.every((value) => value !== null)).toBe(true);
  });
});

describe('fitSphericalLayers: edges stated in the doc comment', () => {
  const few: SphericalPick[] = [
    { offset: 50_000, time: sphericalBranchTime(CASE_10_2, 1, 50_000) ?? Number.NaN, sigma: null, branch: 1 },
    { offset: 300_000, time: sphericalBranchTime(CASE_10_2, 2, 300_000) ?? Number.NaN, sigma: null, branch: 2 },
    { offset: 500_000, time: sphericalBranchTime(CASE_10_2, 2, 500_000) ?? Number.NaN, sigma: null, branch: 2 },
  ];

  it('zero degrees of freedom (n = p): the fit still solves, but σ̂², the covariance and every SE are null with a note', () => {
    const fit = fitSphericalLayers(few, FLAT_START, { radius: RADIUS });
    expect(fit.degreesOfFreedom).toBe(0);
    expect(fit.residualVariance).toBeNull();
    expect(fit.covariance).toBeNull();
    expect(fit.velocitySE).toBeNull();
    expect(fit.thicknessSE).toBeNull();
    expect(fit.depthSE).toBeNull();
    expect(fit.unscaledCovariance).not.toBeNull();
    expect(fit.notes.map((note) => note.code)).toEqual(['no-degrees-of-freedom']);
    expectRelative(fit.depths[0], 35_000, EXACT_RELATIVE, 'three exact picks fix three parameters');
  });

  it('exact data give standard errors near zero', () => {
    const fit = fitSphericalLayers(picks102, FLAT_START, { radius: RADIUS });
    expect(fit.thicknessSE?.[0] ?? Number.POSITIVE_INFINITY).toBeLessThan(1e-3);
    expect(fit.velocitySE?.[1] ?? Number.POSITIVE_INFINITY).toBeLessThan(1e-4);
  });

  it('stops at maxIterations with converged false and an iteration-limit note (0 steps returns the start)', () => {
    const fit = fitSphericalLayers(picks102, FLAT_START, { radius: RADIUS, maxIterations: 0 });
    expect(fit.converged).toBe(false);
    expect(fit.iterations).toBe(0);
    expect(fit.model.velocities).toEqual(FLAT_START.velocities);
    expect(fit.notes.map((note) => note.code)).toEqual(['iteration-limit']);
    const one = fitSphericalLayers(picks102, FLAT_START, { radius: RADIUS, maxIterations: 1 });
    expect(one.iterations).toBe(1);
    expect(one.converged).toBe(false);
  });

  it('a looser stepTolerance stops sooner', () => {
    const tight = fitSphericalLayers(picks102, FLAT_START, { radius: RADIUS });
    const loose = fitSphericalLayers(picks102, FLAT_START, { radius: RADIUS, stepTolerance: 1e-2 });
    expect(loose.converged).toBe(true);
    expect(loose.iterations).toBeLessThan(tight.iterations);
  });

  it('rejects steps that leave a pick outside its branch when the data pull the crust thin, and says the fit is pressed against that bound', () => {
    // Pn with a negative intercept cannot come from any crust: the best admissible model has h → 0.
    const pulled = picks102.map((pick) => (pick.branch === 2 ? { ...pick, time: pick.offset / 8000 - 0.5 } : { ...pick, time: pick.offset / 6300 }));
    // The edge it meets first is the direct wave's: the chord to the 150 km Pg pick must stay in the
    // top shell, so h ≥ R·(1 − cos(Δ/2)) = 441.5 m.
    const fit = fitSphericalLayers(pulled, { velocities: [6300, 8000], thicknesses: [5_000] }, { radius: RADIUS });
    const chordDepth = RADIUS * (1 - Math.cos(150_000 / RADIUS / 2));
    expect(fit.model.thicknesses[0] ?? -1).toBeGreaterThanOrEqual(chordDepth);
    expectWithin(fit.model.thicknesses[0], chordDepth, 1, 'closed form R·(1 − cos(Δ/2)) of the 150 km chord');
    expect(fit.converged).toBe(true);
    expect(fit.notes.map((note) => note.code)).toEqual(['at-bound']);
  });

  it('rejects steps that would make a thickness negative: an interface-arc fit whose Pn comes too early pins h_2 at 0', () => {
    // The direct chord always needs h_1 ≥ x²/(8R) > 0, and a turning chord needs room in its shell,
    // so the bare bound h ≥ 0 is met by a refractor shell under interface-arc head waves.
    const arc = { refractedRay: 'interface-arc' as const };
    const early = [
      ...range(10_000, 100_000, 10_000).map((offset) => ({ offset, branch: 1, shift: 0 })),
      ...range(100_000, 250_000, 10_000).map((offset) => ({ offset, branch: 2, shift: 0 })),
      ...range(200_000, 600_000, 20_000).map((offset) => ({ offset, branch: 3, shift: -4 })),
    ].map(({ offset, branch, shift }) => ({ offset, branch, sigma: null, time: (sphericalBranchTime(IASP91_CRUST, branch, offset, arc) ?? Number.NaN) + shift }));
    const fit = fitSphericalLayers(early, { velocities: [5800, 6500, 8040], thicknesses: [20_000, 15_000] }, { radius: RADIUS, ...arc });
    expect(fit.model.thicknesses[1] ?? -1).toBeGreaterThanOrEqual(0);
    expect(fit.model.thicknesses[1] ?? Number.POSITIVE_INFINITY).toBeLessThan(1);
    expect(fit.notes.map((note) => note.code)).toEqual(['at-bound']);
  });

  it('stalls with notes when JᵀWJ underflows (sigmas of 1e160 s): no step can be solved and no covariance formed', () => {
    const huge = picks102.map((pick) => ({ ...pick, sigma: 1e160 }));
    const fit = fitSphericalLayers(huge, FLAT_START, { radius: RADIUS });
    expect(fit.converged).toBe(false);
    expect(fit.notes.map((note) => note.code)).toEqual(['stalled', 'covariance-singular']);
    expect(fit.covariance).toBeNull();
    expect(fit.unscaledCovariance).toBeNull();
    expect(fit.velocitySE).toBeNull();
  });

  it('fits with the interface-arc head wave when asked, recovering a model from its own times', () => {
    const arcPicks = picks102.map((pick) => ({ ...pick, time: sphericalBranchTime(CASE_10_2, pick.branch, pick.offset, { refractedRay: 'interface-arc' }) ?? Number.NaN }));
    const fit = fitSphericalLayers(arcPicks, FLAT_START, { radius: RADIUS, refractedRay: 'interface-arc' });
    expect(fit.refractedRay).toBe('interface-arc');
    expectRelative(fit.depths[0], 35_000, EXACT_RELATIVE, 'interface-arc data, interface-arc fit');
    // Fitting those times with the turning chord reads the mantle slower (the arc is later than the chord).
    const mismatched = fitSphericalLayers(arcPicks, FLAT_START, { radius: RADIUS });
    expect(mismatched.model.velocities[1] ?? Number.POSITIVE_INFINITY).toBeLessThan(8000);
  });

  it('uses EARTH_MEAN_RADIUS when no radius is given', () => {
    const fit = fitSphericalLayers(few, FLAT_START);
    expect(fit.model.radius).toBe(6_371_008.8);
  });
});

describe('fitSphericalLayers and predictedFlatBias: misuse throws with the field and the fix', () => {
  const good = picks102;

  it('refuses no picks, bad values, mixed sigmas and branches outside 1…N', () => {
    expect(() => fitSphericalLayers([], FLAT_START)).toThrow(/no picks given/);
    expect(() => fitSphericalLayers([{ ...good[0]!, time: Number.NaN }, ...good.slice(1)], FLAT_START)).toThrow(/pick 1: time must be finite/);
    expect(() => fitSphericalLayers([{ ...good[0]!, offset: -1 }, ...good.slice(1)], FLAT_START)).toThrow(/pick 1: offset must be zero or positive/);
    expect(() => fitSphericalLayers(good.map((pick) => ({ ...pick, sigma: 0 })), FLAT_START)).toThrow(/sigma must be positive and finite/);
    expect(() => fitSphericalLayers([{ ...good[0]!, sigma: 0.05 }, ...good.slice(1)], FLAT_START)).toThrow(/1 of 56 picks have a sigma.*for every pick.*or for none/);
    expect(() => fitSphericalLayers([...good, { ...good[0]!, branch: 3 }], FLAT_START)).toThrow(/branch must be an integer from 1 to 2.*add a layer/);
  });

  it('refuses a branch without enough picks to fix its line', () => {
    const onePn = good.filter((pick) => pick.branch === 1 || pick.offset === 300_000);
    expect(() => fitSphericalLayers(onePn, FLAT_START)).toThrow(/branch 2 has picks at 1 distinct offsets, needs 2/);
    const zeroDirect = [{ ...good[0]!, offset: 0, time: 0 }, ...good.filter((pick) => pick.branch === 2)];
    expect(() => fitSphericalLayers(zeroDirect, FLAT_START)).toThrow(/branch 1 has picks at 0 distinct non-zero offsets/);
  });

  it('refuses a bad start, a start that misses a pick, and bad options', () => {
    expect(() => fitSphericalLayers(good, { velocities: [6000, 7800], thicknesses: [] })).toThrow(/need 1 thicknesses/);
    expect(() => fitSphericalLayers(good, { velocities: [6000, 0], thicknesses: [30_000] })).toThrow(/starting velocity of layer 2/);
    expect(() => fitSphericalLayers(good, { velocities: [6000, 7800], thicknesses: [-1] })).toThrow(/starting thickness of layer 1/);
    expect(() => fitSphericalLayers(good, { velocities: [6000, 7800], thicknesses: [7e6] }, { radius: RADIUS })).toThrow(/reach the centre/);
    // 200 km of crust puts Pn's critical distance beyond 200 km.
    expect(() => fitSphericalLayers(good, { velocities: [6000, 7800], thicknesses: [200_000] }, { radius: RADIUS })).toThrow(/branch 2 does not reach pick 16 at 200000 m.*start from thinner layers/);
    expect(() => fitSphericalLayers(good, FLAT_START, { maxIterations: -1 })).toThrow(/maxIterations must be a whole number/);
    expect(() => fitSphericalLayers(good, FLAT_START, { stepTolerance: 0 })).toThrow(/stepTolerance must be positive/);
    expect(() => fitSphericalLayers(good, FLAT_START, { radius: -1 })).toThrow(/radius must be positive/);
  });

  it('predictedFlatBias refuses a pick its model branch does not reach, and bad picks', () => {
    expect(() => predictedFlatBias(CASE_10_2, [...good, { offset: 50_000, time: 9, sigma: null, branch: 2 }])).toThrow(/branch 2 of the model does not reach pick 57 at 50000 m/);
    expect(() => predictedFlatBias(CASE_10_2, good.filter((pick) => pick.branch === 1))).toThrow(/branch 2 has picks at 0 distinct offsets/);
  });

  it('predictedFlatBias weights the lines by 1/σ² when the picks carry sigmas', () => {
    const unweighted = predictedFlatBias(CASE_10_2, good);
    const weighted = predictedFlatBias(
      CASE_10_2,
      good.map((pick) => ({ ...pick, sigma: pick.offset > 400_000 ? 0.01 : 0.2 })),
    );
    // Pn curves (the turning chord steepens less with distance): weighting the far picks reads it faster.
    expect(weighted.flatVelocities[1] ?? 0).toBeGreaterThan(unweighted.flatVelocities[1] ?? Number.POSITIVE_INFINITY);
  });
});
