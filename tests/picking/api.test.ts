/**
 * The public API of lib/picking as another module codes against it (the names other engineers were
 * promised): this file must compile, and the defaults must carry the agreed fields.
 */
import { describe, expect, it } from 'vitest';
import {
  conditionTrace,
  DEFAULT_PICKING_OPTIONS,
  pickFirstBreaks,
  type PickableTrace,
  type PickingOptions,
  type TracePick,
} from '../../lib/picking/index.js';

describe('lib/picking public API', () => {
  it('PickingOptions has the agreed fields, each with a default', () => {
    const options: PickingOptions = {
      ...DEFAULT_PICKING_OPTIONS,
      bandPass: { low: 15, high: 250 },
      gain: { window: 0.05 },
      normalise: false,
      estimator: 'sta-lta',
      consistency: false,
    };
    expect(Object.keys(DEFAULT_PICKING_OPTIONS)).toEqual(expect.arrayContaining(['bandPass', 'gain', 'normalise', 'estimator', 'consistency']));
    const trace: PickableTrace = { samples: new Float32Array(64).map((_, k) => (k > 30 ? Math.sin(k) : 0.01 * Math.cos(7 * k))), sampleInterval: 0.001, delay: 0, offset: null };
    const conditioned: Float64Array = conditionTrace(trace, options);
    expect(conditioned).toHaveLength(64);
    const picks: TracePick[] = pickFirstBreaks([trace], { estimator: 'energy-ratio', bandPass: null });
    const [pick] = picks;
    const fields: (keyof TracePick)[] = ['traceIndex', 'time', 'sigma', 'confidence', 'lowConfidence', 'rejected', 'note'];
    expect(Object.keys(pick ?? {}).sort()).toEqual([...fields].sort());
  });
});
