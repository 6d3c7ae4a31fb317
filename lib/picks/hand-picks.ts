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

/** A trace's key: shot, receiver and receiver position (a table's receiver of the same name elsewhere is another trace). */
const traceKey = (shot: string, receiver: string | null, receiverX: number) => `${shot}\u0000${receiver ?? ''}\u0000${receiverX}`;

/**
 * Hand-pick sigma for a record sampled every `sampleInterval` s: one sample, and never below
 * 0.5 ms — what a careful hand pick on an engineering record is good to (common practice).
 */
export function handPickSigma(sampleInterval: number): number {
  return Math.max(sampleInterval, 0.0005);
}

/**
 * The picks after the edits, in order (a placed pick goes after its shot's last pick). Linear in
 * picks plus edits: the edits are applied to a map of the traces, and the list is built once.
 */
export function applyHandPicks(picks: readonly Pick[], edits: readonly HandPick[]): Pick[] {
  const changed = new Map<string, Pick | null>();
  const placed = new Map<string, Pick[]>();
  const existing = new Map<string, Pick>();
  for (const pick of picks) existing.set(traceKey(pick.shot, pick.receiver, pick.receiverX), pick);
  for (const edit of edits) {
    const { trace } = edit;
    const key = traceKey(trace.shot, trace.receiver, trace.receiverX);
    const before = existing.get(key);
    const pendingPlaced = placed.get(trace.shot)?.findIndex((pick) => traceKey(pick.shot, pick.receiver, pick.receiverX) === key) ?? -1;
    if ('remove' in edit) {
      if (before !== undefined) changed.set(key, null);
      if (pendingPlaced >= 0) placed.get(trace.shot)!.splice(pendingPlaced, 1);
      continue;
    }
    if (before !== undefined) {
      changed.set(key, { ...before, time: edit.time, sigma: edit.sigma });
      continue;
    }
    const pick: Pick = {
      shot: trace.shot, receiver: trace.receiver, sourceX: trace.sourceX, receiverX: trace.receiverX,
      time: edit.time, sigma: edit.sigma, branch: null, excluded: false,
      sourceElevation: trace.sourceElevation, receiverElevation: trace.receiverElevation, sourceDepth: trace.sourceDepth,
      uphole: null, sourceLat: null, sourceLon: null, receiverLat: null, receiverLon: null, line: 0,
    };
    const list = placed.get(trace.shot) ?? [];
    if (pendingPlaced >= 0) list[pendingPlaced] = pick;
    else list.push(pick);
    placed.set(trace.shot, list);
  }
  const lastOfShot = new Map<string, number>();
  picks.forEach((pick, index) => lastOfShot.set(pick.shot, index));
  const result: Pick[] = [];
  picks.forEach((pick, index) => {
    const key = traceKey(pick.shot, pick.receiver, pick.receiverX);
    const edited = changed.has(key) ? changed.get(key)! : pick;
    if (edited !== null) result.push(edited);
    if (lastOfShot.get(pick.shot) === index) {
      result.push(...(placed.get(pick.shot) ?? []));
      placed.delete(pick.shot);
    }
  });
  for (const list of placed.values()) result.push(...list);
  return result;
}
