/**
 * Interpretations: run one on a stored survey's current picks and keep it as the next revision;
 * list and fetch revisions; export a revision's layers as CSV; and the stateless
 * `POST /api/interpret`, which takes a pick table and returns the interpretation, storing nothing.
 */
import { Router } from 'express';
import type { Interpretation } from '../../lib/interpretation/shape.js';
import { quoteCsvField, readPickTable } from '../../lib/picks/index.js';
import { parseRequest } from '../errors.js';
import type { RevisionSummary } from '../storage/survey-store.js';
import { receivedFile, receiveUpload, recogniseUpload, sanitiseFileName } from '../uploads.js';
import { expectedVersion, limitInterpretSize, problemsError, RevisionParams, sendCsv, surveyId } from './common.js';
import type { RouteContext } from './context.js';
import { currentPicks } from './current-picks.js';
import { interpretAndStore, runInterpretation } from '../revisions.js';
import { InterpretOptionsBody, InterpretOptionsQuery, type InterpretOptionsInput } from './interpret-options.js';

function revisionJson(revision: RevisionSummary) {
  return {
    number: revision.number,
    surveyVersion: revision.surveyVersion,
    picksState: revision.picksState,
    createdAt: revision.createdAt,
    options: JSON.parse(revision.optionsJson) as InterpretOptionsInput,
  };
}

/** The layers of an interpretation as CSV, one row per layer, columns named with their units. */
export function layersCsv(result: Interpretation): string {
  const { distance, velocity } = result.units;
  const velocityUnit = velocity.replace('/', '_per_');
  const header = [
    'layer', `velocity_${velocityUnit}`, `velocity_se_${velocityUnit}`, `thickness_${distance}`, `thickness_se_${distance}`,
    `depth_to_top_${distance}`, `depth_to_top_se_${distance}`, 'shot_sides', 'velocity_method', 'depth_method',
  ];
  const cell = (value: number | null) => (value === null ? '' : String(value));
  const rows = result.layers.map((layer) => [
    String(layer.index), cell(layer.velocity), cell(layer.velocitySE), cell(layer.thickness), cell(layer.thicknessSE),
    cell(layer.depthToTop), cell(layer.depthToTopSE), String(layer.shotSides),
    quoteCsvField(layer.velocityFrom.method), quoteCsvField(layer.depthFrom.method),
  ].join(','));
  return [header.join(','), ...rows].join('\n') + '\n';
}

export function interpretationRoutes(context: RouteContext): Router {
  const { store, config } = context;
  const router = Router();
  const meta = (sourceName: string) => ({ sourceName, softwareVersion: context.softwareVersion, interpret: context.interpret });

  router.post('/api/surveys/:id/interpretations', (request, response) => {
    const id = surveyId(request);
    const options = parseRequest(InterpretOptionsBody, request.body ?? {}, 'body');
    const survey = store.getSurvey(id);
    const version = request.get('if-match') === undefined ? survey.version : expectedVersion(request);
    const picks = currentPicks(store, id);
    limitInterpretSize(picks.pickSet.picks.length, config.maxInterpretPicks);
    const chosen = { ...options, scale: options.scale ?? survey.scale };
    const { revision, result } = interpretAndStore(store, id, picks.pickSet, chosen, meta(survey.name), version);
    response.status(201).location(`/api/surveys/${id}/revisions/${revision.number}`).json({ ...revisionJson(revision), result });
  });

  router.get('/api/surveys/:id/revisions', (request, response) => {
    response.json({ revisions: store.listRevisions(surveyId(request)).map(revisionJson) });
  });

  router.get('/api/surveys/:id/revisions/:number', (request, response) => {
    const params = parseRequest(RevisionParams, request.params, 'params');
    const revision = store.getRevision(params.id, params.number);
    response.json({ ...revisionJson(revision), result: JSON.parse(revision.resultJson) as Interpretation });
  });

  router.get('/api/surveys/:id/revisions/:number/layers.csv', (request, response) => {
    const params = parseRequest(RevisionParams, request.params, 'params');
    const revision = store.getRevision(params.id, params.number);
    sendCsv(response, `survey-${params.id}-revision-${params.number}-layers.csv`, layersCsv(JSON.parse(revision.resultJson) as Interpretation));
  });

  router.post('/api/interpret', ...receiveUpload(config), (request, response) => {
    const options = parseRequest(InterpretOptionsQuery, request.query, 'query');
    const file = receivedFile(request);
    recogniseUpload(file, ['pick-table']);
    const outcome = readPickTable(file.bytes, { maxBytes: config.maxUploadBytes });
    if (!outcome.ok) throw problemsError('pick-table-refused', `the pick table ${JSON.stringify(sanitiseFileName(file.fileName))}`, outcome.problems);
    limitInterpretSize(outcome.value.picks.length, config.maxInterpretPicks);
    response.json(runInterpretation(outcome.value, options, meta(sanitiseFileName(file.fileName))));
  });

  return router;
}
