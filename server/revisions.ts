/**
 * Interpreting a stored survey and keeping the result as its next numbered revision, with the
 * options that produced it: one place for the HTTP route and for the samples loaded at start-up.
 */
import { interpret as defaultInterpret, type InterpretOptions } from '../lib/interpret.js';
import type { PickSet } from '../lib/picks/types.js';
import type { Interpretation } from '../lib/interpretation/shape.js';
import type { RevisionSummary, SurveyStore } from './storage/survey-store.js';

export interface InterpretationMeta {
  readonly sourceName: string;
  readonly softwareVersion: string;
  readonly interpret?: typeof defaultInterpret;
}

/** The pipeline run as the service runs it: the request's options plus the source name and version. */
export function runInterpretation(
  pickSet: PickSet,
  options: Omit<InterpretOptions, 'sourceName' | 'softwareVersion'>,
  meta: InterpretationMeta,
): Interpretation {
  return (meta.interpret ?? defaultInterpret)(pickSet, { ...options, sourceName: meta.sourceName, softwareVersion: meta.softwareVersion });
}

export interface StoredInterpretation {
  readonly revision: RevisionSummary;
  readonly result: Interpretation;
}

/**
 * Runs `interpret` on `pickSet` with `options` (stored as given, so the revision says what produced
 * it) and adds the revision, guarded by `expectedVersion` when given (a stale version throws the
 * store's StaleVersionError and nothing is stored).
 */
export function interpretAndStore(
  store: SurveyStore,
  surveyId: string,
  pickSet: PickSet,
  options: Omit<InterpretOptions, 'sourceName' | 'softwareVersion'>,
  meta: InterpretationMeta,
  expectedVersion?: number,
): StoredInterpretation {
  const result = runInterpretation(pickSet, options, meta);
  const revision = store.addRevision(surveyId, { optionsJson: JSON.stringify(options), resultJson: JSON.stringify(result) }, expectedVersion);
  return { revision, result };
}
