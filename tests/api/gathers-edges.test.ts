/**
 * Shot gathers through the service at the edges a review found: traces with their own delays and
 * sample intervals, hand edits after a pick table replaced a gather's shot, a dead gather sent
 * again for a shot that had picks. The gathers are written at test time by the test-side SEG-2
 * writer (tests/gathers/seg2/write-seg2.ts, from the byte layout of Pullan 1990); each trace holds
 * one spike at a time chosen here, so where it must be drawn and picked is known exactly.
 */
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import request from 'supertest';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import type { GatherDisplay, GatherSummary } from '../../client/src/api-types.js';
import { applyHandPicks, type EditedTrace } from '../../lib/picks/hand-picks.js';
import type { Pick } from '../../lib/picks/types.js';
import { writeSeg2 } from '../gathers/seg2/write-seg2.js';
import { openHarness, rowCount, type Harness } from './api-harness.js';

const SAMPLES = fileURLToPath(new URL('../../sample-surveys/', import.meta.url));

/** A 12-trace SEG-2 shot: trace k has delay `delay(k)`, interval `interval(k)`, a ramp-onset arrival at `arrival(k)`. */
function seg2Shot(delay: (k: number) => number, interval: (k: number) => number, arrival: (k: number) => number, samples = 400): Uint8Array {
  return writeSeg2({
    littleEndian: true,
    fileStrings: ['UNITS METERS'],
    traces: Array.from({ length: 12 }, (_, k) => ({
      format: 4,
      samples: Array.from({ length: samples }, (_, n) => {
        const t = delay(k) + n * interval(k) - arrival(k);
        // A damped sine starting exactly at the arrival, over a small deterministic hum.
        return (t >= 0 ? Math.sin(2 * Math.PI * 100 * t) * Math.exp(-t / 0.01) : 0) + 0.001 * Math.sin(n * 1.7);
      }),
      strings: [`SAMPLE_INTERVAL ${interval(k)}`, `DELAY ${delay(k)}`, `RECEIVER_LOCATION ${2 * (k + 1)}`, 'SOURCE_LOCATION 0', `CHANNEL_NUMBER ${k + 1}`],
    })),
  });
}

let harness: Harness;
let surveyId: string;
beforeEach(async () => {
  harness = openHarness();
  surveyId = (await request(harness.app).post('/api/surveys').send({ name: 'edges' }).expect(201)).body.id;
});
afterEach(() => harness.close());

function upload(bytes: Uint8Array, name: string, version: number) {
  return request(harness.app).post(`/api/surveys/${surveyId}/picks`).set('If-Match', `"v${version}"`).attach('file', Buffer.from(bytes), name);
}

async function firstDisplay(): Promise<GatherDisplay> {
  const list = (await request(harness.app).get(`/api/surveys/${surveyId}/gathers`).expect(200)).body.gathers as GatherSummary[];
  return (await request(harness.app).get(`/api/surveys/${surveyId}/gathers/${list[0]!.id}`).expect(200)).body as GatherDisplay;
}

const arrival = (k: number) => 0.01 + 0.002 * k;

describe('traces with their own delays and sample intervals', () => {
  it('draws each arrival where it is picked, on one time axis', async () => {
    // Traces 6–11 start 20 ms after the shot and are sampled twice as coarsely.
    const bytes = seg2Shot((k) => (k >= 6 ? 0.02 : 0), (k) => (k >= 6 ? 0.0005 : 0.00025), arrival);
    await upload(bytes, 'mixed.sg2', 1).expect(201);
    const display = await firstDisplay();
    expect(display.startTime).toBe(0);
    for (const trace of display.traces) {
      const pick = display.picks[trace.traceIndex]!;
      expect(pick.time, `trace ${trace.traceIndex} picked at its arrival (written at ${arrival(trace.traceIndex)} s)`).toBeCloseTo(arrival(trace.traceIndex), 3);
      // The first displayed bin clearly above the hum lies within a displayed interval and a half of the arrival.
      const onsetBin = trace.samples.findIndex((value) => Math.abs(value) > 0.05);
      const drawnAt = display.startTime + onsetBin * display.sampleInterval;
      expect(Math.abs(drawnAt - arrival(trace.traceIndex)), `trace ${trace.traceIndex} drawn at ${drawnAt}`).toBeLessThanOrEqual(1.5 * display.sampleInterval + 0.0005);
    }
  });

  it('checks a hand pick against its own trace\'s record, and takes the hand-pick sigma from its interval', async () => {
    await upload(seg2Shot((k) => (k >= 6 ? 0.02 : 0), (k) => (k >= 6 ? 0.001 : 0.00025), arrival), 'mixed.sg2', 1).expect(201);
    const display = await firstDisplay();
    const early = await request(harness.app).post(`/api/surveys/${surveyId}/pick-edits`)
      .send({ version: display.version, edits: [{ gatherId: display.gather.id, traceIndex: 8, time: 0.01 }] }).expect(422);
    expect(early.body.error.message).toContain('0.02 to');
    const stored = await request(harness.app).post(`/api/surveys/${surveyId}/pick-edits`)
      .send({ version: display.version, edits: [{ gatherId: display.gather.id, traceIndex: 8, time: 0.03 }] }).expect(201);
    expect(stored.body.version).toBe(display.version + 1);
    const after = await firstDisplay();
    expect(after.picks[8]).toMatchObject({ status: 'user', time: 0.03 });
    expect(after.picks[8]!.sigma).toBeCloseTo(0.001, 12); // one sample of that trace (1 ms), above the 0.5 ms floor
  });
});

describe('hand edits after the gather\'s shot was replaced', () => {
  it('refuses edits once a geographic pick table is current (409), storing nothing', async () => {
    await upload(seg2Shot(() => 0, () => 0.00025, arrival), 'G.sg2', 1).expect(201);
    const display = await firstDisplay();
    const table = readFileSync(join(SAMPLES, 'vellmark-crustal-profile.csv'));
    await request(harness.app).post(`/api/surveys/${surveyId}/picks`).set('If-Match', '"v2"').attach('file', table, 'vellmark.csv').expect(201);
    const response = await request(harness.app).post(`/api/surveys/${surveyId}/pick-edits`)
      .send({ version: 3, edits: [{ gatherId: display.gather.id, traceIndex: 0, remove: true }] }).expect(409);
    expect(response.body.error.code).toBe('pick-edits-not-on-line');
    expect(rowCount(harness.db, 'pick_sets')).toBe(2);
  });

  it('refuses edits when a pick table holds a shot of the same name placed elsewhere (409)', async () => {
    await upload(seg2Shot(() => 0, () => 0.00025, arrival), 'G.sg2', 1).expect(201);
    const display = await firstDisplay();
    const csv = 'shot,source_x_m,receiver_x_m,time_ms\n' + [5, 10, 15, 20].map((x) => `G,100,${100 + x},${x * 2}`).join('\n') + '\n';
    await request(harness.app).post(`/api/surveys/${surveyId}/picks`).set('If-Match', '"v2"').set('Content-Type', 'text/csv').send(csv).expect(201);
    const response = await request(harness.app).post(`/api/surveys/${surveyId}/pick-edits`)
      .send({ version: 3, edits: [{ gatherId: display.gather.id, traceIndex: 0, time: 0.012 }] }).expect(409);
    expect(response.body.error.code).toBe('pick-edits-gather-not-current');
  });
});

describe('a dead gather sent again for a shot that has picks', () => {
  it('keeps the shot\'s earlier picks and says so', async () => {
    await upload(seg2Shot(() => 0, () => 0.00025, arrival), 'G.sg2', 1).expect(201);
    const before = (await request(harness.app).get(`/api/surveys/${surveyId}/picks`).expect(200)).body.pickSet.picks.length as number;
    const dead = writeSeg2({ littleEndian: true, fileStrings: ['UNITS METERS'], traces: Array.from({ length: 12 }, (_, k) => ({
      format: 4, samples: new Array(400).fill(0), strings: ['SAMPLE_INTERVAL 0.00025', `RECEIVER_LOCATION ${2 * (k + 1)}`, 'SOURCE_LOCATION 0'],
    })) });
    // The dead file gives no pick at all: refused whole, and the earlier picks and gather stay.
    const gathersBefore = (await request(harness.app).get(`/api/surveys/${surveyId}/gathers`).expect(200)).body.gathers;
    const response = await upload(dead, 'G.sg2', 2).expect(422);
    expect(response.body.error.code).toBe('gather-no-picks');
    expect(response.body.error.details.problems[0].message).toMatch(/"G" gave 0 usable picks.*earlier picks were kept/);
    expect((await request(harness.app).get(`/api/surveys/${surveyId}/picks`).expect(200)).body.pickSet.picks.length).toBe(before);
    expect((await request(harness.app).get(`/api/surveys/${surveyId}/gathers`).expect(200)).body.gathers).toEqual(gathersBefore);
  });

  it('keeps the earlier picks of a dead shot sent with a good one, with a warning naming it', async () => {
    await upload(seg2Shot(() => 0, () => 0.00025, arrival), 'G.sg2', 1).expect(201);
    const dead = writeSeg2({ littleEndian: true, fileStrings: ['UNITS METERS'], traces: Array.from({ length: 12 }, (_, k) => ({
      format: 4, samples: new Array(400).fill(0), strings: ['SAMPLE_INTERVAL 0.00025', `RECEIVER_LOCATION ${2 * (k + 1)}`, 'SOURCE_LOCATION 0'],
    })) });
    const response = await request(harness.app).post(`/api/surveys/${surveyId}/picks`).set('If-Match', '"v2"')
      .attach('file', Buffer.from(dead), 'G.sg2').attach('file', Buffer.from(seg2Shot(() => 0, () => 0.00025, arrival)), 'H.sg2').expect(201);
    expect(response.body.shotIds.sort()).toEqual(['G', 'H']);
    const warning = (response.body.warnings as { code: string; message: string }[]).find((entry) => entry.code === 'gather-shot-too-few-picks');
    expect(warning?.message).toMatch(/"G" gave 0 usable picks.*earlier picks were kept/);
    // G's gather is still the one its picks came from.
    const gathers = (await request(harness.app).get(`/api/surveys/${surveyId}/gathers`).expect(200)).body.gathers as GatherSummary[];
    expect(gathers.map((gather) => [gather.shot, gather.pickCount])).toEqual([['G', 12], ['H', 12]]);
  });
});

describe('applyHandPicks', () => {
  const pick = (shot: string, receiver: string, x: number, time: number): Pick => ({
    shot, receiver, sourceX: 0, receiverX: x, time, sigma: null, branch: 2, excluded: false, sourceElevation: null, receiverElevation: null,
    sourceDepth: null, uphole: null, sourceLat: null, sourceLon: null, receiverLat: null, receiverLon: null, line: 0,
  });
  const trace = (shot: string, receiver: string, x: number): EditedTrace => ({ shot, receiver, sourceX: 0, receiverX: x, sourceElevation: null, receiverElevation: null, sourceDepth: null });

  it('moves keeping the branch, removes, and places a new pick after its shot\'s last; a receiver of the same name elsewhere is another trace', () => {
    const picks = [pick('A', 'ch1', 2, 0.01), pick('A', 'ch2', 4, 0.02), pick('B', 'ch1', 2, 0.03), pick('B', 'ch1', 50, 0.04)];
    const after = applyHandPicks(picks, [
      { trace: trace('A', 'ch1', 2), time: 0.011, sigma: 0.0005 },
      { trace: trace('A', 'ch3', 6), time: 0.025, sigma: 0.0005 },
      { trace: trace('B', 'ch1', 50), remove: true },
      { trace: trace('A', 'ch9', 99), remove: true },
    ]);
    expect(after.map((entry) => [entry.shot, entry.receiver, entry.receiverX, entry.time, entry.branch])).toEqual([
      ['A', 'ch1', 2, 0.011, 2], ['A', 'ch2', 4, 0.02, 2], ['A', 'ch3', 6, 0.025, null], ['B', 'ch1', 2, 0.03, 2],
    ]);
  });
});
