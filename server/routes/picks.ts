/**
 * Picks of a stored survey: upload a pick table (multipart or text/csv body), read the current picks
 * as JSON or CSV, add branch edits, download an original upload byte for byte.
 */
import { Router } from 'express';
import * as z from 'zod';
import { applyBranchEdits } from '../../lib/branches/edits.js';
import { readPickTable, writePickTable } from '../../lib/picks/index.js';
import { DISPLAY_UNITS } from '../../lib/units.js';
import { parseRequest } from '../errors.js';
import { receivedFile, receiveUpload, recogniseUpload, sanitiseFileName } from '../uploads.js';
import { expectedVersion, problemsError, sendCsv, surveyId, UploadParams, versionTag } from './common.js';
import type { RouteContext } from './context.js';
import { currentPicks } from './current-picks.js';

/** Most edits in one request (a survey of a few thousand picks is re-branched in a few requests). */
export const MAX_EDITS_PER_REQUEST = 10_000;

export const BranchEditsBody = z.strictObject({
  edits: z
    .array(z.strictObject({
      pickIndex: z.number().int().min(0),
      assign: z.union([z.number().int().min(1), z.enum(['exclude', 'automatic'])]),
    }))
    .min(1, 'send at least one edit')
    .max(MAX_EDITS_PER_REQUEST),
  version: z.number().int().min(1).optional(),
});

export function pickRoutes(context: RouteContext): Router {
  const { store, config } = context;
  const router = Router();

  router.post('/api/surveys/:id/picks', ...receiveUpload(config), (request, response) => {
    const id = surveyId(request);
    const version = expectedVersion(request);
    const file = receivedFile(request);
    const kind = recogniseUpload(file, ['pick-table']);
    const outcome = readPickTable(file.bytes, { maxBytes: config.maxUploadBytes });
    if (!outcome.ok) throw problemsError('pick-table-refused', `the pick table ${JSON.stringify(sanitiseFileName(file.fileName))}`, outcome.problems);
    const stored = store.addPickUpload(
      id,
      { fileName: sanitiseFileName(file.fileName), mediaType: kind.mediaType, bytes: file.bytes, pickSetJson: JSON.stringify(outcome.value) },
      version,
    );
    response.status(201).set('ETag', versionTag(stored.version)).json({
      upload: stored.upload,
      version: stored.version,
      pickCount: outcome.value.picks.length,
      shotIds: outcome.value.shotIds,
      /** engineering or crustal, from the table's units and extent: the scale to interpret it at. */
      suggestedScale: outcome.value.suggestedScale,
      warnings: outcome.warnings,
    });
  });

  router.get('/api/surveys/:id/picks', (request, response) => {
    const id = surveyId(request);
    const survey = store.getSurvey(id);
    const picks = currentPicks(store, id);
    response.set('ETag', versionTag(survey.version)).json({
      uploadId: picks.uploadId, version: survey.version,
      /** Changes with every upload and branch edit only; a revision with the same state was computed from these picks. */
      picksState: store.picksState(id),
      edits: picks.edits, pickSet: picks.pickSet,
    });
  });

  router.get('/api/surveys/:id/picks.csv', (request, response) => {
    const id = surveyId(request);
    const survey = store.getSurvey(id);
    const picks = currentPicks(store, id);
    sendCsv(response, `survey-${survey.id}-picks.csv`, writePickTable(picks.pickSet, DISPLAY_UNITS[survey.scale]));
  });

  router.post('/api/surveys/:id/branch-edits', (request, response) => {
    const id = surveyId(request);
    const body = parseRequest(BranchEditsBody, request.body ?? {}, 'body');
    const version = expectedVersion(request, body.version);
    const picks = currentPicks(store, id);
    const outcome = applyBranchEdits(picks.pickSet, body.edits);
    if (!outcome.ok) throw problemsError('branch-edits-refused', 'the branch edits', outcome.problems);
    const stored = store.addBranchEdits(id, JSON.stringify(body.edits), version);
    response.status(201).set('ETag', versionTag(stored.version)).json({ sequence: stored.sequence, version: stored.version, editCount: body.edits.length });
  });

  router.get('/api/surveys/:id/uploads/:uploadId', (request, response) => {
    const params = parseRequest(UploadParams, request.params, 'params');
    const upload = store.getUpload(params.id, params.uploadId);
    response
      .type(upload.mediaType)
      .attachment(sanitiseFileName(upload.fileName))
      .set('X-Content-SHA256', upload.sha256)
      .send(Buffer.from(upload.bytes));
  });

  return router;
}
