/**
 * A gather trace as the picker reads it: its samples, sample interval and delay as the reader gave
 * them, and the signed offset receiver x − source x (m) when both positions are known, else null
 * (the neighbour check then orders traces by their place in the gather).
 *
 * @example
 * pickableTrace(gather.traces[0]); // { samples, sampleInterval: 0.00025, delay: 0, offset: 2 }
 */
import type { GatherTrace } from '../gathers/gather.js';
import type { PickableTrace } from './types.js';

export function pickableTrace(trace: GatherTrace): PickableTrace {
  const offset = trace.receiver !== null && trace.source !== null ? trace.receiver.x - trace.source.x : null;
  return { samples: trace.samples, sampleInterval: trace.sampleInterval, delay: trace.delay, offset };
}
