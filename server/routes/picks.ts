/**
 * Picks of a stored survey: upload a pick table (multipart or text/csv body), read the current picks
 * as JSON or CSV, add branch edits, download an original upload byte for byte.
 */
import { Router, type Response } from 'express';
import type { Problem } from '../../lib/problems.js';
import * as z from 'zod';
import { applyBranchEdits } from '../../lib/branches/edits.js';
import { readPickTable, writePickTable } from '../../lib/picks/index.js';
import { DISPLAY_UNITS } from '../../lib/units.js';
import { ApiError, parseRequest } from '../errors.js';
import { gatherUploadFields, pickUploadedGathers } from '../gather-uploads.js';
import { receivedFiles, receiveUpload, recogniseUpload, sanitiseFileName, type ReceivedFile } from '../uploads.js';
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
    const files = receivedFiles(request);
    const kinds = files.map((file) => recogniseUpload(file, ['pick-table', 'shot-gather']));
    if (kinds.every((kind) => kind.kind === 'shot-gather')) {
      storeGathers(id, version, files.map((file, index) => ({ file, mediaType: kinds[index]!.mediaType })), request.body, request.query, response);
      return;
    }
    if (files.length > 1) {
      throw new ApiError({
        code: 'upload-one-file', status: 400,
        message: `a pick table is uploaded on its own, and this upload has ${files.length} files`,
        fix: 'send the pick table in its own request (several files in one upload must all be shot gathers)',
      });
    }
    const file = files[0]!;
    const kind = kinds[0]!;
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

  /** Gathers: read and pick them, merge their picks with the survey's others, store all at once. */
  function storeGathers(id: string, version: number, files: { file: ReceivedFile; mediaType: string }[], body: unknown, query: unknown, response: Response): void {
    const fields = gatherUploadFields(body, query);
    const earlier = store.picksState(id) === null ? null : currentPicks(store, id).pickSet;
    const keepEarlier = earlier !== null && earlier.coordinateSystem === 'line';
    const picked = pickUploadedGathers(files, fields, keepEarlier ? earlier.picks : [], config.maxUploadBytes);
    if (picked.pickSet.picks.length === 0) {
      throw problemsError('gather-no-picks', 'the gather upload', picked.warnings.map((warning) => ({ ...warning, severity: 'error' as const })));
    }
    const stored = store.addGatherUpload(id, {
      files: picked.files.map((entry) => ({
        fileName: entry.fileName, mediaType: entry.mediaType, bytes: entry.file.bytes,
        shots: entry.shots.map((shot) => ({ shotNumber: shot.shotNumber, shot: shot.shot, summaryJson: JSON.stringify(shot.summary) })),
      })),
      pickSetJson: JSON.stringify(picked.pickSet),
    }, version);
    const dropped: Problem[] = earlier !== null && !keepEarlier
      ? [{ code: 'gather-replaced-geographic-picks', severity: 'warning', line: 0, column: null,
          message: 'the survey\'s earlier picks were placed by latitude and longitude, which gather positions along the line cannot join; the gathers\' picks replace them',
          fix: 'upload the earlier shots as gathers too, or as a pick table with positions along the line' }]
      : [];
    response.status(201).set('ETag', versionTag(stored.version)).json({
      uploads: stored.uploads,
      version: stored.version,
      pickCount: picked.pickSet.picks.length,
      shotIds: picked.pickSet.shotIds,
      suggestedScale: picked.pickSet.suggestedScale,
      gathers: stored.gathers.map((gather) => ({ id: gather.id, shot: gather.shot })),
      warnings: [...picked.warnings, ...dropped],
    });
  }

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
