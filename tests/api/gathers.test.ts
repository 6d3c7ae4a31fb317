/**
 * Shot gathers through the service: uploaded through the picks endpoint (content sniffed), picked,
 * listed, shown, and edited by hand into the survey's next pick set.
 *
 * The gathers are the bundled demo gathers (sample-surveys/, written by
 * tests/tools/make-sample-gathers.ts); their true first-arrival times come from the ray-geometry
 * oracle (tests/oracles/ray-geometry.ts: explicit ray paths through the plane layers the
 * generator modelled), which is what the picks are checked against.
 */
import { readdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import request from 'supertest';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import type { GatherDisplay, GatherSummary } from '../../client/src/api-types.js';
import type { PickSet } from '../../lib/picks/types.js';
import { firstArrivalByRays } from '../oracles/ray-geometry.js';
import { openHarness, rowCount, SMALL_PICK_TABLE, type Harness } from './api-harness.js';

const SAMPLES = fileURLToPath(new URL('../../sample-surveys/', import.meta.url));
const CORRAN = join(SAMPLES, 'corran-brae-culvert');
const CORRAN_FILES = readdirSync(CORRAN).filter((name) => name.endsWith('.sg2')).sort();
/** The layers make-sample-gathers.ts modelled for Corran Brae (m/s, m). */
const CORRAN_LAYERS = { velocities: [380, 1100, 3200], thicknesses: [2.0, 4.5] };
/** Acceptance tolerance: one sample interval (0.125 ms) plus 1 ms. */
const TOLERANCE = 0.000125 + 0.001;

let harness: Harness;
let surveyId: string;
beforeEach(async () => {
  harness = openHarness();
  surveyId = (await request(harness.app).post('/api/surveys').send({ name: 'Corran Brae' }).expect(201)).body.id;
});
afterEach(() => harness.close());

function uploadGathers(names: readonly string[], version = 1, fields: Record<string, string> = {}) {
  let call = request(harness.app).post(`/api/surveys/${surveyId}/picks`).set('If-Match', `"v${version}"`);
  for (const [name, value] of Object.entries(fields)) call = call.field(name, value);
  for (const name of names) call = call.attach('file', readFileSync(join(CORRAN, name)), name);
  return call;
}

async function currentPickSet(): Promise<PickSet> {
  return (await request(harness.app).get(`/api/surveys/${surveyId}/picks`).expect(200)).body.pickSet as PickSet;
}

describe('gather uploads', () => {
  it('when five SEG-2 shot gathers are uploaded at once, each is stored, picked, and its picks lie near the modelled first arrivals', async () => {
    const response = await uploadGathers(CORRAN_FILES).expect(201);
    expect(response.body.version).toBe(2);
    expect(response.body.shotIds).toEqual(CORRAN_FILES.map((name) => name.replace(/\.sg2$/, '')));
    expect(response.body.gathers).toHaveLength(5);
    expect(rowCount(harness.db, 'uploads')).toBe(5);
    const pickSet = await currentPickSet();
    expect(pickSet.columns.sigma).toBe(true);
    const within = pickSet.picks.filter((pick) => {
      const truth = firstArrivalByRays(CORRAN_LAYERS.velocities, CORRAN_LAYERS.thicknesses, Math.abs(pick.receiverX - pick.sourceX)).time;
      return Math.abs(pick.time - truth) <= TOLERANCE;
    });
    // 5 shots × 24 traces; the acceptance share (90 %) on the demo line (ray-geometry oracle).
    expect(pickSet.picks.length).toBeGreaterThanOrEqual(0.9 * 120);
    expect(within.length / pickSet.picks.length).toBeGreaterThanOrEqual(0.9);
    for (const pick of pickSet.picks) expect(pick.sigma).toBeGreaterThan(0);
  });

  it('when a SEG-Y of three shots is sent as a raw body, then its shots are split by field record and named by source point', async () => {
    const bytes = readFileSync(join(SAMPLES, 'tallis-moor-water-table.sgy'));
    const response = await request(harness.app).post(`/api/surveys/${surveyId}/picks`).set('If-Match', '"v1"')
      .set('Content-Type', 'application/octet-stream').set('X-File-Name', 'tallis.sgy').send(bytes).expect(201);
    expect(response.body.shotIds).toEqual(['SP1', 'SP2', 'SP3']);
    const list = (await request(harness.app).get(`/api/surveys/${surveyId}/gathers`).expect(200)).body.gathers as GatherSummary[];
    expect(list.map((gather) => [gather.format, gather.traceCount, gather.sampleInterval])).toEqual([['SEG-Y', 48, 0.00025], ['SEG-Y', 48, 0.00025], ['SEG-Y', 48, 0.00025]]);
    expect(list.map((gather) => gather.sourceX)).toEqual([-4.5, 70.5, 145.5]);
  });

  it('when a later gather names a shot again, its picks replace that shot\'s and other shots stay', async () => {
    await uploadGathers(CORRAN_FILES.slice(0, 2)).expect(201);
    const again = await uploadGathers([CORRAN_FILES[0]!], 2, { shot: 'C1-E' }).expect(201);
    expect(again.body.shotIds.sort()).toEqual([CORRAN_FILES[1]!.replace('.sg2', ''), 'C1-E'].sort());
    const gathers = (await request(harness.app).get(`/api/surveys/${surveyId}/gathers`).expect(200)).body.gathers as GatherSummary[];
    expect(gathers.map((gather) => gather.shot).sort()).toEqual(['C1-E', CORRAN_FILES[1]!.replace('.sg2', '')].sort());
  });

  it('when a gather is cut short, then 422 names the byte offset and nothing is stored', async () => {
    const bytes = readFileSync(join(CORRAN, CORRAN_FILES[0]!));
    const response = await request(harness.app).post(`/api/surveys/${surveyId}/picks`).set('If-Match', '"v1"')
      .attach('file', bytes.subarray(0, 5000), 'cut.sg2').expect(422);
    expect(response.body.error.code).toBe('gather-refused');
    expect(response.body.error.details.problems[0].byteOffset).toEqual(expect.any(Number));
    expect(rowCount(harness.db, 'uploads')).toBe(0);
    expect(rowCount(harness.db, 'pick_sets')).toBe(0);
  });

  it('when a pick table comes with gathers in one upload, then 400 says to send it on its own', async () => {
    const response = await request(harness.app).post(`/api/surveys/${surveyId}/picks`).set('If-Match', '"v1"')
      .attach('file', readFileSync(join(CORRAN, CORRAN_FILES[0]!)), CORRAN_FILES[0]!)
      .attach('file', Buffer.from(SMALL_PICK_TABLE), 'picks.csv').expect(400);
    expect(response.body.error.code).toBe('upload-one-file');
  });

  it('when a band-pass has one corner or reversed corners, or a spacing is not a number, then 422 names the fields', async () => {
    expect((await uploadGathers([CORRAN_FILES[0]!], 1, { bandLow: '30' }).expect(422)).body.error.code).toBe('band-pass-incomplete');
    expect((await uploadGathers([CORRAN_FILES[0]!], 1, { bandLow: '300', bandHigh: '30' }).expect(422)).body.error.code).toBe('band-pass-reversed');
    const spacing = (await uploadGathers([CORRAN_FILES[0]!], 1, { receiverSpacing: 'two' }).expect(422)).body.error;
    expect(JSON.stringify(spacing.details)).toContain('receiverSpacing');
    expect(rowCount(harness.db, 'uploads')).toBe(0);
  });

  it('when the band-pass reaches past the traces\' Nyquist frequency (4 kHz at 0.125 ms), then 422 says so and nothing is stored', async () => {
    const response = await uploadGathers([CORRAN_FILES[0]!], 1, { bandLow: '100', bandHigh: '6000' }).expect(422);
    expect(response.body.error.details.problems[0].code).toBe('picking-options-invalid');
    expect(response.body.error.details.problems[0].message).toMatch(/Nyquist/);
    expect(rowCount(harness.db, 'uploads')).toBe(0);
  });

  it('when a multipart upload gives no length, then 411; when it is over the request limit, 413', async () => {
    const small = openHarness({ maxUploadRequestBytes: 50_000 });
    try {
      const id = (await request(small.app).post('/api/surveys').send({ name: 'x' }).expect(201)).body.id;
      const response = await request(small.app).post(`/api/surveys/${id}/picks`).set('If-Match', '"v1"')
        .attach('file', readFileSync(join(CORRAN, CORRAN_FILES[0]!)), CORRAN_FILES[0]!).expect(413);
      expect(response.body.error.code).toBe('upload-request-too-large');
    } finally {
      small.close();
    }
  });
});

describe('the gather view and hand edits', () => {
  async function firstGather(): Promise<GatherDisplay> {
    await uploadGathers(CORRAN_FILES).expect(201);
    const list = (await request(harness.app).get(`/api/surveys/${surveyId}/gathers`).expect(200)).body.gathers as GatherSummary[];
    return (await request(harness.app).get(`/api/surveys/${surveyId}/gathers/${list[0]!.id}`).expect(200)).body as GatherDisplay;
  }

  it('shows every trace scaled to at most 1 with its pick, on one time axis', async () => {
    const display = await firstGather();
    expect(display.traces).toHaveLength(24);
    expect(display.picks).toHaveLength(24);
    for (const trace of display.traces) {
      expect(Math.max(...trace.samples.map(Math.abs))).toBeLessThanOrEqual(1);
      expect(trace.samples.length).toBeLessThanOrEqual(1500);
    }
    const picked = display.picks.filter((pick) => pick.pickIndex !== null);
    expect(picked.length).toBe(display.gather.pickCount);
    expect(picked.every((pick) => pick.status === 'automatic')).toBe(true);
  });

  it('when a pick is moved and another removed, the survey gets a new pick set with both changes and a new version; the old one is kept', async () => {
    const display = await firstGather();
    const before = (await currentPickSet()).picks.length;
    const [moved, removed] = display.picks.filter((pick) => pick.pickIndex !== null);
    const response = await request(harness.app).post(`/api/surveys/${surveyId}/pick-edits`).send({
      version: display.version,
      edits: [
        { gatherId: display.gather.id, traceIndex: moved!.traceIndex, time: 0.0123 },
        { gatherId: display.gather.id, traceIndex: removed!.traceIndex, remove: true },
      ],
    }).expect(201);
    expect(response.body.version).toBe(display.version + 1);
    expect(rowCount(harness.db, 'pick_sets')).toBe(2);
    const after = (await request(harness.app).get(`/api/surveys/${surveyId}/gathers/${display.gather.id}`).expect(200)).body as GatherDisplay;
    const movedAfter = after.picks[moved!.traceIndex]!;
    expect(movedAfter).toMatchObject({ status: 'user', time: 0.0123, confidence: null });
    expect(movedAfter.sigma).toBeCloseTo(0.0005, 12); // hand-pick sigma: max(one sample, 0.5 ms)
    expect(after.picks[removed!.traceIndex]).toMatchObject({ status: 'removed', pickIndex: null });
    const pickSet = await currentPickSet();
    expect(pickSet.picks.length).toBe(before - 1);
    expect(pickSet.picks.find((pick) => pick.shot === display.gather.shot && pick.receiver === after.traces[moved!.traceIndex]!.receiver)?.time).toBe(0.0123);
  });

  it('when an edit is made against an old version, then 409 and nothing changes', async () => {
    const display = await firstGather();
    const edit = { gatherId: display.gather.id, traceIndex: 0, time: 0.01 };
    await request(harness.app).post(`/api/surveys/${surveyId}/pick-edits`).send({ version: display.version, edits: [edit] }).expect(201);
    await request(harness.app).post(`/api/surveys/${surveyId}/pick-edits`).send({ version: display.version, edits: [edit] }).expect(409);
    expect(rowCount(harness.db, 'pick_sets')).toBe(2);
  });

  it('when an edit names a trace the gather lacks or a time past the record, then 422 names the edit', async () => {
    const display = await firstGather();
    const past = await request(harness.app).post(`/api/surveys/${surveyId}/pick-edits`)
      .send({ version: display.version, edits: [{ gatherId: display.gather.id, traceIndex: 99, time: 0.01 }] }).expect(422);
    expect(past.body.error.code).toBe('pick-edit-trace-unknown');
    const late = await request(harness.app).post(`/api/surveys/${surveyId}/pick-edits`)
      .send({ version: display.version, edits: [{ gatherId: display.gather.id, traceIndex: 1, time: 5 }] }).expect(422);
    expect(late.body.error.code).toBe('pick-edit-time-outside');
    await request(harness.app).get(`/api/surveys/${surveyId}/gathers/nosuch.1`).expect(404);
  });

  it('a survey made from a pick table lists no gathers', async () => {
    await request(harness.app).post(`/api/surveys/${surveyId}/picks`).set('If-Match', '"v1"').set('Content-Type', 'text/csv').send(SMALL_PICK_TABLE).expect(201);
    expect((await request(harness.app).get(`/api/surveys/${surveyId}/gathers`).expect(200)).body.gathers).toEqual([]);
  });
});
