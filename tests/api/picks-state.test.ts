/**
 * Which picks a revision was computed from (`picksState`), and the survey's display scale changed
 * by PATCH. A client decides from `picksState` whether the latest revision still describes the
 * current picks: a rename changes the survey version but not the picks (common practice: an edit
 * made against a shown result must be made on the picks that result came from).
 */
import request from 'supertest';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { openHarness, sampleSurvey, surveyWithSamplePicks, type Harness } from './api-harness.js';

let harness: Harness;
let surveyId: string;
beforeEach(async () => {
  harness = openHarness();
  surveyId = await surveyWithSamplePicks(harness);
});
afterEach(() => harness.close());

async function picksState(): Promise<string> {
  return (await request(harness.app).get(`/api/surveys/${surveyId}/picks`).expect(200)).body.picksState;
}

describe('picks state of revisions', () => {
  it('when a survey is interpreted, then the revision carries the picks state of the current picks', async () => {
    const before = await picksState();
    expect(before).toMatch(/^\d+:0$/);
    const revision = await request(harness.app).post(`/api/surveys/${surveyId}/interpretations`).send({}).expect(201);
    expect(revision.body.picksState).toBe(before);
    const listed = await request(harness.app).get(`/api/surveys/${surveyId}/revisions`).expect(200);
    expect(listed.body.revisions[0].picksState).toBe(before);
  });

  it('when the survey is renamed, then its version moves but the picks state does not', async () => {
    await request(harness.app).post(`/api/surveys/${surveyId}/interpretations`).send({}).expect(201);
    const state = await picksState();
    await request(harness.app).patch(`/api/surveys/${surveyId}`).set('If-Match', '"v2"').send({ name: 'Fenwick Meadow (north)' }).expect(200);
    const picks = await request(harness.app).get(`/api/surveys/${surveyId}/picks`).expect(200);
    expect(picks.body.version).toBe(3);
    expect(picks.body.picksState).toBe(state);
  });

  it('when a branch edit or a new upload is stored, then the picks state changes and a new revision carries the new one', async () => {
    const first = await picksState();
    await request(harness.app).post(`/api/surveys/${surveyId}/branch-edits`).set('If-Match', '"v2"').send({ edits: [{ pickIndex: 0, assign: 'exclude' }] }).expect(201);
    const edited = await picksState();
    expect(edited).not.toBe(first);
    expect(edited.split(':')[1]).toBe('1');
    await request(harness.app).post(`/api/surveys/${surveyId}/picks`).set('If-Match', '"v3"').attach('file', sampleSurvey('millbrook-quarry-bedrock'), 'millbrook.csv').expect(201);
    const uploaded = await picksState();
    expect(uploaded).not.toBe(edited);
    expect(uploaded.split(':')[1]).toBe('0'); // edits belong to the pick set they were made on
    const revision = await request(harness.app).post(`/api/surveys/${surveyId}/interpretations`).send({}).expect(201);
    expect(revision.body.picksState).toBe(uploaded);
  });

  it('when a survey has no picks, then its picks are a 404 and the store says null', async () => {
    const empty = (await request(harness.app).post('/api/surveys').send({ name: 'empty' }).expect(201)).body.id;
    await request(harness.app).get(`/api/surveys/${empty}/picks`).expect(404);
    expect(harness.store.picksState(empty)).toBeNull();
  });
});

describe('display scale by PATCH', () => {
  it('when the scale is patched to crustal, then the survey says so and the next interpretation is in km, s and km/s', async () => {
    const patched = await request(harness.app).patch(`/api/surveys/${surveyId}`).set('If-Match', '"v2"').send({ scale: 'crustal' }).expect(200);
    expect(patched.body.scale).toBe('crustal');
    const revision = await request(harness.app).post(`/api/surveys/${surveyId}/interpretations`).send({}).expect(201);
    expect(revision.body.result.units).toEqual({ scale: 'crustal', distance: 'km', time: 's', velocity: 'km/s' });
  });

  it('when the scale is not one of the two, then the PATCH is refused (422, the service’s answer to a body that fails its schema) naming the field and nothing changes', async () => {
    const refused = await request(harness.app).patch(`/api/surveys/${surveyId}`).set('If-Match', '"v2"').send({ scale: 'regional' }).expect(422);
    expect(JSON.stringify(refused.body.error)).toContain('scale');
    expect(harness.store.getSurvey(surveyId)).toMatchObject({ scale: 'engineering', version: 2 });
  });
});
