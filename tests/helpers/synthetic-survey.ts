/**
 * Synthetic pick tables for pipeline tests. First arrivals come from the test-side ray-geometry
 * oracle (explicit ray paths: slant legs at Snell angles plus a refractor leg), which is not the
 * intercept-time formula that the inversion runs backwards. Noise is seeded Gaussian; outliers are
 * seeded too. The true branch of every pick is returned so segmentation can be scored.
 */
import { firstArrivalByRays } from '../oracles/ray-geometry.js';
import { seededNormal, seededRandom } from '../../lib/random.js';

export interface SyntheticSpec {
  readonly velocities: readonly number[];
  readonly thicknesses: readonly number[];
  readonly receivers: readonly number[];
  readonly shots: readonly number[];
  /** Gaussian pick noise, one SD, s. */
  readonly noise: number;
  /** Sigma written to the table (s), or null for no sigma column. */
  readonly sigma: number | null;
  readonly seed: number;
  /** Fraction of picks made outliers, and the size range of their error (s, either sign). */
  readonly outlierFraction?: number;
  readonly outlierSize?: readonly [number, number];
  /** Length unit of the table's position columns. Default m. */
  readonly distanceUnit?: 'm' | 'km';
  readonly timeUnit?: 'ms' | 's';
}

export interface SyntheticSurvey {
  readonly csv: string;
  /** True branch per data row, in row order (1 = direct wave). */
  readonly trueBranches: readonly number[];
  /** Whether each row was made an outlier. */
  readonly outliers: readonly boolean[];
}

export const range = (count: number, first: number, step: number): number[] =>
  Array.from({ length: count }, (_, k) => first + k * step);

export function syntheticSurvey(spec: SyntheticSpec): SyntheticSurvey {
  const noise = seededNormal(spec.seed);
  const uniform = seededRandom(spec.seed + 7919);
  const distanceScale = spec.distanceUnit === 'km' ? 1000 : 1;
  const timeScale = spec.timeUnit === 's' ? 1 : 1000;
  const distanceSuffix = spec.distanceUnit ?? 'm';
  const timeSuffix = spec.timeUnit ?? 'ms';
  const header = ['shot', `source_x_${distanceSuffix}`, `receiver_x_${distanceSuffix}`, `time_${timeSuffix}`];
  if (spec.sigma !== null) header.push(`sigma_${timeSuffix}`);
  const rows = [header.join(',')];
  const trueBranches: number[] = [];
  const outliers: boolean[] = [];
  spec.shots.forEach((shotX, shotIndex) => {
    for (const receiverX of spec.receivers) {
      const offset = Math.abs(receiverX - shotX);
      if (offset === 0) continue;
      const arrival = firstArrivalByRays(spec.velocities, spec.thicknesses, offset);
      let time = arrival.time + spec.noise * noise();
      const isOutlier = (spec.outlierFraction ?? 0) > 0 && uniform() < (spec.outlierFraction ?? 0);
      if (isOutlier) {
        const [low, high] = spec.outlierSize ?? [0.003, 0.008];
        time += (uniform() < 0.5 ? -1 : 1) * (low + (high - low) * uniform());
      }
      time = Math.max(0, time);
      const cells = [`S${shotIndex + 1}`, String(shotX / distanceScale), String(receiverX / distanceScale), (time * timeScale).toPrecision(10)];
      if (spec.sigma !== null) cells.push(String(spec.sigma * timeScale));
      rows.push(cells.join(','));
      trueBranches.push(arrival.branch);
      outliers.push(isOutlier);
    }
  });
  return { csv: `${rows.join('\n')}\n`, trueBranches, outliers };
}
