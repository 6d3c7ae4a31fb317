/**
 * Branch colours and markers of the client's plots (client/src/branch-style.ts) stay apart for
 * readers with the common colour-vision deficiencies, and in greyscale print by shape alone.
 *
 * Sources:
 * - Colours: the Okabe–Ito palette (Okabe & Ito 2008, "Color Universal Design"); hex values
 *   recalled from memory.
 * - Dichromat simulation: Machado, Oliveira & Fernandes (2009), "A physiologically-based model for
 *   simulation of color vision deficiency", IEEE TVCG 15(6) — the severity-1.0 matrices for
 *   protanopia, deuteranopia and tritanopia, applied in linear RGB; values recalled from memory.
 * - sRGB transfer function and D65 XYZ matrix: IEC 61966-2-1; CIELAB and ΔE*ab (CIE 1976):
 *   CIE 15:2004.
 * - Threshold: ΔE*ab ≥ 10 between any two branch colours, well above the ~2.3 just-noticeable
 *   difference (Sharma 2003, recalled from memory); "clearly different at a glance" is common practice.
 */
import { describe, expect, it } from 'vitest';
import { branchStyle, EXCLUDED_STYLE, UNASSIGNED_STYLE } from '../../client/src/branch-style.js';

type Matrix = readonly [readonly [number, number, number], readonly [number, number, number], readonly [number, number, number]];

const SIMULATIONS: Record<string, Matrix> = {
  'normal vision': [[1, 0, 0], [0, 1, 0], [0, 0, 1]],
  protanopia: [[0.152286, 1.052583, -0.204868], [0.114503, 0.786281, 0.099216], [-0.003882, -0.048116, 1.051998]],
  deuteranopia: [[0.367322, 0.860646, -0.227968], [0.280085, 0.672501, 0.047413], [-0.01182, 0.04294, 0.968881]],
  tritanopia: [[1.255528, -0.076749, -0.178779], [-0.078411, 0.930809, 0.147602], [0.004733, 0.691367, 0.3039]],
};

/** Least ΔE*ab between two branch colours under every simulation. */
const MIN_DELTA_E = 10;
/** Branches drawn in practice: the direct wave and up to five refractors. */
const BRANCHES = [1, 2, 3, 4, 5, 6];

const toLinear = (channel: number) => (channel <= 0.04045 ? channel / 12.92 : ((channel + 0.055) / 1.055) ** 2.4);
const clamp = (value: number) => Math.min(1, Math.max(0, value));

function linearRgb(hex: string): [number, number, number] {
  const channel = (at: number) => toLinear(Number.parseInt(hex.slice(at, at + 2), 16) / 255);
  return [channel(1), channel(3), channel(5)];
}

function lab([red, green, blue]: readonly number[]): [number, number, number] {
  const x = (0.4124 * red! + 0.3576 * green! + 0.1805 * blue!) / 0.95047;
  const y = 0.2126 * red! + 0.7152 * green! + 0.0722 * blue!;
  const z = (0.0193 * red! + 0.1192 * green! + 0.9505 * blue!) / 1.08883;
  const f = (t: number) => (t > 216 / 24389 ? Math.cbrt(t) : ((24389 / 27) * t + 16) / 116);
  return [116 * f(y) - 16, 500 * (f(x) - f(y)), 200 * (f(y) - f(z))];
}

function seenAs(hex: string, matrix: Matrix): [number, number, number] {
  const rgb = linearRgb(hex);
  return lab(matrix.map((row) => clamp(row[0] * rgb[0] + row[1] * rgb[1] + row[2] * rgb[2])));
}

const deltaE = (left: readonly number[], right: readonly number[]) => Math.hypot(...left.map((value, k) => value - right[k]!));

describe('branchStyle', () => {
  it('uses Okabe–Ito colours for the first seven branches (Okabe & Ito 2008; values recalled from memory)', () => {
    const okabeIto = ['#E69F00', '#56B4E9', '#009E73', '#F0E442', '#0072B2', '#D55E00', '#CC79A7', '#000000'];
    for (const index of [1, 2, 3, 4, 5, 6, 7]) expect(okabeIto).toContain(branchStyle(index).color.toUpperCase());
  });

  for (const [name, matrix] of Object.entries(SIMULATIONS)) {
    it(`keeps every two of branches 1–6 at least ΔE*ab ${MIN_DELTA_E} apart under ${name} (Machado et al. 2009 simulation, CIE 1976 ΔE)`, () => {
      for (const first of BRANCHES) {
        for (const second of BRANCHES.filter((index) => index > first)) {
          const difference = deltaE(seenAs(branchStyle(first).color, matrix), seenAs(branchStyle(second).color, matrix));
          expect(difference, `branches ${first} and ${second} under ${name}`).toBeGreaterThanOrEqual(MIN_DELTA_E);
        }
      }
    });
  }

  it('gives every branch 1–7 its own marker shape, distinct from the excluded and unassigned markers (greyscale print)', () => {
    const shapes = [1, 2, 3, 4, 5, 6, 7].map((index) => branchStyle(index).symbol);
    expect(new Set(shapes).size).toBe(shapes.length);
    expect(shapes).not.toContain(EXCLUDED_STYLE.symbol);
    expect(shapes).not.toContain(UNASSIGNED_STYLE.symbol);
  });

  it('cycles past the seventh branch and treats indices below 1 as branch 1', () => {
    expect(branchStyle(8)).toEqual(branchStyle(1));
    expect(branchStyle(0)).toEqual(branchStyle(1));
  });
});
