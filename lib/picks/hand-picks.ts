/**
 * Hand edits of first-break picks — a pick moved to another time, placed on a trace that had
 * none, or removed — applied to a pick set to make the next one. Picks are found by shot and
 * receiver, which name one trace of one shot gather. A moved or placed pick gets the sigma of a
 * hand pick; its branch assignment and exclusion are kept.
 */
import type { Pick } from './types.js';

/** The trace a hand edit is on: where its pick lies, as the gather gives it. */
export interface EditedTrace {
  readonly shot: string;
  readonly receiver: string;
  readonly sourceX: number;
  readonly receiverX: number;
  readonly sourceElevation: number | null;
  readonly receiverElevation: number | null;
  readonly sourceDepth: number | null;
}

export type HandPick =
  | { readonly trace: EditedTrace; readonly time: number; readonly sigma: number }
  | { readonly trace: EditedTrace; readonly remove: true };

const sameTrace = (pick: Pick, trace: EditedTrace) => pick.shot === trace.shot && pick.receiver === trace.receiver;

/**
 * Hand-pick sigma for a record sampled every `sampleInterval` s: one sample, and never below
 * 0.5 ms — what a careful hand pick on an engineering record is good to (common practice).
 */
export function handPickSigma(sampleInterval: number): number {
  return Math.max(sampleInterval, 0.0005);
}

/** The picks after the edits, in order (a placed pick goes after its shot's last pick). */
export function applyHandPicks(picks: readonly Pick[], edits: readonly HandPick[]): Pick[] {
  let result = [...picks];
  for (const edit of edits) {
    const at = result.findIndex((pick) => sameTrace(pick, edit.trace));
    if ('remove' in edit) {
      if (at >= 0) result = [...result.slice(0, at), ...result.slice(at + 1)];
      continue;
    }
    if (at >= 0) {
      result[at] = { ...result[at]!, time: edit.time, sigma: edit.sigma };
      continue;
    }
    const { trace } = edit;
    const placed: Pick = {
      shot: trace.shot, receiver: trace.receiver, sourceX: trace.sourceX, receiverX: trace.receiverX,
      time: edit.time, sigma: edit.sigma, branch: null, excluded: false,
      sourceElevation: trace.sourceElevation, receiverElevation: trace.receiverElevation, sourceDepth: trace.sourceDepth,
      uphole: null, sourceLat: null, sourceLon: null, receiverLat: null, receiverLon: null, line: 0,
    };
    let last = -1;
    result.forEach((pick, index) => { if (pick.shot === trace.shot) last = index; });
    result.splice(last >= 0 ? last + 1 : result.length, 0, placed);
  }
  return result;
}
