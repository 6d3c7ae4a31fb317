/**
 * Compile-time contract between the service and the browser client: everything the server can
 * send (lib's zod-derived types, the route bodies) must fit the types the client reads
 * (client/src/api-types.ts). Checked by `npm run typecheck` (the root tsconfig includes tests/);
 * nothing here runs. If the server's interpretation loses or renames a field the client uses, or
 * changes its type, this file stops compiling.
 */
import type { Interpretation as ServerInterpretation } from '../../lib/interpretation/shape.js';
import type { Pick, PickSet } from '../../lib/picks/types.js';
import type { BranchEdit as ServerBranchEdit } from '../../lib/branches/edits.js';
import type { Problem } from '../../lib/problems.js';
import type { surveyJson } from '../../server/routes/surveys.js';
import type { BranchEdit, Interpretation, StoredPick, Survey, TableProblem } from '../../client/src/api-types.js';

type Fits<Sent, Read> = Sent extends Read ? true : false;

/** An interpretation from the server is one the client can read. */
export const interpretationFits: Fits<ServerInterpretation, Interpretation> = true;
/** A stored pick from the server's pick set is one the client can read. */
export const pickFits: Fits<Pick, StoredPick> = true;
export const pickSetFits: Fits<PickSet['picks'][number], StoredPick> = true;
/** A survey as the API shows it is one the client can read. */
export const surveyFits: Fits<ReturnType<typeof surveyJson>, Survey> = true;
/** The reader's problems are what the client lists. */
export const problemFits: Fits<Problem, TableProblem> = true;
/** The edits the client sends are edits the server takes, and the other way round. */
export const editFits: Fits<BranchEdit, ServerBranchEdit> = true;
export const editFitsBack: Fits<ServerBranchEdit, BranchEdit> = true;
