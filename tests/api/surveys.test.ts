import request from 'supertest';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { NotFoundError } from '../../server/storage/errors.js';
import { openHarness, rowCount, type Harness } from './api-harness.js';

let harness: Harness;
beforeEach(() => {
  harness = openHarness();
});
afterEach(() => harness.close());

function createSurvey(name = 'Quarry line A') {
  return request(harness.app).post('/api/surveys').send({ name, description: 'north face' }).expect(201);
}

describe('surveys API', () => {
  it('when a survey is created, then it answers 201 with the survey and its ETag, and the store holds it', async () => {
    const response = await createSurvey();
    expect(response.body).toMatchObject({ name: 'Quarry line A', description: 'north face', scale: 'engineering', version: 1 });
    expect(response.headers.etag).toBe('"v1"');
    expect(response.headers.location).toBe(`/api/surveys/${response.body.id}`);
    expect(harness.store.getSurvey(response.body.id)).toMatchObject({ name: 'Quarry line A', version: 1 });
  });

  it('when surveys are listed with ?name=, then only those whose name holds it come back', async () => {
    await createSurvey('Quarry line A');
    await createSurvey('Meadow line 2');
    const all = await request(harness.app).get('/api/surveys').expect(200);
    expect(all.body.surveys.map((survey: { name: string }) => survey.name)).toEqual(['Quarry line A', 'Meadow line 2']);
    const filtered = await request(harness.app).get('/api/surveys?name=meadow').expect(200);
    expect(filtered.body.surveys.map((survey: { name: string }) => survey.name)).toEqual(['Meadow line 2']);
  });

  it('when one survey is read, then it comes with ETag "v<version>"', async () => {
    const created = await createSurvey();
    const response = await request(harness.app).get(`/api/surveys/${created.body.id}`).expect(200);
    expect(response.body).toEqual(created.body);
    expect(response.headers.etag).toBe('"v1"');
    expect(response.headers['x-powered-by']).toBeUndefined();
    expect(response.headers['x-content-type-options']).toBe('nosniff');
    // Plain HTTP on an office network: no HSTS, and no CSP upgrade of requests to an https:// that is not there.
    expect(response.headers['strict-transport-security']).toBeUndefined();
    expect(response.headers['content-security-policy']).toMatch(/default-src 'self'/);
    expect(response.headers['content-security-policy']).not.toMatch(/upgrade-insecure-requests/);
  });

  it('when a survey is renamed with If-Match of its version, then the store has the new name at version 2', async () => {
    const created = await createSurvey();
    const response = await request(harness.app).patch(`/api/surveys/${created.body.id}`).set('If-Match', '"v1"').send({ name: 'Quarry line A (north)' }).expect(200);
    expect(response.body).toMatchObject({ name: 'Quarry line A (north)', description: 'north face', version: 2 });
    expect(response.headers.etag).toBe('"v2"');
    expect(harness.store.getSurvey(created.body.id)).toMatchObject({ name: 'Quarry line A (north)', version: 2 });
  });

  it('when a rename carries a stale version, then it gets 409 with the current version and nothing changes', async () => {
    const created = await createSurvey();
    const id = created.body.id as string;
    await request(harness.app).patch(`/api/surveys/${id}`).send({ description: 'first edit', version: 1 }).expect(200);
    const stale = await request(harness.app).patch(`/api/surveys/${id}`).set('If-Match', '"v1"').send({ name: 'second edit' }).expect(409);
    expect(stale.body.error).toMatchObject({ code: 'version-stale', details: { expectedVersion: 1, currentVersion: 2 } });
    expect(stale.body.error.fix).toContain('"v2"');
    expect(harness.store.getSurvey(id)).toMatchObject({ name: 'Quarry line A', description: 'first edit', version: 2 });
  });

  it('when a rename names no version, then it gets 428 and the survey keeps its name', async () => {
    const created = await createSurvey();
    const response = await request(harness.app).patch(`/api/surveys/${created.body.id}`).send({ name: 'other' }).expect(428);
    expect(response.body.error.code).toBe('version-required');
    expect(harness.store.getSurvey(created.body.id).name).toBe('Quarry line A');
  });

  it('when a survey is deleted at its version, then it answers 204 and the store no longer has it', async () => {
    const created = await createSurvey();
    await request(harness.app).delete(`/api/surveys/${created.body.id}`).set('If-Match', '"v1"').expect(204);
    expect(() => harness.store.getSurvey(created.body.id)).toThrow(NotFoundError);
    expect(rowCount(harness.db, 'surveys')).toBe(0);
  });

  it('when a survey that does not exist is read, then it gets 404 JSON naming it', async () => {
    const response = await request(harness.app).get('/api/surveys/no-such-survey').expect(404);
    expect(response.headers['content-type']).toMatch(/application\/json/);
    expect(response.body.error).toMatchObject({ code: 'survey-not-found', details: { surveyId: 'no-such-survey' } });
  });

  it('when an id carries dots or an encoded slash, then it gets 400 before it reaches the store', async () => {
    for (const id of ['..%2F..%2Fetc%2Fpasswd', 'a.b', '%2E%2E']) {
      const response = await request(harness.app).get(`/api/surveys/${id}`).expect(400);
      expect(response.body.error).toMatchObject({ code: 'invalid-path', details: { part: 'params' } });
    }
  });

  it('when an unknown route is asked for, then it gets 404 JSON, never an HTML page', async () => {
    const response = await request(harness.app).get('/api/nothing-here').expect(404);
    expect(response.headers['content-type']).toMatch(/application\/json/);
    expect(response.body.error).toMatchObject({ code: 'route-not-found', details: { method: 'GET', path: '/api/nothing-here' } });
  });

  it('when the body is not JSON, then it gets 400 body-not-json and nothing is stored', async () => {
    const response = await request(harness.app).post('/api/surveys').set('Content-Type', 'application/json').send('{"name": "x",').expect(400);
    expect(response.body.error.code).toBe('body-not-json');
    expect(rowCount(harness.db, 'surveys')).toBe(0);
  });

  it('when a field has the wrong value, then it gets 422 naming the field path', async () => {
    const response = await request(harness.app).post('/api/surveys').send({ name: '   ', scale: 'planetary' }).expect(422);
    expect(response.body.error.code).toBe('invalid-body');
    const paths = response.body.error.details.issues.map((issue: { path: string }) => issue.path);
    expect(paths).toEqual(expect.arrayContaining(['name', 'scale']));
    expect(rowCount(harness.db, 'surveys')).toBe(0);
  });

  it('when the JSON body exceeds jsonBodyLimit, then it gets 413 naming the limit', async () => {
    const small = openHarness({ jsonBodyLimit: 1024 });
    try {
      const response = await request(small.app).post('/api/surveys').send({ name: 'x', description: 'd'.repeat(2000) }).expect(413);
      expect(response.body.error).toMatchObject({ code: 'body-too-large', details: { maxBytes: 1024 } });
      expect(response.body.error.message).toContain('1 KiB');
      expect(rowCount(small.db, 'surveys')).toBe(0);
    } finally {
      small.close();
    }
  });

  it('when a request finishes, then one structured log line records method, path and status', async () => {
    await request(harness.app).get('/api/health').expect(200);
    const line = harness.logs.find((entry) => entry.path === '/api/health');
    expect(line).toMatchObject({ level: 'info', message: 'request', method: 'GET', status: 200 });
    expect(typeof line?.durationMs).toBe('number');
  });
});
