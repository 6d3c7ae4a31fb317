/**
 * The office service as an operator starts it: `slopebreak serve` from the built bin on a
 * loopback port, with the sample surveys loaded, stopped by SIGTERM; the generated access token;
 * and `slopebreak backup`. All traffic goes to 127.0.0.1 only, in bounded waits.
 */
import { describe, expect, it } from 'vitest';
import { spawnSync, type ChildProcess } from 'node:child_process';
import { CLI, startServeChild } from '../helpers/serve-child.js';
import { existsSync, mkdtempSync, readdirSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { accessTokenFor, isLoopbackHost, serverUrls, TOKEN_FILE_NAME } from '../../server/serve.js';
import BetterSqlite3 from 'better-sqlite3';
import { applyMigrations, openDatabase } from '../../server/storage/database.js';
import { MIGRATIONS } from '../../server/storage/migrations.js';
import { createSurveyStore } from '../../server/storage/survey-store.js';

/** The pick tables in sample-surveys/ (one survey each when loaded). */
/** Pick tables, SEG-Y files and folders of SEG-2 files: each is one sample survey (server/serve.ts). */
const SAMPLE_COUNT = readdirSync('sample-surveys', { withFileTypes: true }).filter((entry) => entry.isDirectory() || /\.(csv|sgy)$/.test(entry.name)).length;



/** Start `serve` and resolve with the child and its first URL once it says where it listens. */
const startServe = (args: string[]) => startServeChild(args);

function exited(child: ChildProcess): Promise<number | null> {
  return new Promise((resolve) => child.once('exit', (code) => resolve(code)));
}

describe('slopebreak serve', () => {
  it('when started on a free loopback port with the samples, then it serves them and stops cleanly on SIGTERM', async () => {
    const data = mkdtempSync(join(tmpdir(), 'slopebreak-serve-'));
    const { child, url } = await startServe(['--port', '0', '--data', data, '--samples', 'sample-surveys']);
    expect(url).toMatch(/^http:\/\/127\.0\.0\.1:\d+\/$/);
    const health = await fetch(new URL('api/health', url));
    expect(health.status).toBe(200);
    const surveys = (await (await fetch(new URL('api/surveys', url))).json()) as { surveys?: unknown[] } | unknown[];
    const list = Array.isArray(surveys) ? surveys : (surveys.surveys ?? []);
    expect(list.length).toBe(SAMPLE_COUNT);
    // Each sample comes with a first interpretation, so a newcomer sees a result without a click.
    for (const survey of list as { id: string }[]) {
      const revisions = (await (await fetch(new URL(`api/surveys/${survey.id}/revisions/1`, url))).json()) as { result?: { layers?: unknown[] } };
      expect(revisions.result?.layers?.length).toBeGreaterThanOrEqual(2);
    }
    const done = exited(child);
    child.kill('SIGTERM');
    expect(await done).toBe(0);
    // The database is closed cleanly and opens again with the surveys in it.
    const db = openDatabase(join(data, 'slopebreak.sqlite'));
    expect(createSurveyStore(db).listSurveys({}).length).toBe(list.length);
    db.close();
  });

  it('when restarted on a data folder that already has surveys, then it does not load the samples twice', async () => {
    const data = mkdtempSync(join(tmpdir(), 'slopebreak-serve-'));
    for (let run = 0; run < 2; run += 1) {
      const { child } = await startServe(['--port', '0', '--data', data, '--samples', 'sample-surveys']);
      const done = exited(child);
      child.kill('SIGTERM');
      await done;
    }
    const db = openDatabase(join(data, 'slopebreak.sqlite'));
    expect(createSurveyStore(db).listSurveys({}).length).toBe(SAMPLE_COUNT);
    db.close();
  });

  it('refuses a bad port with a usage message (exit 2)', () => {
    const run = spawnSync(process.execPath, [CLI, 'serve', '--port', 'eighty'], { encoding: 'utf8', timeout: 20_000 });
    expect(run.status).toBe(2);
    expect(run.stderr).toMatch(/--port takes a whole number/);
  });
});

describe('slopebreak backup', () => {
  it('when given the data folder, then it writes a copy that opens with the same surveys; a missing database exits 1', async () => {
    const data = mkdtempSync(join(tmpdir(), 'slopebreak-backup-'));
    const { child } = await startServe(['--port', '0', '--data', data, '--samples', 'sample-surveys']);
    const done = exited(child);
    child.kill('SIGTERM');
    await done;
    const copy = join(data, 'copy.sqlite');
    const run = spawnSync(process.execPath, [CLI, 'backup', '--data', data, '--to', copy], { encoding: 'utf8', timeout: 20_000 });
    expect(run.status).toBe(0);
    const db = openDatabase(copy);
    expect(createSurveyStore(db).listSurveys({}).length).toBe(SAMPLE_COUNT);
    db.close();
    const missing = spawnSync(process.execPath, [CLI, 'backup', '--data', join(data, 'nowhere'), '--to', join(data, 'x.sqlite')], { encoding: 'utf8', timeout: 20_000 });
    expect(missing.status).toBe(1);
    expect(missing.stderr).toMatch(/no database at/);
  });
});

describe('slopebreak backup leaves the live database alone', () => {
  it('when the database is at an older schema, then the backup copies it without migrating it', () => {
    const data = mkdtempSync(join(tmpdir(), 'slopebreak-backup-'));
    const raw = new BetterSqlite3(join(data, 'slopebreak.sqlite'));
    raw.pragma('journal_mode = WAL');
    applyMigrations(raw, MIGRATIONS.slice(0, 1));
    raw.close();
    const copy = join(data, 'copy.sqlite');
    const run = spawnSync(process.execPath, [CLI, 'backup', '--data', data, '--to', copy], { encoding: 'utf8', timeout: 20_000 });
    expect(run.status).toBe(0);
    const check = new BetterSqlite3(join(data, 'slopebreak.sqlite'), { readonly: true });
    expect(check.prepare('SELECT max(version) FROM schema_migrations').pluck().get()).toBe(1);
    check.close();
    expect(existsSync(copy)).toBe(true);
  });
});

describe('serve helpers', () => {
  it('accessTokenFor generates a token once, keeps it owner-readable, and reads it back later', () => {
    const data = mkdtempSync(join(tmpdir(), 'slopebreak-token-'));
    const said: string[] = [];
    const first = accessTokenFor(data, undefined, (line) => said.push(line));
    expect(first).toMatch(/^[A-Za-z0-9_-]{32}$/);
    expect(said[0]).toContain(first);
    const again = accessTokenFor(data, undefined, (line) => said.push(line));
    expect(again).toBe(first);
    expect(said[1]).not.toContain(first);
    expect(readFileSync(join(data, TOKEN_FILE_NAME), 'utf8').trim()).toBe(first);
    expect(accessTokenFor(mkdtempSync(join(tmpdir(), 'slopebreak-token-')), 'configured-token-123456', () => {})).toBe('configured-token-123456');
    expect(existsSync(join(data, TOKEN_FILE_NAME))).toBe(true);
  });

  it('serverUrls gives the local URL, and the network addresses only when listening on all interfaces', () => {
    expect(serverUrls('127.0.0.1', 8080)).toEqual(['http://127.0.0.1:8080/']);
    const all = serverUrls('0.0.0.0', 8080);
    expect(all[0]).toBe('http://127.0.0.1:8080/');
    expect(all.every((url) => /^http:\/\/[\d.]+:8080\/$/.test(url))).toBe(true);
    expect(isLoopbackHost('127.0.0.2')).toBe(true);
    expect(isLoopbackHost('0.0.0.0')).toBe(false);
  });
});
