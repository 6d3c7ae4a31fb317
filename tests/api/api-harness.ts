/**
 * The API test harness: an app over a REAL SQLite file in a fresh temporary folder (no mock of the
 * database), a log sink that collects lines, and the sample surveys as bytes.
 */
import request from 'supertest';
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import type { Express } from 'express';
import { createApp, type AppDeps } from '../../server/app.js';
import type { ServerConfigInput } from '../../server/config.js';
import { openDatabase, type Database } from '../../server/storage/database.js';
import { createSurveyStore, type SurveyStore } from '../../server/storage/survey-store.js';

export interface Harness {
  readonly app: Express;
  readonly store: SurveyStore;
  readonly db: Database;
  /** Every log line the app wrote, parsed. */
  readonly logs: Record<string, unknown>[];
  close(): void;
}

export function openHarness(config: Partial<ServerConfigInput> = {}, deps: Omit<AppDeps, 'store' | 'logSink'> = {}): Harness {
  const dataDir = mkdtempSync(join(tmpdir(), 'slopebreak-api-'));
  const db = openDatabase(join(dataDir, 'api-test.sqlite'));
  const store = createSurveyStore(db);
  const logs: Record<string, unknown>[] = [];
  const app = createApp({ dataDir, ...config }, { ...deps, store, logSink: (line) => logs.push(JSON.parse(line) as Record<string, unknown>) });
  return {
    app, store, db, logs,
    close() {
      db.close();
      rmSync(dataDir, { recursive: true, force: true });
    },
  };
}

const SAMPLE_FOLDER = fileURLToPath(new URL('../../sample-surveys/', import.meta.url));

/** An invented demo survey from sample-surveys/ (see its README), as bytes. */
export function sampleSurvey(name: 'fenwick-meadow-water-table' | 'millbrook-quarry-bedrock' | 'ashcombe-hollow-undulating-bedrock'): Buffer {
  return readFileSync(join(SAMPLE_FOLDER, `${name}.csv`));
}

/** The smallest pick table the reader accepts: one shot, three picks (the lib/picks reader's own example). */
export const SMALL_PICK_TABLE = 'shot,source_x_m,receiver_x_m,time_ms\nS1,0,10,25\nS1,0,30,38.1149\nS1,0,60,48.1292\n';

/** Count rows of a table straight from the database, to check what a request stored. */
export function rowCount(db: Database, table: 'surveys' | 'uploads' | 'pick_sets' | 'branch_edits' | 'revisions'): number {
  return db.prepare<[], number>(`SELECT count(*) FROM ${table}`).pluck().get() ?? 0;
}

/**
 * Creates a survey named `name` and uploads the Fenwick Meadow demo picks to it (version 2 after
 * the upload), as most API tests start; returns its id.
 */
export async function surveyWithSamplePicks(harness: Harness, name = 'Fenwick Meadow'): Promise<string> {
  const id = (await request(harness.app).post('/api/surveys').send({ name }).expect(201)).body.id as string;
  await request(harness.app).post(`/api/surveys/${id}/picks`).set('If-Match', '"v1"').attach('file', sampleSurvey('fenwick-meadow-water-table'), 'fenwick.csv').expect(201);
  return id;
}
