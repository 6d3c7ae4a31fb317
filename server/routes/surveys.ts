/**
 * Surveys: create, list, read, rename and delete. Every survey reply carries `ETag: "v<version>"`;
 * rename and delete need that version back (If-Match, or `version` in the body) and get 409 with
 * the current version when someone changed the survey meanwhile.
 */
import { Router, type Response } from 'express';
import * as z from 'zod';
import { parseRequest } from '../errors.js';
import type { SurveyRecord } from '../storage/survey-store.js';
import { expectedVersion, surveyId, versionTag } from './common.js';
import type { RouteContext } from './context.js';

const SurveyName = z.string().trim().min(1, 'a survey name needs at least one character').max(200, 'a survey name has at most 200 characters');
const Description = z.string().max(5000, 'a description has at most 5,000 characters');
const Version = z.number().int().min(1);

export const CreateSurveyBody = z.strictObject({
  name: SurveyName,
  description: Description.optional(),
  /** Display units: engineering (m, ms, m/s, the default) or crustal (km, s, km/s). */
  scale: z.enum(['engineering', 'crustal']).default('engineering'),
});

export const UpdateSurveyBody = z
  .strictObject({
    name: SurveyName.optional(),
    description: Description.optional(),
    /** Display units of later interpretations (engineering: m, ms, m/s; crustal: km, s, km/s). */
    scale: z.enum(['engineering', 'crustal']).optional(),
    version: Version.optional(),
  })
  .refine((body) => body.name !== undefined || body.description !== undefined || body.scale !== undefined, { message: 'give a new name, description or scale' });

export const DeleteSurveyBody = z.strictObject({ version: Version.optional() });

export const ListSurveysQuery = z.strictObject({ name: z.string().max(200).optional() });

/** A survey as the API shows it. */
export function surveyJson(survey: SurveyRecord) {
  return {
    id: survey.id, name: survey.name, description: survey.description, scale: survey.scale,
    createdAt: survey.createdAt, updatedAt: survey.updatedAt, version: survey.version,
  };
}

function sendSurvey(response: Response, survey: SurveyRecord, status = 200): void {
  response.status(status).set('ETag', versionTag(survey.version)).json(surveyJson(survey));
}

export function surveyRoutes(context: RouteContext): Router {
  const { store } = context;
  const router = Router();

  router.post('/api/surveys', (request, response) => {
    const body = parseRequest(CreateSurveyBody, request.body ?? {}, 'body');
    const survey = store.createSurvey(body);
    response.location(`/api/surveys/${survey.id}`);
    sendSurvey(response, survey, 201);
  });

  router.get('/api/surveys', (request, response) => {
    const query = parseRequest(ListSurveysQuery, request.query, 'query');
    response.json({ surveys: store.listSurveys({ nameContains: query.name ?? '' }).map(surveyJson) });
  });

  router.get('/api/surveys/:id', (request, response) => {
    sendSurvey(response, store.getSurvey(surveyId(request)));
  });

  router.patch('/api/surveys/:id', (request, response) => {
    const id = surveyId(request);
    const body = parseRequest(UpdateSurveyBody, request.body ?? {}, 'body');
    const version = expectedVersion(request, body.version);
    sendSurvey(response, store.renameSurvey(id, { name: body.name, description: body.description, scale: body.scale }, version));
  });

  router.delete('/api/surveys/:id', (request, response) => {
    const id = surveyId(request);
    const body = parseRequest(DeleteSurveyBody, request.body ?? {}, 'body');
    store.deleteSurvey(id, expectedVersion(request, body.version));
    response.status(204).end();
  });

  return router;
}
