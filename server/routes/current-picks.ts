/**
 * The survey's working pick set: the newest uploaded pick set with the branch edits made on it
 * applied in order.
 */
import { applyBranchEdits, type BranchEdit } from '../../lib/branches/edits.js';
import type { PickSet } from '../../lib/picks/types.js';
import type { SurveyStore } from '../storage/survey-store.js';
import { problemsError } from './common.js';

export interface CurrentPicks {
  readonly uploadId: string | null;
  /** The pick set as read from the upload. */
  readonly uploaded: PickSet;
  /** Every edit since the upload, oldest first. */
  readonly edits: readonly BranchEdit[];
  /** `uploaded` with `edits` applied. */
  readonly pickSet: PickSet;
}

/**
 * Reads the current picks. Edits belong to the pick set they were made on (the store records it):
 * edits made on an earlier upload are not applied to a newer one. Throws the store's NotFoundError
 * when the survey or its pick set is missing; stored edits that no longer apply are a 422.
 */
export function currentPicks(store: SurveyStore, surveyId: string): CurrentPicks {
  const record = store.getCurrentPickSet(surveyId);
  const uploaded = JSON.parse(record.pickSetJson) as PickSet;
  const edits = store
    .listBranchEdits(surveyId)
    .filter((entry) => entry.pickSetId === record.id)
    .flatMap((entry) => JSON.parse(entry.editsJson) as BranchEdit[]);
  const outcome = applyBranchEdits(uploaded, edits);
  if (!outcome.ok) throw problemsError('stored-edits-invalid', `the stored branch edits of survey ${surveyId}`, outcome.problems);
  return { uploadId: record.uploadId, uploaded, edits, pickSet: outcome.value };
}
