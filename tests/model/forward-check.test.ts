import { describe, expect, it } from 'vitest';
import {
  DEFAULT_FORWARD_CHECK_MAX_NODES,
  forwardCheck,
  type DepthSection,
  type ForwardCheckOptions,
  type ForwardCheckPick,
  type ForwardCheckShot,
} from '../../lib/model/forward-check.js';
import { firstArrival, type LayeredModel } from '../../lib/model/layered-model.js';
import { expectRelative, expectWithin } from '../helpers/expect-within.js';
import { range } from '../helpers/synthetic-survey.js';
import { dippingHeadWaveTime, type DippingModel } from '../oracles/dipping-refractor.js';

const DEGREE = Math.PI / 180;

/** The brief for this check: grid times within 0.5 % of closed-form and Fermat head waves (smearing plus star gaps). */
const HEAD_WAVE_TOLERANCE = 0.005;
/** Picks built from the closed form must fit the true section to better than 0.1 ms RMS (METHODS 12.1: r = 5 errs by 0.0012 ms). */
const TRUE_SECTION_RMS = 0.1e-3;
/** A shifted mean is read to the grid error of the true section (below 0.1 ms, as above). */
const MEAN_TOLERANCE = 0.1e-3;
/** Pn at 300 km on the coarsened crustal grid: the brief's 1 %. */
const CRUSTAL_TOLERANCE = 0.01;
/** A straight leg in a uniform layer is late by at most 1/cos(atan(1/r)/2) − 1 = 0.49 % for r = 5 (the star's widest gap). */
const STAR_GAP_TOLERANCE = 1 / Math.cos(Math.atan(1 / 5) / 2) - 1;
/** Direct wave along the surface node row: (1, 0) edges are exact in a uniform layer; only rounding differs. */
const ROUNDING = 1e-12;

/** METHODS 12.1: 500 m/s over 2000 m/s, a horizontal interface at 10 m. */
const CASE_12_1: LayeredModel = { velocities: [500, 2000], thicknesses: [10] };
const case121Section = (depth: number): DepthSection => ({ velocities: [500, 2000], interfaces: [{ x: [0], depth: [depth] }] });

const surfaceShots = (positions: readonly number[]): ForwardCheckShot[] => positions.map((x, index) => ({ id: `S${index + 1}`, x, depth: 0 }));

/** Picks at every receiver except the shot's own position, timed by `timeOf(shot, receiverX)`. */
function picksFor(shots: readonly ForwardCheckShot[], receivers: readonly number[], timeOf: (shot: ForwardCheckShot, receiverX: number) => number): ForwardCheckPick[] {
  return shots.flatMap((shot) => receivers.filter((receiverX) => receiverX !== shot.x).map((receiverX) => ({ shot: shot.id, receiverX, time: timeOf(shot, receiverX) })));
}

/** METHODS §1 closed form (Telford et al. 1990 ch. 4) through lib/model/layered-model.ts, itself checked against the handbook formulas. */
const closedForm = (model: LayeredModel) => (shot: ForwardCheckShot, receiverX: number): number => firstArrival(model, Math.abs(receiverX - shot.x)).time;

describe('forwardCheck: horizontal two-layer section (METHODS 12.1 model, 500/2000 m/s, 10 m)', () => {
  const shots = surfaceShots([0, 50, 100]);
  const receivers = range(21, 0, 5);
  const picks = picksFor(shots, receivers, closedForm(CASE_12_1));
  const check = forwardCheck(case121Section(10), shots, picks);

  it('forwardCheck calculates the closed-form first arrivals within 0.5 %', () => {
    picks.forEach((pick, index) => {
      expectRelative(check.calculated[index], pick.time, HEAD_WAVE_TOLERANCE, `METHODS §1 / Telford et al. 1990 first arrival, shot ${pick.shot}, receiver ${pick.receiverX} m`);
    });
  });

  it('forwardCheck leaves residuals below 0.1 ms RMS for picks built from the closed form, overall and per shot', () => {
    expect(check.overallRms, 'overall RMS against METHODS §1 picks').not.toBeNull();
    expect(check.overallRms as number).toBeLessThan(TRUE_SECTION_RMS);
    for (const shot of check.perShot) {
      expect(shot.pickCount, `shot ${shot.shot}: 20 receivers besides the shot's own`).toBe(20);
      expect(shot.rms as number, `shot ${shot.shot} RMS against METHODS §1 picks`).toBeLessThan(TRUE_SECTION_RMS);
    }
    picks.forEach((pick, index) => {
      expectWithin(check.residuals[index], pick.time - (check.calculated[index] as number), 0, 'residual = t_obs − t_calc (METHODS §12)');
    });
  });

  it('forwardCheck sizes the default grid by the module rule: h = min(5 m / 2, 10 m / 8), margins (r + 1)·h', () => {
    // The module's stated rule, worked by hand: receiver spacing 5 m, mean interface depth 10 m, r = 5.
    expect(check.grid.spacing).toBe(1.25);
    expect(check.grid.radius).toBe(5);
    expectWithin(check.grid.originX, -7.5, 1e-12, 'min(x) − 6·1.25 m');
    expect(check.grid.columns, '(100 + 2·7.5) m / 1.25 m + 1').toBe(93);
    expect(check.grid.rows, '(10 + 7.5) m / 1.25 m + 1').toBe(15);
    expect(check.notes).toEqual([]);
  });
});

describe('forwardCheck: dipping refractor given as two points (METHODS check case 5.1)', () => {
  const dippingModel: DippingModel = { velocities: [600, 2400], interfaces: [{ depthAtOrigin: 8, dip: 6 * DEGREE }] };
  const section: DepthSection = { velocities: [600, 2400], interfaces: [{ x: [0, 120], depth: [8, 8 + 120 * Math.tan(6 * DEGREE)] }] };
  const shots = surfaceShots([0, 60, 120]);
  const receivers = range(25, 0, 5);
  // Fermat oracle (tests/oracles/dipping-refractor.ts) for the head wave, the straight direct ray otherwise.
  const fermat = (shot: ForwardCheckShot, receiverX: number): number =>
    Math.min(Math.abs(receiverX - shot.x) / 600, dippingHeadWaveTime(dippingModel, 1, shot.x, receiverX) ?? Number.POSITIVE_INFINITY);
  const picks = picksFor(shots, receivers, fermat);
  const largestError = (options: ForwardCheckOptions): number => {
    const check = forwardCheck(section, shots, picks, options);
    return Math.max(...picks.map((pick, index) => Math.abs(check.residuals[index] as number) / pick.time));
  };

  it('forwardCheck matches the Fermat-path times within 0.5 % on a 0.5 m grid with r = 8, shooting down-dip, up-dip and split', () => {
    // The default grid (1.79 m here) is up to 1.4 % late on this refractor (interface smearing, see the module comment).
    const check = forwardCheck(section, shots, picks, { spacing: 0.5, radius: 8 });
    picks.forEach((pick, index) => {
      expectRelative(check.calculated[index], pick.time, HEAD_WAVE_TOLERANCE, `Fermat oracle (dipping-refractor.ts), shot at ${shots.find((shot) => shot.id === pick.shot)?.x} m, receiver ${pick.receiverX} m`);
    });
  });

  it('forwardCheck converges on the dipping refractor: quartering the spacing (1 m → 0.25 m) at least halves the largest error', () => {
    // METHODS §12: always test refinement; halving h should roughly halve a first-order error.
    const coarse = largestError({ spacing: 1 });
    const fine = largestError({ spacing: 0.25 });
    expect(fine, `largest relative error at 1 m ${coarse}, at 0.25 m ${fine}`).toBeLessThan(coarse / 2);
  });
});

describe('forwardCheck: per-shot and per-receiver residuals', () => {
  const shots = surfaceShots([0, 50, 100]);
  const receivers = range(21, 0, 5);
  const truth = closedForm(CASE_12_1);
  const badShot = 'S2';
  const badReceiver = 40;
  // Picks listed receiver by receiver, from the far end, so that grouping and sorting are exercised.
  const picks: ForwardCheckPick[] = [...receivers].reverse().flatMap((receiverX) =>
    shots
      .filter((shot) => shot.x !== receiverX)
      .map((shot) => ({
        shot: shot.id,
        receiverX,
        time: truth(shot, receiverX) + (shot.id === badShot ? 3e-3 : 0) + (receiverX === badReceiver ? 2e-3 : 0),
      })),
  );
  const check = forwardCheck(case121Section(10), shots, picks);

  it('forwardCheck puts a +3 ms shot-time error into that shot\'s mean residual and leaves the others near 0', () => {
    // Common practice: a late shot shows as a per-shot mean offset. The +2 ms receiver adds 2/20 ms to every shot's mean.
    for (const shot of check.perShot) {
      const expected = (shot.shot === badShot ? 3e-3 : 0) + 2e-3 / 20;
      expectWithin(shot.mean, expected, MEAN_TOLERANCE, `per-shot mean of shot ${shot.shot} (picks shifted by hand)`);
    }
  });

  it('forwardCheck puts a +2 ms receiver error in every shot into that receiver\'s mean residual, receivers listed by x ascending', () => {
    // Common practice: a bad receiver shows as the same mean offset in every shot. The +3 ms shot adds 1 ms to receivers it shares with one other shot.
    expect(check.perReceiver.map((receiver) => receiver.receiverX)).toEqual(receivers);
    for (const receiver of check.perReceiver) {
      const shotsHere = shots.filter((shot) => shot.x !== receiver.receiverX);
      expect(receiver.pickCount, `receiver ${receiver.receiverX} m: one pick per shot not at the receiver`).toBe(shotsHere.length);
      const fromBadShot = shotsHere.some((shot) => shot.id === badShot) ? 3e-3 / shotsHere.length : 0;
      const expected = (receiver.receiverX === badReceiver ? 2e-3 : 0) + fromBadShot;
      expectWithin(receiver.mean, expected, MEAN_TOLERANCE, `per-receiver mean at ${receiver.receiverX} m (picks shifted by hand)`);
    }
  });

  it('forwardCheck computes excluded picks but leaves them out of every RMS, mean and count', () => {
    const truePicks = picksFor(shots, receivers, truth);
    const withOutlier: ForwardCheckPick[] = [...truePicks, { shot: 'S1', receiverX: 40, time: truth(shots[0] as ForwardCheckShot, 40) + 0.05, excluded: true }];
    const plain = forwardCheck(case121Section(10), shots, truePicks);
    const excluded = forwardCheck(case121Section(10), shots, withOutlier);
    const outlier = withOutlier.length - 1;
    // The module's rule: computed like any pick (the true time + 50 ms by construction), not summed.
    expectWithin(excluded.residuals[outlier], 0.05, MEAN_TOLERANCE, 'residual of the excluded pick (50 ms added by hand)');
    expectWithin(excluded.calculated[outlier], plain.calculated[truePicks.findIndex((pick) => pick.shot === 'S1' && pick.receiverX === 40)] as number, 0, 'same calculated time as the included twin');
    expect(excluded.overallRms).toBe(plain.overallRms);
    expect(excluded.perShot[0]).toEqual({ ...plain.perShot[0], excludedCount: 1 });
    expect(excluded.perReceiver.find((receiver) => receiver.receiverX === 40)).toEqual({ ...plain.perReceiver.find((receiver) => receiver.receiverX === 40), excludedCount: 1 });
  });

  it('forwardCheck gives a null RMS and mean for a shot without picks, and a null overall RMS for no picks', () => {
    const extraShots = [...shots, { id: 'unused', x: 30, depth: 0 }];
    const check = forwardCheck(case121Section(10), extraShots, picksFor(shots, receivers, truth));
    expect(check.perShot[3]).toEqual({ shot: 'unused', pickCount: 0, excludedCount: 0, rms: null, mean: null });
    const onlyExcluded = forwardCheck(case121Section(10), shots, [{ shot: 'S1', receiverX: 20, time: 0.04, excluded: true }]);
    expect(onlyExcluded.overallRms).toBeNull();
    expect(onlyExcluded.perShot[0]).toEqual({ shot: 'S1', pickCount: 0, excludedCount: 1, rms: null, mean: null });
    const none = forwardCheck(case121Section(10), shots, []);
    expect(none.overallRms).toBeNull();
    expect(none.perReceiver).toEqual([]);
    expect(none.residuals.length).toBe(0);
  });
});

describe('forwardCheck: a wrong section fails the check', () => {
  it('forwardCheck gives a section 20 % too deep (12 m for 10 m) residuals far above those of the true section', () => {
    const shots = surfaceShots([0, 50, 100]);
    const picks = picksFor(shots, range(21, 0, 5), closedForm(CASE_12_1));
    const truth = forwardCheck(case121Section(10), shots, picks);
    const wrong = forwardCheck(case121Section(12), shots, picks);
    // METHODS §1: τ = 2h·√(s₁² − s₂²), so 2 m more overburden delays every head wave by 7.7 ms.
    expect(truth.overallRms as number).toBeLessThan(TRUE_SECTION_RMS);
    expect(wrong.overallRms as number, `RMS of the 12 m section ${wrong.overallRms}, of the true one ${truth.overallRms}`).toBeGreaterThan(1e-3);
    expect(wrong.overallRms as number).toBeGreaterThan(10 * (truth.overallRms as number));
    for (const shot of wrong.perShot) expect(shot.mean as number, `shot ${shot.shot}: the deeper model is late, so t_obs − t_calc < 0`).toBeLessThan(-1e-3);
  });
});

describe('forwardCheck: crustal section (600 km line, Moho at 35 km)', () => {
  it('forwardCheck coarsens the grid to at most maxNodes and keeps Pn at 300 km within 1 % of the closed form', () => {
    // Crust 6.0 km/s over mantle 8.0 km/s with the Moho at 35 km: textbook values, recalled from memory.
    const model: LayeredModel = { velocities: [6000, 8000], thicknesses: [35_000] };
    const shots = surfaceShots([0, 300_000, 600_000]);
    const receivers = range(2401, 0, 250);
    const picks = picksFor(shots, receivers, closedForm(model));
    const check = forwardCheck({ velocities: [6000, 8000], interfaces: [{ x: [0, 600_000], depth: [35_000, 35_000] }] }, shots, picks);
    expect(check.grid.columns * check.grid.rows).toBeLessThanOrEqual(DEFAULT_FORWARD_CHECK_MAX_NODES);
    expect(check.notes.map((note) => note.code)).toEqual(['spacing-coarsened']);
    expect(check.grid.spacing, 'coarser than the default 250 m / 2').toBeGreaterThan(125);
    const pn = picks.findIndex((pick) => pick.shot === 'S1' && pick.receiverX === 300_000);
    expect(firstArrival(model, 300_000).branch, 'Pn is first at 300 km (METHODS §1)').toBe(2);
    expectRelative(check.calculated[pn], picks[pn]?.time ?? Number.NaN, CRUSTAL_TOLERANCE, 'METHODS §1 / Telford et al. 1990 head wave at 300 km');
  });

  it('forwardCheck takes the median receiver gap and the mean interface depth for the default spacing', () => {
    // The module's rule worked by hand. Receivers with gaps 2, 2, 2, 0.5, 2, 2 m (median 2 m) over a 40 m interface: min(2/2, 40/8) = 1 m.
    const shots = surfaceShots([0, 10.5]);
    const irregular = [0, 2, 4, 6, 6.5, 8.5, 10.5];
    const byReceivers = forwardCheck(case121Section(40), shots, picksFor(shots, irregular, () => 0.01));
    expect(byReceivers.grid.spacing).toBe(1);
    // A refractor from 8 m to 24 m under a 0…100 m line (mean 16 m), receivers every 10 m: min(10/2, 16/8) = 2 m.
    const dippingShots = surfaceShots([0, 100]);
    const dipping = forwardCheck({ velocities: [500, 2000], interfaces: [{ x: [0, 100], depth: [8, 24] }] }, dippingShots, picksFor(dippingShots, range(11, 0, 10), () => 0.05));
    expectWithin(dipping.grid.spacing, 2, 1e-3, 'mean depth 16 m / 8 (trapezoid mean of a straight line is exact)');
  });

  it('forwardCheck coarsens a spacing given by the caller too, with a note naming both spacings', () => {
    const shots = surfaceShots([0, 100]);
    const check = forwardCheck(case121Section(10), shots, picksFor(shots, range(21, 0, 5), closedForm(CASE_12_1)), { spacing: 0.01, maxNodes: 10_000 });
    expect(check.grid.columns * check.grid.rows).toBeLessThanOrEqual(10_000);
    expect(check.grid.spacing).toBeGreaterThan(0.01);
    expect(check.notes).toHaveLength(1);
    expect(check.notes[0]?.code).toBe('spacing-coarsened');
    expect(check.notes[0]?.message).toContain('0.01000 m');
  });
});

describe('forwardCheck: sections with one layer and buried shots', () => {
  it('forwardCheck gives the direct-wave time x/V of a one-velocity section exactly', () => {
    // Straight ray along the surface in a uniform layer (t = x/V); the grid's (1, 0) edges are exact there.
    const shots = surfaceShots([0]);
    const check = forwardCheck({ velocities: [1500], interfaces: [] }, shots, picksFor(shots, range(11, 0, 10), () => 0));
    check.calculated.forEach((time, index) => expectWithin(time, (10 * (index + 1)) / 1500, ROUNDING, `x/V at ${10 * (index + 1)} m`));
  });

  it('forwardCheck starts a buried shot at its depth: straight-ray times √(x² + d²)/V within the star\'s 0.49 % gap', () => {
    const shots: ForwardCheckShot[] = [{ id: 'B', x: 0, depth: 10 }];
    const receivers = range(7, 0, 10);
    // Every receiver, the one straight above the shot included (picksFor would leave it out).
    const picks = receivers.map((receiverX) => ({ shot: 'B', receiverX, time: 0 }));
    const check = forwardCheck({ velocities: [1000], interfaces: [] }, shots, picks);
    receivers.forEach((receiverX, index) => {
      expectRelative(check.calculated[index], Math.hypot(receiverX, 10) / 1000, STAR_GAP_TOLERANCE, `straight ray from 10 m depth to ${receiverX} m (geometry)`);
    });
  });

  it('forwardCheck falls back to 1/100 of the line for the spacing when no receiver spacing or interface exists, with a note', () => {
    const check = forwardCheck({ velocities: [1500], interfaces: [] }, surfaceShots([0]), [{ shot: 'S1', receiverX: 100, time: 0.07 }]);
    expect(check.grid.spacing).toBe(1);
    expect(check.notes.map((note) => note.code)).toEqual(['spacing-fallback']);
    expectWithin(check.calculated[0], 100 / 1500, ROUNDING, 'x/V at 100 m');
  });
});

describe('forwardCheck: crossing interfaces and misuse', () => {
  // Three layers: interface 2 rises from 30 m at x = 100 m to 6 m at x = 0 and crosses interface 1 (10 m) at x = 16.67 m.
  const crossing: DepthSection = { velocities: [500, 1500, 3000], interfaces: [{ x: [0], depth: [10] }, { x: [0, 100], depth: [6, 30] }] };
  // The module's clipping rule z'_2 = max(z_1, z_2), written out by hand as points.
  const clippedByHand: DepthSection = { velocities: [500, 1500, 3000], interfaces: [{ x: [0], depth: [10] }, { x: [0, 50 / 3, 100], depth: [10, 10, 30] }] };
  const shots = surfaceShots([0, 100]);
  const picks = picksFor(shots, range(21, 0, 5), () => 0.05);

  it('forwardCheck clips an interface that crosses above a shallower one, with a note, and computes the clipped section', () => {
    const check = forwardCheck(crossing, shots, picks);
    expect(check.notes.map((note) => note.code)).toEqual(['interfaces-clipped']);
    expect(check.notes[0]?.message).toContain('interface 2 crosses above interface 1 (by up to 4.00 m, at x = 0 m)');
    const byHand = forwardCheck(clippedByHand, shots, picks);
    expect(byHand.notes).toEqual([]);
    check.calculated.forEach((time, index) => expectWithin(time, byHand.calculated[index] as number, 1e-12, `clipped by the module and by hand, pick ${index + 1}`));
  });

  it('forwardCheck clips the deepest of three interfaces against every interface above it, not only the next one', () => {
    // Interface 2 rises from 30 m to 4 m, interface 3 from 40 m to 8 m: both cross above interface 1 (10 m), never each other.
    const threeCrossing: DepthSection = {
      velocities: [500, 1500, 2500, 4000],
      interfaces: [{ x: [0], depth: [10] }, { x: [0, 100], depth: [4, 30] }, { x: [0, 100], depth: [8, 40] }],
    };
    // z'_k = max(0, z_1, …, z_k) by hand: interface 2 held at 10 m up to x = 300/13 = 23.08 m, interface 3 up to x = 6.25 m.
    const threeByHand: DepthSection = {
      velocities: [500, 1500, 2500, 4000],
      interfaces: [{ x: [0], depth: [10] }, { x: [0, 300 / 13, 100], depth: [10, 10, 30] }, { x: [0, 6.25, 100], depth: [10, 10, 40] }],
    };
    const check = forwardCheck(threeCrossing, shots, picks);
    expect(check.notes.map((note) => note.message.slice(0, 37))).toEqual(['interface 2 crosses above interface 1', 'interface 3 crosses above interface 1']);
    const byHand = forwardCheck(threeByHand, shots, picks);
    check.calculated.forEach((time, index) => expectWithin(time, byHand.calculated[index] as number, 1e-12, `clipped by the module and by hand, pick ${index + 1}`));
  });

  it('forwardCheck holds an interface above the ground at the surface, with a note', () => {
    const check = forwardCheck({ velocities: [500, 2000], interfaces: [{ x: [0, 100], depth: [-2, 18] }] }, shots, picks);
    expect(check.notes.map((note) => note.code)).toEqual(['interface-above-surface']);
    const byHand = forwardCheck({ velocities: [500, 2000], interfaces: [{ x: [0, 10, 100], depth: [0, 0, 18] }] }, shots, picks);
    check.calculated.forEach((time, index) => expectWithin(time, byHand.calculated[index] as number, 1e-12, `held at the surface, pick ${index + 1}`));
  });

  it('forwardCheck throws a RangeError naming an unknown shot and the fix', () => {
    const stray: ForwardCheckPick[] = [...picks, { shot: 'S9', receiverX: 20, time: 0.03 }];
    expect(() => forwardCheck(case121Section(10), shots, stray)).toThrow(RangeError);
    expect(() => forwardCheck(case121Section(10), shots, stray)).toThrow(/shot "S9", which is not among the 2 shots given; add shot "S9"/);
  });

  it('forwardCheck throws a RangeError with a message for malformed sections, shots and options', () => {
    const good = case121Section(10);
    const cases: [string, () => unknown, RegExp][] = [
      ['interface count', () => forwardCheck({ velocities: [500, 2000], interfaces: [] }, shots, picks), /2 velocities need 1 interfaces/],
      ['x not ascending', () => forwardCheck({ velocities: [500, 2000], interfaces: [{ x: [10, 0], depth: [5, 6] }] }, shots, picks), /strictly ascending/],
      ['unequal points', () => forwardCheck({ velocities: [500, 2000], interfaces: [{ x: [0, 10], depth: [5] }] }, shots, picks), /as many depths as x values/],
      ['velocity', () => forwardCheck({ velocities: [0, 2000], interfaces: [{ x: [0], depth: [5] }] }, shots, picks), /velocity of layer 1 must be positive/],
      ['duplicate shot', () => forwardCheck(good, [...shots, { id: 'S1', x: 5, depth: 0 }], picks), /two shots have the id "S1"/],
      ['negative depth', () => forwardCheck(good, [{ id: 'S1', x: 0, depth: -1 }, { id: 'S2', x: 100, depth: 0 }], picks), /depth of shot "S1"/],
      ['pick time', () => forwardCheck(good, shots, [{ shot: 'S1', receiverX: 10, time: Number.NaN }]), /time of pick 1/],
      ['spacing', () => forwardCheck(good, shots, picks, { spacing: 0 }), /spacing must be positive/],
      ['radius', () => forwardCheck(good, shots, picks, { radius: 1.5 }), /radius must be an integer/],
      ['maxNodes', () => forwardCheck(good, shots, picks, { maxNodes: 100 }), /maxNodes must be an integer ≥ 120/],
    ];
    for (const [name, call, message] of cases) expect(call, name).toThrow(message);
  });
});

describe('forwardCheck: ground relief carried by depths below the ground', () => {
  // A horizontal refractor at elevation 90 m under ground rising by `rise` over 120 m, V 600/2400 m/s.
  // Head-wave time for ends at heights h_s, h_r above a plane horizontal refractor:
  // t = x/V_2 + (h_s + h_r)·q_{1,2} (Telford et al. 1990 ch. 4; METHODS §8), exact whatever the ground
  // between the ends; the direct wave takes the slant distance. The section is given as depth below
  // the ground (e − 90 m) on the check's flat-topped grid, as the pipeline gives it.
  const q = Math.sqrt(1 / 600 ** 2 - 1 / 2400 ** 2);
  for (const rise of [2, 6, 12]) {
    it(`forwardCheck of a section in depth below ground stays within 0.5 % of the true times for ground rising ${rise} m over 120 m`, () => {
      const ground = (x: number) => 100 + (rise * x) / 120;
      const closedForm = (sourceX: number, receiverX: number) =>
        Math.min(Math.hypot(receiverX - sourceX, ground(receiverX) - ground(sourceX)) / 600, Math.abs(receiverX - sourceX) / 2400 + (ground(sourceX) - 90 + ground(receiverX) - 90) * q);
      const shots = [
        { id: 'A', x: 0, depth: 0 },
        { id: 'B', x: 120, depth: 0 },
      ];
      const picks = shots.flatMap((shot) => range(48, 2.5, 2.5).filter((x) => x !== shot.x).map((receiverX) => ({ shot: shot.id, receiverX, time: closedForm(shot.x, receiverX) })));
      const section = { velocities: [600, 2400], interfaces: [{ x: [0, 120], depth: [ground(0) - 90, ground(120) - 90] }] };
      const check = forwardCheck(section, shots, picks, { spacing: 0.25 });
      picks.forEach((pick, k) => expectRelative(check.calculated[k], pick.time, 0.005, `shot ${pick.shot}, receiver ${pick.receiverX} m (closed form)`));
      expect(check.overallRms!).toBeLessThan(3e-4);
    });
  }
});

describe('forwardCheck: the fineness option (the default spacing refined where maxNodes allows)', () => {
  // METHODS 12.1: 500/2000 m/s over 10 m, surface shot at x = 0, receivers at 10 … 100 m; the analytic
  // first arrivals published with the check case (ms), computed there from the stated model.
  const receivers121 = [10, 20, 30, 40, 60, 80, 100];
  const analytic121 = [20.0, 40.0, 53.7298, 58.7298, 68.7298, 78.7298, 88.7298].map((ms) => ms / 1000);
  const shot121 = surfaceShots([0]);
  const picks121: ForwardCheckPick[] = receivers121.map((receiverX, index) => ({ shot: 'S1', receiverX, time: analytic121[index] as number }));
  // METHODS 12.1 prints 1e-4 ms: half a unit of the last digit.
  const PRINTED = 0.5e-7;
  // The line of the 12.1 describe above: shots at 0, 50, 100 m, receivers every 5 m; default spacing 1.25 m (worked there by hand).
  const shots = surfaceShots([0, 50, 100]);
  const picks = picksFor(shots, range(21, 0, 5), closedForm(CASE_12_1));

  it('the METHODS 12.1 analytic times are the closed form (Telford et al. 1990 ch. 4) the fineness checks below lean on', () => {
    receivers121.forEach((receiverX, index) => expectWithin(firstArrival(CASE_12_1, receiverX).time, analytic121[index] as number, PRINTED, `METHODS 12.1 at ${receiverX} m`));
  });

  it('forwardCheck with fineness 4 runs on the default spacing / 4 (1.25 m → 0.3125 m) when maxNodes allows, with no note', () => {
    const coarse = forwardCheck(case121Section(10), shots, picks);
    const fine = forwardCheck(case121Section(10), shots, picks, { fineness: 4 });
    expect(coarse.grid.spacing).toBe(1.25);
    expect(fine.grid.spacing).toBe(1.25 / 4);
    // The module's margins worked by hand at 0.3125 m: (100 + 2·6·0.3125) / 0.3125 + 1 columns, (10 + 6·0.3125) / 0.3125 + 1 rows.
    expect(fine.grid.columns).toBe(333);
    expect(fine.grid.rows).toBe(39);
    expect(fine.notes).toEqual([]);
    // fineness 1 is the default.
    expect(forwardCheck(case121Section(10), shots, picks, { fineness: 1 }).grid).toEqual(coarse.grid);
  });

  it('forwardCheck coarsens a refined grid to fit maxNodes without a spacing-coarsened note while it stays at or below the default spacing', () => {
    // 5 000 nodes: more than the default grid's 93 × 15 = 1 395, fewer than the refined 333 × 39 = 12 987.
    const squeezed = forwardCheck(case121Section(10), shots, picks, { fineness: 4, maxNodes: 5000 });
    expect(squeezed.grid.columns * squeezed.grid.rows).toBeLessThanOrEqual(5000);
    expect(squeezed.grid.spacing).toBeGreaterThan(0.3125);
    expect(squeezed.grid.spacing).toBeLessThanOrEqual(1.25);
    expect(squeezed.notes).toEqual([]);
    // Below the default grid's own size the spacing passes the default: then it is noted, naming the default spacing.
    const tight = forwardCheck(case121Section(10), shots, picks, { fineness: 4, maxNodes: 1000 });
    expect(tight.grid.spacing).toBeGreaterThan(1.25);
    expect(tight.notes.map((note) => note.code)).toEqual(['spacing-coarsened']);
    expect(tight.notes[0]?.message).toContain('a 1.250 m grid');
  });

  it('forwardCheck leaves a spacing given by the caller alone whatever the fineness', () => {
    expect(forwardCheck(case121Section(10), shots, picks, { spacing: 0.5, fineness: 4 }).grid.spacing).toBe(0.5);
  });

  it('forwardCheck throws a RangeError for a fineness below 1, NaN or infinite', () => {
    for (const fineness of [0.5, 0, -2, 0.999, Number.NaN, Number.POSITIVE_INFINITY]) {
      expect(() => forwardCheck(case121Section(10), shots, picks, { fineness }), `fineness ${fineness}`).toThrow(RangeError);
      expect(() => forwardCheck(case121Section(10), shots, picks, { fineness }), `fineness ${fineness}`).toThrow(/fineness must be a finite number ≥ 1/);
    }
  });

  it('forwardCheck with fineness 4 is at least as accurate on METHODS 12.1, both within 0.1 % of the analytic times', () => {
    const largestError = (options: ForwardCheckOptions) => {
      const check = forwardCheck(case121Section(10), shot121, picks121, options);
      return Math.max(...analytic121.map((time, index) => Math.abs((check.calculated[index] as number) - time)));
    };
    const byDefault = largestError({});
    const refined = largestError({ fineness: 4 });
    // METHODS 12.1's suggested tolerance for shortest path with r ≥ 5: 0.1 % (largest analytic time 88.7 ms).
    expect(byDefault).toBeLessThan(0.001 * 0.0887298);
    expect(refined).toBeLessThan(0.001 * 0.0887298);
    // The interface lies on a node row of both grids (10 m = 8 × 1.25 m = 32 × 0.3125 m), so what error is
    // left is the star's angular gaps, which do not scale with h (measured 0.00126 ms on both grids, as
    // METHODS 12.1 reports for r = 5): the refined grid must not be worse (rounding slack 1e-12 s).
    expect(refined, `largest error ${byDefault} s by default, ${refined} s with fineness 4`).toBeLessThanOrEqual(byDefault + 1e-12);
  });

  it('forwardCheck with fineness 4 at least halves the largest error on the dipping refractor of METHODS 5.1 (refinement, METHODS §12)', () => {
    // METHODS §12: halving h should roughly halve a first-order error; here h falls to a quarter.
    const dippingModel: DippingModel = { velocities: [600, 2400], interfaces: [{ depthAtOrigin: 8, dip: 6 * DEGREE }] };
    const section: DepthSection = { velocities: [600, 2400], interfaces: [{ x: [0, 120], depth: [8, 8 + 120 * Math.tan(6 * DEGREE)] }] };
    const dippingShots = surfaceShots([0, 60, 120]);
    const fermat = (shot: ForwardCheckShot, receiverX: number): number =>
      Math.min(Math.abs(receiverX - shot.x) / 600, dippingHeadWaveTime(dippingModel, 1, shot.x, receiverX) ?? Number.POSITIVE_INFINITY);
    const dippingPicks = picksFor(dippingShots, range(25, 0, 5), fermat);
    const largestRelative = (options: ForwardCheckOptions) => {
      const check = forwardCheck(section, dippingShots, dippingPicks, options);
      return Math.max(...dippingPicks.map((pick, index) => Math.abs(check.residuals[index] as number) / pick.time));
    };
    const byDefault = largestRelative({});
    const refined = largestRelative({ fineness: 4 });
    expect(refined, `largest relative error ${byDefault} by default, ${refined} with fineness 4`).toBeLessThan(byDefault / 2);
  });
});
