/**
 * Graceful shutdown (issue 3, operations): a write still arriving when the service is told to stop
 * is finished and stored, new connections are refused, and the database is closed only after it.
 * In-process server on 127.0.0.1, bounded waits.
 */
import { describe, expect, it } from 'vitest';
import { request as httpRequest } from 'node:http';
import { mkdtempSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { startServer } from '../../server/serve.js';
import { openDatabase } from '../../server/storage/database.js';
import { createSurveyStore } from '../../server/storage/survey-store.js';

const sleep = (ms: number) => new Promise((resolve) => setTimeout(resolve, ms));

describe('graceful shutdown', () => {
  it('when stop() is called while an upload is still streaming, then the upload finishes with 201 and is stored, and stop resolves only after it', async () => {
    const dataDir = mkdtempSync(join(tmpdir(), 'slopebreak-shutdown-'));
    const running = await startServer({ host: '127.0.0.1', port: 0, dataDir, say: () => {} });
    const created = await fetch(`http://127.0.0.1:${running.port}/api/surveys`, {
      method: 'POST',
      headers: { 'content-type': 'application/json' },
      body: JSON.stringify({ name: 'Shutdown line', scale: 'engineering' }),
    });
    expect(created.status).toBe(201);
    const survey = (await created.json()) as { id?: string; version?: number; survey?: { id: string; version: number } };
    const id = survey.id ?? survey.survey!.id;
    const version = survey.version ?? survey.survey!.version;

    const body = readFileSync('sample-surveys/millbrook-quarry-bedrock.csv');
    const half = Math.floor(body.length / 2);
    const events: string[] = [];
    const response = new Promise<number>((resolve, reject) => {
      const upload = httpRequest(
        { host: '127.0.0.1', port: running.port, method: 'POST', path: `/api/surveys/${id}/picks`, agent: false, headers: { 'content-type': 'text/csv', 'content-length': body.length, 'if-match': `"v${version}"` } },
        (reply) => {
          reply.resume();
          reply.on('end', () => {
            events.push('response');
            resolve(reply.statusCode ?? 0);
          });
        },
      );
      upload.on('error', reject);
      upload.write(body.subarray(0, half));
      // Stop while the body is half sent, then send the rest.
      setTimeout(() => {
        void running.stop().then(() => events.push('stopped'));
        setTimeout(() => {
          events.push('body finished');
          upload.end(body.subarray(half));
        }, 300);
      }, 100);
    });
    const status = await response;
    for (let wait = 0; wait < 100 && !events.includes('stopped'); wait += 1) await sleep(50);
    expect(status).toBe(201);
    // stop() waited for the request that was in flight: it resolved only after the body was done.
    expect(events.indexOf('body finished')).toBeLessThan(events.indexOf('stopped'));
    expect(events).toContain('response');
    // A new connection after stop is refused.
    await expect(fetch(`http://127.0.0.1:${running.port}/api/health`)).rejects.toThrow();
    const db = openDatabase(join(dataDir, 'slopebreak.sqlite'));
    const store = createSurveyStore(db);
    expect(store.getCurrentPickSet(id).uploadId).toBeDefined();
    db.close();
  });
});
