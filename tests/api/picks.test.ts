import { createHash } from 'node:crypto';
import request from 'supertest';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { readPickTable } from '../../lib/picks/index.js';
import type { PickSet } from '../../lib/picks/types.js';
import { openHarness, rowCount, sampleSurvey, SMALL_PICK_TABLE, type Harness } from './api-harness.js';

/** Times go out through the CSV writer and back through the reader: equal to within float rounding (1e-12 s). */
const ROUND_TRIP_SECONDS = 1e-12;
/** The first bytes of a PNG file (its signature, from the PNG specification), as a binary upload. */
const PNG_SIGNATURE = Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a, 0, 0, 0, 13]);

let harness: Harness;
let surveyId: string;
beforeEach(async () => {
  harness = openHarness();
  surveyId = (await request(harness.app).post('/api/surveys').send({ name: 'Millbrook' }).expect(201)).body.id;
});
afterEach(() => harness.close());

function upload(bytes: Buffer | string, fileName = 'millbrook.csv', version = 1) {
  return request(harness.app).post(`/api/surveys/${surveyId}/picks`).set('If-Match', `"v${version}"`).attach('file', Buffer.from(bytes), fileName);
}

describe('picks API', () => {
  it('when a pick table is uploaded as a multipart file, then the raw bytes, their SHA-256 and the parsed picks are stored', async () => {
    const bytes = sampleSurvey('millbrook-quarry-bedrock');
    const response = await upload(bytes).expect(201);
    const expected = readPickTable(bytes);
    if (!expected.ok) throw new Error('the sample survey must read');
    expect(response.body).toMatchObject({ version: 2, pickCount: expected.value.picks.length, shotIds: expected.value.shotIds });
    expect(response.headers.etag).toBe('"v2"');
    const stored = harness.store.getUpload(surveyId, response.body.upload.id);
    expect(Buffer.from(stored.bytes).equals(bytes)).toBe(true);
    expect(stored.sha256).toBe(createHash('sha256').update(bytes).digest('hex'));
    expect(stored.mediaType).toBe('text/csv');
    expect(JSON.parse(harness.store.getCurrentPickSet(surveyId).pickSetJson)).toEqual(expected.value);
  });

  it('when a pick table is sent as a text/csv body, then it is stored like a file upload', async () => {
    const response = await request(harness.app).post(`/api/surveys/${surveyId}/picks`).set('If-Match', '"v1"').set('Content-Type', 'text/csv').send(SMALL_PICK_TABLE).expect(201);
    expect(response.body.pickCount).toBe(3);
    expect(Buffer.from(harness.store.getUpload(surveyId, response.body.upload.id).bytes).toString('utf8')).toBe(SMALL_PICK_TABLE);
  });

  it('when the upload is binary although named .csv, then it gets 415 naming what was found and nothing is stored', async () => {
    const response = await upload(PNG_SIGNATURE, 'picks.csv').expect(415);
    expect(response.body.error.code).toBe('upload-type-unsupported');
    expect(response.body.error.message).toContain('binary data');
    expect(rowCount(harness.db, 'uploads')).toBe(0);
    expect(harness.store.getSurvey(surveyId).version).toBe(1);
  });

  it('when the upload is text without a shot column, then it gets 415 quoting the first line', async () => {
    const response = await upload('# notes\nname,age\nx,1\n', 'notes.csv').expect(415);
    expect(response.body.error.message).toContain('"name,age"');
    expect(rowCount(harness.db, 'uploads')).toBe(0);
  });

  it('when the pick table has reader problems, then it gets 422 with every problem and nothing is stored', async () => {
    const response = await upload('shot,source_x_m,receiver_x_m,time_ms\nS1,0,10,-25\nS1,0,30,abc\nS1,0,60,48\n').expect(422);
    expect(response.body.error.code).toBe('pick-table-refused');
    const problems = response.body.error.details.problems as { code: string; line: number }[];
    expect(problems.map((problem) => problem.line)).toEqual(expect.arrayContaining([2, 3]));
    expect(rowCount(harness.db, 'uploads')).toBe(0);
    expect(rowCount(harness.db, 'pick_sets')).toBe(0);
  });

  it('when the file exceeds maxUploadBytes, then it gets 413 naming the limit and nothing is stored', async () => {
    const small = openHarness({ maxUploadBytes: 100 });
    try {
      const id = (await request(small.app).post('/api/surveys').send({ name: 'x' })).body.id as string;
      const response = await request(small.app).post(`/api/surveys/${id}/picks`).set('If-Match', '"v1"').attach('file', sampleSurvey('fenwick-meadow-water-table'), 'f.csv').expect(413);
      expect(response.body.error).toMatchObject({ code: 'upload-too-large', details: { limit: 'maxUploadBytes', maxBytes: 100 } });
      expect(rowCount(small.db, 'uploads')).toBe(0);
    } finally {
      small.close();
    }
  });

  it('when more files come than maxFilesPerUpload, then it gets 413 naming that limit', async () => {
    const strict = openHarness({ maxFilesPerUpload: 1 });
    try {
      const id = (await request(strict.app).post('/api/surveys').send({ name: 'x' }).expect(201)).body.id;
      const response = await request(strict.app).post(`/api/surveys/${id}/picks`).set('If-Match', '"v1"')
        .attach('file', Buffer.from(SMALL_PICK_TABLE), 'a.csv').attach('file', Buffer.from(SMALL_PICK_TABLE), 'b.csv').expect(413);
      expect(response.body.error).toMatchObject({ code: 'upload-too-many-files', details: { limit: 'maxFilesPerUpload', maxFiles: 1 } });
      expect(rowCount(strict.db, 'uploads')).toBe(0);
    } finally {
      strict.close();
    }
  });

  it('when two pick tables come in one upload, then 400 says to send a pick table on its own', async () => {
    const response = await request(harness.app).post(`/api/surveys/${surveyId}/picks`).set('If-Match', '"v1"')
      .attach('file', Buffer.from(SMALL_PICK_TABLE), 'a.csv').attach('file', Buffer.from(SMALL_PICK_TABLE), 'b.csv').expect(400);
    expect(response.body.error.code).toBe('upload-one-file');
    expect(rowCount(harness.db, 'uploads')).toBe(0);
  });

  it('when an upload carries a stale version, then it gets 409 with the current version', async () => {
    await upload(SMALL_PICK_TABLE).expect(201);
    const response = await upload(SMALL_PICK_TABLE, 'again.csv', 1).expect(409);
    expect(response.body.error.details).toMatchObject({ expectedVersion: 1, currentVersion: 2 });
    expect(rowCount(harness.db, 'uploads')).toBe(1);
  });

  it('when the picks are read, then JSON and CSV both give the stored picks (CSV reads back to the same times)', async () => {
    await upload(sampleSurvey('fenwick-meadow-water-table')).expect(201);
    const json = await request(harness.app).get(`/api/surveys/${surveyId}/picks`).expect(200);
    const stored = JSON.parse(harness.store.getCurrentPickSet(surveyId).pickSetJson) as PickSet;
    expect(json.body.pickSet).toEqual(stored);
    const csv = await request(harness.app).get(`/api/surveys/${surveyId}/picks.csv`).expect(200);
    expect(csv.headers['content-type']).toMatch(/text\/csv/);
    expect(csv.headers['content-disposition']).toBe(`attachment; filename=survey-${surveyId}-picks.csv`);
    const reread = readPickTable(csv.text);
    if (!reread.ok) throw new Error(`the exported CSV must read back: ${JSON.stringify(reread.problems[0])}`);
    expect(reread.value.picks.length).toBe(stored.picks.length);
    reread.value.picks.forEach((pick, index) => expect(Math.abs(pick.time - stored.picks[index]!.time)).toBeLessThan(ROUND_TRIP_SECONDS));
  });

  it('when a survey has no picks yet, then reading them gets 404 pick-set-not-found', async () => {
    const response = await request(harness.app).get(`/api/surveys/${surveyId}/picks`).expect(404);
    expect(response.body.error.code).toBe('pick-set-not-found');
  });

  it('when branch edits are posted, then they are stored and the picks read back with them applied', async () => {
    await upload(SMALL_PICK_TABLE).expect(201);
    const response = await request(harness.app).post(`/api/surveys/${surveyId}/branch-edits`).set('If-Match', '"v2"')
      .send({ edits: [{ pickIndex: 0, assign: 1 }, { pickIndex: 2, assign: 'exclude' }] }).expect(201);
    expect(response.body).toMatchObject({ sequence: 1, version: 3, editCount: 2 });
    expect(JSON.parse(harness.store.listBranchEdits(surveyId)[0]!.editsJson)).toEqual([{ pickIndex: 0, assign: 1 }, { pickIndex: 2, assign: 'exclude' }]);
    const picks = await request(harness.app).get(`/api/surveys/${surveyId}/picks`).expect(200);
    expect(picks.body.pickSet.picks.map((pick: { branch: number | null; excluded: boolean }) => [pick.branch, pick.excluded])).toEqual([[1, false], [null, false], [null, true]]);
  });

  it('when a branch edit names a pick that does not exist, then it gets 422 with the problem and nothing is stored', async () => {
    await upload(SMALL_PICK_TABLE).expect(201);
    const response = await request(harness.app).post(`/api/surveys/${surveyId}/branch-edits`).set('If-Match', '"v2"').send({ edits: [{ pickIndex: 3, assign: 2 }] }).expect(422);
    expect(response.body.error.details.problems[0].code).toBe('edit-pick-out-of-range');
    expect(rowCount(harness.db, 'branch_edits')).toBe(0);
    expect(harness.store.getSurvey(surveyId).version).toBe(2);
  });

  it('when the original upload is downloaded, then the bytes are identical and the name is sanitised', async () => {
    const bytes = sampleSurvey('fenwick-meadow-water-table');
    const uploaded = await upload(bytes, '../../etc/pass"wd;rm -rf.csv').expect(201);
    const response = await request(harness.app).get(`/api/surveys/${surveyId}/uploads/${uploaded.body.upload.id}`).buffer(true)
      .parse((res, done) => {
        const chunks: Buffer[] = [];
        res.on('data', (chunk: Buffer) => chunks.push(chunk));
        res.on('end', () => done(null, Buffer.concat(chunks)));
      }).expect(200);
    expect(Buffer.compare(response.body as Buffer, bytes)).toBe(0);
    expect(response.headers['content-disposition']).toBe('attachment; filename="pass_wd_rm -rf.csv"');
    expect(response.headers['x-content-sha256']).toBe(createHash('sha256').update(bytes).digest('hex'));
  });

  it('when an upload id does not exist, then the download gets 404 upload-not-found', async () => {
    const response = await request(harness.app).get(`/api/surveys/${surveyId}/uploads/no-such-upload`).expect(404);
    expect(response.body.error.code).toBe('upload-not-found');
  });
});
