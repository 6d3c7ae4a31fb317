import request from 'supertest';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { interpret } from '../../lib/interpret.js';
import { InterpretationSchema } from '../../lib/interpretation/shape.js';
import { readPickTable } from '../../lib/picks/index.js';
import { MAX_BOOTSTRAP_REPLICATES } from '../../server/routes/interpret-options.js';
import { openHarness, rowCount, sampleSurvey, surveyWithSamplePicks, type Harness } from './api-harness.js';

let harness: Harness;
let surveyId: string;
beforeEach(async () => {
  harness = openHarness();
  surveyId = await surveyWithSamplePicks(harness);
});
afterEach(() => harness.close());

describe('interpretations API', () => {
  it('when an interpretation is run, then it is stored as revision 1 with its options and equals lib interpret on the same picks', async () => {
    const response = await request(harness.app).post(`/api/surveys/${surveyId}/interpretations`).send({ fitMethod: 'huber', seed: 7 }).expect(201);
    expect(response.body).toMatchObject({ number: 1, surveyVersion: 2, options: { fitMethod: 'huber', seed: 7, scale: 'engineering' } });
    expect(InterpretationSchema.safeParse(response.body.result).success).toBe(true);
    const stored = harness.store.getRevision(surveyId, 1);
    expect(JSON.parse(stored.resultJson)).toEqual(response.body.result);
    const picks = readPickTable(sampleSurvey('fenwick-meadow-water-table'));
    if (!picks.ok) throw new Error('the sample survey must read');
    // The route must hand the options through unchanged: the pipeline run directly gives the same layers.
    const direct = interpret(picks.value, { fitMethod: 'huber', seed: 7, scale: 'engineering' });
    expect(response.body.result.layers).toEqual(direct.layers);
  });

  it('when revisions are listed and one is fetched, then they are the stored ones, oldest first', async () => {
    await request(harness.app).post(`/api/surveys/${surveyId}/interpretations`).send({}).expect(201);
    await request(harness.app).post(`/api/surveys/${surveyId}/interpretations`).send({ fitMethod: 'theil-sen' }).expect(201);
    const list = await request(harness.app).get(`/api/surveys/${surveyId}/revisions`).expect(200);
    expect(list.body.revisions.map((revision: { number: number; options: { fitMethod?: string } }) => [revision.number, revision.options.fitMethod ?? null])).toEqual([[1, null], [2, 'theil-sen']]);
    expect(rowCount(harness.db, 'revisions')).toBe(2);
    const second = await request(harness.app).get(`/api/surveys/${surveyId}/revisions/2`).expect(200);
    expect(second.body.result.options.fitMethod).toBe('theil-sen');
    await request(harness.app).get(`/api/surveys/${surveyId}/revisions/3`).expect(404);
  });

  it('when a revision\'s layers are exported, then the CSV has one row per stored layer with its velocity', async () => {
    await request(harness.app).post(`/api/surveys/${surveyId}/interpretations`).send({}).expect(201);
    const response = await request(harness.app).get(`/api/surveys/${surveyId}/revisions/1/layers.csv`).expect(200);
    expect(response.headers['content-type']).toMatch(/text\/csv/);
    const [header, ...rows] = response.text.trim().split('\n');
    expect(header?.split(',').slice(0, 3)).toEqual(['layer', 'velocity_m_per_s', 'velocity_se_m_per_s']);
    const layers = JSON.parse(harness.store.getRevision(surveyId, 1).resultJson).layers as { velocity: number }[];
    expect(rows.map((row) => Number(row.split(',')[1]))).toEqual(layers.map((layer) => layer.velocity));
  });

  it('when the options ask for more bootstrap replicates than the cap, then it gets 422 naming the field and stores nothing', async () => {
    const response = await request(harness.app).post(`/api/surveys/${surveyId}/interpretations`).send({ bootstrapReplicates: MAX_BOOTSTRAP_REPLICATES + 1 }).expect(422);
    expect(response.body.error.details.issues[0].path).toBe('bootstrapReplicates');
    expect(rowCount(harness.db, 'revisions')).toBe(0);
  });

  it('when the revision number is not a whole number, then it gets 400', async () => {
    const response = await request(harness.app).get(`/api/surveys/${surveyId}/revisions/01`).expect(400);
    expect(response.body.error.details.issues[0].path).toBe('number');
  });
});

describe('stateless interpret API', () => {
  it('when a sample survey is posted as text/csv, then the body passes InterpretationSchema and nothing is stored', async () => {
    const before = { surveys: rowCount(harness.db, 'surveys'), uploads: rowCount(harness.db, 'uploads'), revisions: rowCount(harness.db, 'revisions') };
    const response = await request(harness.app).post('/api/interpret?fitMethod=theil-sen&seed=3').set('Content-Type', 'text/csv').send(sampleSurvey('millbrook-quarry-bedrock').toString('utf8')).expect(200);
    const parsed = InterpretationSchema.safeParse(response.body);
    expect(parsed.success ? [] : parsed.error.issues).toEqual([]);
    expect(response.body.options).toMatchObject({ fitMethod: 'theil-sen', seed: 3 });
    expect(response.body.summary.pickCount).toBeGreaterThan(200);
    expect({ surveys: rowCount(harness.db, 'surveys'), uploads: rowCount(harness.db, 'uploads'), revisions: rowCount(harness.db, 'revisions') }).toEqual(before);
  });

  it('when a sample survey is posted as a multipart file, then the result names the file', async () => {
    const response = await request(harness.app).post('/api/interpret').attach('file', sampleSurvey('fenwick-meadow-water-table'), 'fenwick.csv').expect(200);
    expect(InterpretationSchema.safeParse(response.body).success).toBe(true);
    expect(response.body.source).toBe('fenwick.csv');
  });

  it('when a query option has the wrong type, then it gets 400 naming it', async () => {
    const response = await request(harness.app).post('/api/interpret?bootstrapReplicates=many').set('Content-Type', 'text/csv').send('shot\n').expect(400);
    expect(response.body.error).toMatchObject({ code: 'invalid-query' });
    expect(response.body.error.details.issues[0].path).toBe('bootstrapReplicates');
  });

  it('when the pipeline fails unexpectedly, then it gets 500 JSON without the stack, and the log has the cause', async () => {
    const failing = openHarness({}, { interpret: () => { throw new Error('secret internal detail'); } });
    try {
      const response = await request(failing.app).post('/api/interpret').set('Content-Type', 'text/csv').send(sampleSurvey('fenwick-meadow-water-table').toString('utf8')).expect(500);
      expect(response.body.error.code).toBe('internal-error');
      expect(JSON.stringify(response.body)).not.toContain('secret internal detail');
      expect(JSON.stringify(response.body)).not.toMatch(/at .*\.ts/);
      expect(failing.logs.some((line) => line.level === 'error' && JSON.stringify(line).includes('secret internal detail'))).toBe(true);
    } finally {
      failing.close();
    }
  });
});
