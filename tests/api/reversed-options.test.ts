/**
 * The reversed-profile options through the service: user-named reversed pairs, a datum and the
 * forward-check switch, in a JSON body (stored with the revision) and in the stateless endpoint's
 * query string; bad values get 4xx naming the field. The numbers themselves are checked against
 * outside references in tests/interpret/reversed-profiles.test.ts; here, that the route hands the
 * options to the pipeline unchanged (the pipeline run directly is the oracle).
 */
import request from 'supertest';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { interpret } from '../../lib/interpret.js';
import { readPickTable } from '../../lib/picks/index.js';
import { openHarness, rowCount, sampleSurvey, surveyWithSamplePicks, type Harness } from './api-harness.js';

let harness: Harness;
beforeEach(() => {
  harness = openHarness();
});
afterEach(() => harness.close());

const ashcombe = () => sampleSurvey('ashcombe-hollow-undulating-bedrock');

describe('reversed-profile options', () => {
  it('when a body names the pairs and skips the forward check, then the revision keeps them and equals the pipeline run directly', async () => {
    const surveyId = await surveyWithSamplePicks(harness);
    const options = { reversedPairs: [{ forwardShot: 'F1', reverseShot: 'F3' }], forwardCheck: false };
    const response = await request(harness.app).post(`/api/surveys/${surveyId}/interpretations`).send(options).expect(201);
    expect(response.body.options).toMatchObject(options);
    expect(response.body.result.options).toMatchObject(options);
    expect(response.body.result.forwardCheck).toBeNull();
    expect(response.body.result.reversedPairs.every((pair: { id: string; chosenBy: string }) => pair.id === 'F1 → F3' && pair.chosenBy === 'user')).toBe(true);
    const picks = readPickTable(sampleSurvey('fenwick-meadow-water-table'));
    if (!picks.ok) throw new Error('the sample survey must read');
    const direct = interpret(picks.value, { ...options, scale: 'engineering' });
    expect(response.body.result.refractors).toEqual(direct.refractors);
  });

  it('when the stateless endpoint gets pairs, a decimal datum and forwardCheck=false in the query, then they reach the result', async () => {
    const response = await request(harness.app)
      .post('/api/interpret?reversedPairs=S1-W:S1-E,S2-W:S2-E&forwardCheck=false&datumElevation=95.5')
      .set('Content-Type', 'text/csv')
      .send(ashcombe().toString('utf8'))
      .expect(200);
    expect(response.body.options.reversedPairs).toEqual([
      { forwardShot: 'S1-W', reverseShot: 'S1-E' },
      { forwardShot: 'S2-W', reverseShot: 'S2-E' },
    ]);
    expect(response.body.options.datumElevation).toBe(95.5);
    expect(response.body.forwardCheck).toBeNull();
    expect(new Set(response.body.reversedPairs.map((pair: { id: string }) => pair.id))).toEqual(new Set(['S1-W → S1-E', 'S2-W → S2-E']));
    // The table has no elevations, so the datum cannot be used, and a warning says so.
    expect(response.body.warnings.some((warning: { code: string; message: string }) => warning.code === 'delay-time-note' && warning.message.includes('datum'))).toBe(true);
  });

  it('when a pair is malformed or the datum is not a number, then it gets 4xx naming the field and nothing is stored', async () => {
    const surveyId = await surveyWithSamplePicks(harness);
    const before = rowCount(harness.db, 'revisions');
    const badPair = await request(harness.app).post(`/api/surveys/${surveyId}/interpretations`).send({ reversedPairs: [{ forwardShot: 'F1' }] });
    expect(badPair.status).toBeGreaterThanOrEqual(400);
    expect(badPair.status).toBeLessThan(500);
    expect(badPair.body.error.details.issues[0].path).toMatch(/^reversedPairs/);
    const badQuery = await request(harness.app).post('/api/interpret?reversedPairs=A:B:C').set('Content-Type', 'text/csv').send(ashcombe().toString('utf8')).expect(400);
    expect(badQuery.body.error.details.issues[0].path).toMatch(/^reversedPairs/);
    const badDatum = await request(harness.app).post('/api/interpret?datumElevation=high').set('Content-Type', 'text/csv').send(ashcombe().toString('utf8')).expect(400);
    expect(badDatum.body.error.details.issues[0].path).toBe('datumElevation');
    expect(rowCount(harness.db, 'revisions')).toBe(before);
  });
});
