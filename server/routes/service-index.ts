/**
 * `GET /` and `GET /api`: what this service is and what it offers, as JSON, so a person who opens
 * the URL, or a script, sees the surveys and the endpoints instead of an error (the browser client
 * will take `/` over). It lists the surveys by name with their URLs and carries the standing
 * cautions.
 */
import { Router } from 'express';
import { STANDING_CAUTIONS } from '../../lib/cautions.js';
import type { RouteContext } from './context.js';

/** The endpoints, in the order a newcomer uses them. */
export const SERVICE_ENDPOINTS: readonly { readonly method: string; readonly path: string; readonly does: string }[] = [
  { method: 'GET', path: '/api/health', does: 'the service answers, with its version' },
  { method: 'GET', path: '/api/surveys?name=', does: 'list surveys, optionally by part of the name' },
  { method: 'POST', path: '/api/surveys', does: 'create a survey { name, description?, scale }' },
  { method: 'GET', path: '/api/surveys/:id', does: 'one survey; its ETag is the version that writes must name' },
  { method: 'PATCH', path: '/api/surveys/:id', does: 'rename or describe (If-Match: "v<version>")' },
  { method: 'DELETE', path: '/api/surveys/:id', does: 'delete with everything stored for it (If-Match)' },
  { method: 'POST', path: '/api/surveys/:id/picks', does: 'upload a pick table, or SEG-2 / SEG-Y shot gathers to be picked (CSV or binary body, or multipart files; If-Match)' },
  { method: 'GET', path: '/api/surveys/:id/gathers', does: 'the shot gathers of a survey made from gathers' },
  { method: 'GET', path: '/api/surveys/:id/gathers/:gatherId?samples=', does: 'one gather for display: traces scaled to ±1, times in s, every trace\'s pick' },
  { method: 'POST', path: '/api/surveys/:id/pick-edits', does: 'move, place or remove picks by hand { version, edits: [{ gatherId, traceIndex, time (s) | remove: true }] }' },
  { method: 'GET', path: '/api/surveys/:id/picks', does: 'the current picks with edits applied (JSON; .csv for CSV)' },
  { method: 'POST', path: '/api/surveys/:id/branch-edits', does: 'assign picks to branches or exclude them (If-Match)' },
  { method: 'POST', path: '/api/surveys/:id/interpretations', does: 'interpret the current picks and store a numbered revision' },
  { method: 'GET', path: '/api/surveys/:id/revisions', does: 'the revisions; /:n for one, /:n/layers.csv for its layers as CSV' },
  { method: 'GET', path: '/api/surveys/:id/uploads/:uploadId', does: 'an uploaded file, byte for byte' },
  { method: 'POST', path: '/api/interpret', does: 'interpret a CSV sent in the body and store nothing (for scripts)' },
];

export function serviceIndexRoutes(context: RouteContext): Router {
  const router = Router();
  router.get(['/', '/api'], (_request, response) => {
    const surveys = context.store.listSurveys({}).map((survey) => ({ id: survey.id, name: survey.name, url: `/api/surveys/${survey.id}` }));
    // It lists survey names: not for shared caches.
    response.set('Cache-Control', 'private, no-cache').json({
      service: 'slopebreak',
      version: context.softwareVersion,
      about: 'seismic-refraction interpretation for the office network: first-arrival picks in, a layered velocity-depth model out',
      surveys,
      endpoints: SERVICE_ENDPOINTS,
      cautions: STANDING_CAUTIONS,
    });
  });
  return router;
}
