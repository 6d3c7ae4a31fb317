/**
 * Inputs of the client's unit tests, made the way the service makes them: a pick table read by
 * lib's reader, branch edits applied by lib's `applyBranchEdits`, interpreted by lib's `interpret`
 * at the engineering scale (m, ms, m/s). The engine is the oracle of the client's pure modules.
 */
import { readFileSync } from 'node:fs';
import { applyBranchEdits, type BranchEdit } from '../../lib/branches/edits.js';
import { interpret } from '../../lib/interpret.js';
import type { Interpretation as EngineInterpretation } from '../../lib/interpretation/shape.js';
import { readPickTable } from '../../lib/picks/index.js';
import type { PickSet } from '../../lib/picks/types.js';
import type { Interpretation } from '../../client/src/api-types.js';

/** The bundled demo survey (invented data) as text. */
export const SAMPLE_TEXT = readFileSync(new URL('../../sample-surveys/millbrook-quarry-bedrock.csv', import.meta.url), 'utf8');

export function readTable(text: string | Uint8Array): PickSet {
  const outcome = readPickTable(text);
  if (!outcome.ok) throw new Error(`the pick table did not load: ${outcome.problems.map((problem) => problem.message).join('; ')}`);
  return outcome.value;
}

export function applied(pickSet: PickSet, edits: readonly BranchEdit[]): PickSet {
  const outcome = applyBranchEdits(pickSet, edits);
  if (!outcome.ok) throw new Error(`lib refused the edits: ${outcome.problems.map((problem) => problem.message).join('; ')}`);
  return outcome.value;
}

/** What the service shows after storing a pick set: the engine's interpretation. */
export const engineView = (pickSet: PickSet): EngineInterpretation => interpret(pickSet, { scale: 'engineering' });

/** lib's interpretation seen through the client's type (a structural subset, see api-types.ts). */
export const asClient = (result: EngineInterpretation): Interpretation => result;
