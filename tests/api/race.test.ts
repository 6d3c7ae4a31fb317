/**
 * Race test (issue 3 acceptance): many clients edit one survey at once, each on its own TCP
 * connection, against a real listening server over a real SQLite file in a temporary folder (no
 * mocks). The version precondition must let exactly one writer through per survey version; every
 * other gets 409 with the current version, and nothing is silently overwritten.
 */
import { mkdtempSync, rmSync } from 'node:fs';
import { createServer, type Server } from 'node:http';
import type { AddressInfo } from 'node:net';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { createApp } from '../../server/app.js';
import { openDatabase, type Database } from '../../server/storage/database.js';
import { createSurveyStore, type SurveyStore } from '../../server/storage/survey-store.js';
import { SMALL_PICK_TABLE } from './api-harness.js';
import { errorOf, LOOPBACK_HOST, sendOverLoopback, type LoopbackReply } from './loopback-http.js';

/** The acceptance number: 50 concurrent edits of the same survey. */
const CLIENT_COUNT = 50;
/** Per request: generous on a loaded CI machine; a hung request fails the test instead of hanging it. */
const REQUEST_TIMEOUT_MS = 10_000;
/**
 * Most tries per client in the retry round. A client can lose at most CLIENT_COUNT − 1 times (once
 * to each other client), so it needs at most CLIENT_COUNT tries; twice that bounds the loop with room.
 */
const MAX_TRIES = 2 * CLIENT_COUNT;
/** SMALL_PICK_TABLE has three picks (indices 0, 1, 2). */
const PICK_COUNT = 3;

let dataDir: string;
let db: Database;
let store: SurveyStore;
let server: Server;
let port: number;

beforeEach(async () => {
  dataDir = mkdtempSync(join(tmpdir(), 'slopebreak-race-'));
  db = openDatabase(join(dataDir, 'race.sqlite'));
  store = createSurveyStore(db);
  server = createServer(createApp({ dataDir, host: LOOPBACK_HOST }, { store, logSink: () => {} }));
  await new Promise<void>((resolve, reject) => {
    server.once('error', reject);
    server.listen(0, LOOPBACK_HOST, () => resolve());
  });
  port = (server.address() as AddressInfo).port;
});

afterEach(async () => {
  server.closeAllConnections();
  await new Promise<void>((resolve) => server.close(() => resolve()));
  db.close();
  rmSync(dataDir, { recursive: true, force: true });
});

async function createSurvey(name: string): Promise<{ id: string; version: number }> {
  const reply = await sendOverLoopback(port, { method: 'POST', path: '/api/surveys', json: { name }, timeoutMs: REQUEST_TIMEOUT_MS });
  expect(reply.status, reply.text).toBe(201);
  return reply.json as { id: string; version: number };
}

/** The 409 reply's facts, checked to be the stale-version error. */
function staleVersionOf(reply: LoopbackReply): { surveyId: string; expectedVersion: number; currentVersion: number } {
  const error = errorOf(reply);
  expect(error?.code, reply.text).toBe('version-stale');
  return error!.details as { surveyId: string; expectedVersion: number; currentVersion: number };
}

describe('concurrent edits of one survey over HTTP', () => {
  it('when 50 clients rename the same survey at once from the same version, then exactly one gets 200, the other 49 get 409 with the current version, and the stored survey is the winner\'s', async () => {
    const survey = await createSurvey('Quarry line A');
    const replies = await Promise.all(
      Array.from({ length: CLIENT_COUNT }, (_, client) =>
        sendOverLoopback(port, {
          method: 'PATCH', path: `/api/surveys/${survey.id}`, headers: { 'if-match': `"v${survey.version}"` },
          json: { name: `Quarry line A, client ${client}`, description: `renamed by client ${client}` }, timeoutMs: REQUEST_TIMEOUT_MS,
        }),
      ),
    );

    const winners = replies.flatMap((reply, client) => (reply.status === 200 ? [{ client, reply }] : []));
    expect(winners.map((winner) => winner.client), 'exactly one client may win the version').toHaveLength(1);
    const losers = replies.filter((reply) => reply.status !== 200);
    expect(losers.map((reply) => reply.status)).toEqual(Array<number>(CLIENT_COUNT - 1).fill(409));
    for (const loser of losers) {
      expect(staleVersionOf(loser)).toEqual({ surveyId: survey.id, expectedVersion: survey.version, currentVersion: survey.version + 1 });
      expect(errorOf(loser)?.message).toContain(`is at version ${survey.version + 1}`);
    }

    const winner = winners[0]!;
    expect(winner.reply.json).toMatchObject({ name: `Quarry line A, client ${winner.client}`, version: survey.version + 1 });
    expect(winner.reply.headers.etag).toBe(`"v${survey.version + 1}"`);
    // Stored state, read straight from the database file by the store and through the API: the winner's reply.
    const { id, name, description, scale, createdAt, updatedAt, version } = store.getSurvey(survey.id);
    expect({ id, name, description, scale, createdAt, updatedAt, version }).toEqual(winner.reply.json);
    const read = await sendOverLoopback(port, { method: 'GET', path: `/api/surveys/${survey.id}`, timeoutMs: REQUEST_TIMEOUT_MS });
    expect(read.json).toEqual(winner.reply.json);
  });

  it('when 50 clients post branch edits at once and every loser retries with the version from its 409, then each client wins exactly once, one per version, and the version rises by exactly 50', async () => {
    const survey = await createSurvey('Meadow line 2');
    const uploaded = await sendOverLoopback(port, {
      method: 'POST', path: `/api/surveys/${survey.id}/picks`, headers: { 'if-match': `"v${survey.version}"`, 'content-type': 'text/csv' },
      body: SMALL_PICK_TABLE, timeoutMs: REQUEST_TIMEOUT_MS,
    });
    expect(uploaded.status, uploaded.text).toBe(201);
    const startVersion = (uploaded.json as { version: number }).version;
    /** Client k's edit: a branch number only it uses, so its stored edit can be told apart. */
    const editOf = (client: number) => [{ pickIndex: client % PICK_COUNT, assign: client + 1 }];

    interface Win { client: number; version: number; sequence: number; tries: number; firstTry: boolean }
    const runClient = async (client: number): Promise<Win> => {
      let version = startVersion;
      for (let tries = 1; tries <= MAX_TRIES; tries += 1) {
        const reply = await sendOverLoopback(port, {
          method: 'POST', path: `/api/surveys/${survey.id}/branch-edits`, headers: { 'if-match': `"v${version}"` },
          json: { edits: editOf(client) }, timeoutMs: REQUEST_TIMEOUT_MS,
        });
        if (reply.status === 201) {
          const won = reply.json as { version: number; sequence: number };
          expect(won.version, 'a win raises the version it was made against by one').toBe(version + 1);
          return { client, version: won.version, sequence: won.sequence, tries, firstTry: tries === 1 };
        }
        expect(reply.status, reply.text).toBe(409);
        const stale = staleVersionOf(reply);
        expect(stale.expectedVersion).toBe(version);
        expect(stale.currentVersion, 'the 409 names a version newer than the one sent').toBeGreaterThan(version);
        version = stale.currentVersion;
      }
      throw new Error(`client ${client} did not win within ${MAX_TRIES} tries`);
    };
    const wins = await Promise.all(Array.from({ length: CLIENT_COUNT }, (_, client) => runClient(client)));

    expect(wins.filter((win) => win.firstTry).map((win) => win.client), 'exactly one client wins the first round').toHaveLength(1);
    expect(wins.map((win) => win.client)).toEqual(Array.from({ length: CLIENT_COUNT }, (_, client) => client));
    const byVersion = [...wins].sort((first, second) => first.version - second.version);
    expect(byVersion.map((win) => win.version), 'one winner per version, no version skipped').toEqual(
      Array.from({ length: CLIENT_COUNT }, (_, offset) => startVersion + 1 + offset),
    );
    expect(byVersion.map((win) => win.sequence)).toEqual(Array.from({ length: CLIENT_COUNT }, (_, offset) => offset + 1));

    // Stored state: the version went up by exactly 50, and the edit log holds each client's edit once, in the order they won.
    expect(store.getSurvey(survey.id).version).toBe(startVersion + CLIENT_COUNT);
    const log = store.listBranchEdits(survey.id);
    expect(log.map((entry) => entry.sequence)).toEqual(byVersion.map((win) => win.sequence));
    expect(log.map((entry) => JSON.parse(entry.editsJson) as unknown)).toEqual(byVersion.map((win) => editOf(win.client)));
    // The picks as the API serves them: each pick on the branch of the LAST winner that edited it.
    const picks = await sendOverLoopback(port, { method: 'GET', path: `/api/surveys/${survey.id}/picks`, timeoutMs: REQUEST_TIMEOUT_MS });
    const served = picks.json as { version: number; pickSet: { picks: { branch: number | null }[] } };
    expect(served.version).toBe(startVersion + CLIENT_COUNT);
    const lastAssigned = Array.from({ length: PICK_COUNT }, (_, pickIndex) =>
      byVersion.filter((win) => win.client % PICK_COUNT === pickIndex).at(-1)!.client + 1);
    expect(served.pickSet.picks.map((pick) => pick.branch)).toEqual(lastAssigned);
  });
});
