import { afterEach, describe, expect, it } from 'vitest';
import request from 'supertest';
import { openHarness, type Harness } from './api-harness.js';
import { STANDING_CAUTIONS } from '../../lib/cautions.js';

describe('GET / and GET /api', () => {
  let harness: Harness;
  afterEach(() => harness.close());

  it('when a person opens the service URL, then they get the surveys, the endpoints and the cautions as JSON', async () => {
    harness = openHarness();
    const survey = harness.store.createSurvey({ name: 'Millbrook line A', scale: 'engineering' });
    for (const path of ['/', '/api']) {
      const response = await request(harness.app).get(path);
      expect(response.status).toBe(200);
      expect(response.headers['content-type']).toMatch(/json/);
      expect(response.body.surveys).toEqual([{ id: survey.id, name: 'Millbrook line A', url: `/api/surveys/${survey.id}` }]);
      expect(response.body.endpoints.map((entry: { path: string }) => entry.path)).toContain('/api/interpret');
      expect(response.body.cautions).toEqual(STANDING_CAUTIONS);
    }
  });

  it('when an endpoint listed in the index is called, then it exists (no 404)', async () => {
    harness = openHarness();
    const index = await request(harness.app).get('/api');
    for (const entry of index.body.endpoints as { method: string; path: string }[]) {
      if (entry.method !== 'GET' || entry.path.includes(':')) continue;
      const response = await request(harness.app).get(entry.path.replace(/\?.*$/, ''));
      expect(response.status, entry.path).not.toBe(404);
    }
  });
});
