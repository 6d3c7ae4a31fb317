/**
 * Butterworth band-pass design (Butterworth1930): the digital filter as second-order sections,
 * designed here from the analog low-pass prototype by the low-pass → band-pass transformation and
 * the bilinear transform with pre-warped band edges (OppenheimSchafer2010 ch. 7, chapter as
 * recalled).
 *
 * ```
 * prototype poles   p_m = exp(iπ(2m + N + 1)/(2N)),  m = 0…N−1   (|H(iω)|² = 1/(1 + ω^(2N)))
 * band edges        Ω_lo = (2/T)·tan(π·f_lo·T),  Ω_hi = (2/T)·tan(π·f_hi·T)     (pre-warping)
 *                   Ω₀ = √(Ω_lo·Ω_hi),  B = Ω_hi − Ω_lo
 * low-pass → band   s_lp = (s² + Ω₀²)/(B·s):  each p_m gives q = p_m·B/2 ± √((p_m·B/2)² − Ω₀²)
 *                   H(s) = B^N·s^N / Π_{j=1}^{2N} (s − q_j)
 * bilinear          s = (2/T)·(z − 1)/(z + 1):  pole q → (2/T + q)/(2/T − q),
 *                   N zeros at z = +1 (from s = 0) and N at z = −1 (from s = ∞)
 *                   gain k = B^N·(2/T)^N / Π (2/T − q_j)
 * ```
 *
 * Each section holds one conjugate pair of poles (or, for odd N with a band wider than twice its
 * centre, the two real poles of the prototype's real pole) and one zero at +1 and one at −1:
 * `b = g·[1, 0, −1]`, `a = [1, a₁, a₂]`; the gain is shared equally, g = k^(1/N) (the first section
 * carries its sign). The magnitude is 1/√2 at both band edges and 1 at the centre frequency
 * f₀ = atan(Ω₀·T/2)/(π·T). The cascade is the same transfer function as scipy's
 * `butter(N, [f_lo, f_hi], btype='band', fs=1/T, output='sos')`; the pairing of poles to sections
 * may differ, so coefficients are compared through the filtered output, not one by one.
 *
 * `order` is N, the order of the low-pass prototype (scipy's N): the band-pass has 2N poles and
 * rolls off at 6·N dB per octave on each side.
 *
 * Edges: misuse throws a RangeError with the field and the fix — an order that is not an integer
 * from 1 to 12 (higher orders gain nothing for first breaks and lose precision), a sample interval
 * not positive, band edges not finite, `low` ≤ 0, `high` ≤ `low`, or `high` at or above the
 * Nyquist frequency 1/(2T).
 *
 * @example
 * // 4th-order prototype, 20–250 Hz, 0.25 ms sampling: four sections, unit gain at the centre.
 * const sections = butterworthBandPass(4, 20, 250, 0.00025);
 * sections.length; // 4
 * bandPassCentre(20, 250, 0.00025); // 71.1 Hz (the geometric mean 70.7 Hz, moved by the warping)
 * bandPassGain(sections, bandPassCentre(20, 250, 0.00025), 0.00025); // 1
 */

/** One second-order section: y = (b₀ + b₁z⁻¹ + b₂z⁻²)/(1 + a₁z⁻¹ + a₂z⁻²)·x (a₀ = 1). */
export interface SecondOrderSection {
  readonly b0: number;
  readonly b1: number;
  readonly b2: number;
  readonly a1: number;
  readonly a2: number;
}

/** Highest prototype order accepted. */
export const MAX_BUTTERWORTH_ORDER = 12;

interface Complex {
  readonly re: number;
  readonly im: number;
}

const complex = (re: number, im = 0): Complex => ({ re, im });
const add = (left: Complex, right: Complex): Complex => complex(left.re + right.re, left.im + right.im);
const subtract = (left: Complex, right: Complex): Complex => complex(left.re - right.re, left.im - right.im);
const multiply = (left: Complex, right: Complex): Complex =>
  complex(left.re * right.re - left.im * right.im, left.re * right.im + left.im * right.re);
const scale = (value: Complex, factor: number): Complex => complex(value.re * factor, value.im * factor);
function divide(numerator: Complex, denominator: Complex): Complex {
  const norm = denominator.re * denominator.re + denominator.im * denominator.im;
  return complex(
    (numerator.re * denominator.re + numerator.im * denominator.im) / norm,
    (numerator.im * denominator.re - numerator.re * denominator.im) / norm,
  );
}
/** Principal square root. */
function squareRoot(value: Complex): Complex {
  const modulus = Math.hypot(value.re, value.im);
  const re = Math.sqrt(Math.max(0, (modulus + value.re) / 2));
  const im = Math.sqrt(Math.max(0, (modulus - value.re) / 2));
  return complex(re, value.im < 0 ? -im : im);
}

function checkBand(order: number, low: number, high: number, sampleInterval: number): void {
  if (!Number.isInteger(order) || order < 1 || order > MAX_BUTTERWORTH_ORDER) {
    throw new RangeError(`butterworthBandPass: order must be an integer from 1 to ${MAX_BUTTERWORTH_ORDER}, got ${order}; 2 to 4 suits first breaks`);
  }
  if (!(sampleInterval > 0) || !Number.isFinite(sampleInterval)) {
    throw new RangeError(`butterworthBandPass: sampleInterval must be a positive number of seconds, got ${sampleInterval}`);
  }
  const nyquist = 0.5 / sampleInterval;
  if (!Number.isFinite(low) || !Number.isFinite(high) || !(low > 0) || !(high > low)) {
    throw new RangeError(`butterworthBandPass: the band must satisfy 0 < low < high, got low ${low} Hz, high ${high} Hz; give both edges in Hz`);
  }
  if (!(high < nyquist)) {
    throw new RangeError(
      `butterworthBandPass: the high cut ${high} Hz is at or above the Nyquist frequency ${nyquist} Hz of a ${sampleInterval * 1000} ms sample interval; lower it below ${nyquist} Hz`,
    );
  }
}

/**
 * The digital Butterworth band-pass of prototype order `order` with −3 dB edges `low` and `high`
 * (Hz) for samples `sampleInterval` (s) apart, as `order` second-order sections.
 */
export function butterworthBandPass(order: number, low: number, high: number, sampleInterval: number): SecondOrderSection[] {
  checkBand(order, low, high, sampleInterval);
  const bilinearScale = 2 / sampleInterval;
  const lowEdge = bilinearScale * Math.tan(Math.PI * low * sampleInterval);
  const highEdge = bilinearScale * Math.tan(Math.PI * high * sampleInterval);
  const centreSquared = lowEdge * highEdge;
  const bandwidth = highEdge - lowEdge;

  // Analog band-pass poles, one section each: a pole with im ≥ 0 (its conjugate is implied), or,
  // for the real prototype pole of an odd order with a wide band, a pair of real poles.
  const conjugateSections: Complex[] = [];
  const realPairs: [number, number][] = [];
  for (let m = 0; m < order; m += 1) {
    const angle = (Math.PI * (2 * m + order + 1)) / (2 * order);
    const prototypePole = complex(Math.cos(angle), Math.sin(angle));
    if (2 * m + 1 === order) {
      // The real prototype pole −1 (odd order): roots of s² + B·s + Ω₀² = 0.
      const half = -bandwidth / 2;
      const discriminant = half * half - centreSquared;
      if (discriminant >= 0) {
        const root = Math.sqrt(discriminant);
        realPairs.push([half + root, half - root]);
      } else {
        conjugateSections.push(complex(half, Math.sqrt(-discriminant)));
      }
      continue;
    }
    if (prototypePole.im < 0) continue; // its conjugate gives the conjugate band-pass poles
    const half = scale(prototypePole, bandwidth / 2);
    const root = squareRoot(subtract(multiply(half, half), complex(centreSquared)));
    for (const pole of [add(half, root), subtract(half, root)]) {
      conjugateSections.push(pole.im >= 0 ? pole : complex(pole.re, -pole.im));
    }
  }

  // Gain of the whole cascade: k = B^N·(2/T)^N / Π(2/T − q_j), over all 2N poles.
  let denominatorProduct = complex(1);
  const denominators: { a1: number; a2: number }[] = [];
  const toDigital = (pole: Complex): Complex => divide(add(complex(bilinearScale), pole), subtract(complex(bilinearScale), pole));
  for (const pole of conjugateSections) {
    const factor = subtract(complex(bilinearScale), pole);
    // (2/T − q)(2/T − q̄) = |2/T − q|², real and positive.
    denominatorProduct = scale(denominatorProduct, factor.re * factor.re + factor.im * factor.im);
    const digital = toDigital(pole);
    denominators.push({ a1: -2 * digital.re, a2: digital.re * digital.re + digital.im * digital.im });
  }
  for (const [first, second] of realPairs) {
    denominatorProduct = scale(denominatorProduct, (bilinearScale - first) * (bilinearScale - second));
    const firstDigital = (bilinearScale + first) / (bilinearScale - first);
    const secondDigital = (bilinearScale + second) / (bilinearScale - second);
    denominators.push({ a1: -(firstDigital + secondDigital), a2: firstDigital * secondDigital });
  }
  const gain = (bandwidth * bilinearScale) ** order / denominatorProduct.re;
  const sectionGain = Math.abs(gain) ** (1 / order);
  return denominators.map(({ a1, a2 }, index) => {
    const g = index === 0 && gain < 0 ? -sectionGain : sectionGain;
    return { b0: g, b1: 0, b2: -g, a1, a2 };
  });
}

/** |H(e^{iωT})| of a cascade of sections at `frequency` (Hz) for samples `sampleInterval` (s) apart. */
export function bandPassGain(sections: readonly SecondOrderSection[], frequency: number, sampleInterval: number): number {
  const omega = 2 * Math.PI * frequency * sampleInterval;
  const zInverse = complex(Math.cos(omega), -Math.sin(omega));
  const zInverseSquared = multiply(zInverse, zInverse);
  let response = complex(1);
  for (const section of sections) {
    const numerator = add(add(complex(section.b0), scale(zInverse, section.b1)), scale(zInverseSquared, section.b2));
    const denominator = add(add(complex(1), scale(zInverse, section.a1)), scale(zInverseSquared, section.a2));
    response = multiply(response, divide(numerator, denominator));
  }
  return Math.hypot(response.re, response.im);
}

/** The centre frequency f₀ (Hz) of the digital band-pass with edges `low`, `high`: where its gain is 1. */
export function bandPassCentre(low: number, high: number, sampleInterval: number): number {
  const warpedCentre = Math.sqrt(Math.tan(Math.PI * low * sampleInterval) * Math.tan(Math.PI * high * sampleInterval));
  return Math.atan(warpedCentre) / (Math.PI * sampleInterval);
}
