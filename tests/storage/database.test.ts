import { describe, expect, it } from 'vitest';
import BetterSqlite3 from 'better-sqlite3';
import { applyMigrations, BUSY_TIMEOUT_MS, openDatabase } from '../../server/storage/database.js';
import { MIGRATIONS } from '../../server/storage/migrations.js';
import { SchemaTooNewError } from '../../server/storage/errors.js';
import { useTempDatabases } from './temp-database.js';

const temp = useTempDatabases();

interface MigrationRow {
  version: number;
  name: string;
  applied_at: string;
}

function migrationRows(db: BetterSqlite3.Database): MigrationRow[] {
  return db.prepare<[], MigrationRow>('SELECT version, name, applied_at FROM schema_migrations ORDER BY version').all();
}

function tableNames(db: BetterSqlite3.Database): string[] {
  return db.prepare<[], string>("SELECT name FROM sqlite_schema WHERE type = 'table' ORDER BY name").pluck().all();
}

describe('openDatabase', () => {
  it('openDatabase sets WAL, synchronous FULL, foreign keys and the busy timeout (read back from SQLite)', () => {
    const db = temp.open(temp.newFile());
    expect(db.pragma('journal_mode', { simple: true })).toBe('wal');
    expect(db.pragma('foreign_keys', { simple: true })).toBe(1);
    // SQLite numbers synchronous levels OFF 0, NORMAL 1, FULL 2, EXTRA 3 (sqlite.org/pragma.html).
    expect(db.pragma('synchronous', { simple: true })).toBe(2);
    expect(db.pragma('busy_timeout', { simple: true })).toBe(BUSY_TIMEOUT_MS);
  });

  it('openDatabase applies every migration once, in one row each, and reopening applies none', () => {
    const file = temp.newFile();
    const first = migrationRows(temp.open(file));
    expect(first.map((row) => row.version)).toEqual(MIGRATIONS.map((migration) => migration.version));
    expect(first.map((row) => row.name)).toEqual(MIGRATIONS.map((migration) => migration.name));

    const reopened = temp.open(file);
    expect(migrationRows(reopened)).toEqual(first); // same rows, same applied_at: nothing re-run
    expect(applyMigrations(reopened, MIGRATIONS)).toEqual([]);
    expect(tableNames(reopened)).toEqual(['branch_edits', 'pick_sets', 'revisions', 'schema_migrations', 'shot_gathers', 'surveys', 'uploads']);
  });

  it('openDatabase refuses a database whose schema is newer than the code, naming both versions, and leaves it untouched', () => {
    const file = temp.newFile();
    const db = temp.open(file);
    const futureVersion = MIGRATIONS.length + 1;
    db.prepare("INSERT INTO schema_migrations (version, name, applied_at) VALUES (?, 'from a newer release', '2099-01-01T00:00:00.000Z')").run(futureVersion);
    db.close();

    let refusal: unknown;
    try {
      openDatabase(file);
    } catch (error) {
      refusal = error;
    }
    expect(refusal).toBeInstanceOf(SchemaTooNewError);
    const tooNew = refusal as SchemaTooNewError;
    expect(tooNew.databaseVersion).toBe(futureVersion);
    expect(tooNew.knownVersion).toBe(MIGRATIONS.length);
    expect(tooNew.message).toContain(`schema version ${futureVersion}`);

    const raw = new BetterSqlite3(file, { readonly: true });
    try {
      expect(migrationRows(raw).map((row) => row.version)).toEqual([...MIGRATIONS.map((migration) => migration.version), futureVersion]);
    } finally {
      raw.close();
    }
  });

  it('openDatabase refuses an in-memory database, where WAL is unavailable', () => {
    expect(() => openDatabase(':memory:')).toThrow(/would not switch to WAL/);
  });
});

describe('applyMigrations', () => {
  it('applyMigrations rolls back a migration that fails midway: neither its first table nor its row remains', () => {
    const db = temp.open(temp.newFile());
    const broken = [...MIGRATIONS, { version: MIGRATIONS.length + 1, name: 'fails halfway', sql: 'CREATE TABLE half_done (id INTEGER); CREATE TABLE surveys (id INTEGER);' }];
    expect(() => applyMigrations(db, broken)).toThrow(/table surveys already exists/);
    expect(tableNames(db)).not.toContain('half_done');
    expect(migrationRows(db).map((row) => row.version)).toEqual(MIGRATIONS.map((migration) => migration.version));
  });

  it('applyMigrations applies only the new migration on a database at the previous version', () => {
    const db = temp.open(temp.newFile());
    const next = { version: MIGRATIONS.length + 1, name: 'adds a table', sql: 'CREATE TABLE added_later (id INTEGER PRIMARY KEY) STRICT;' };
    expect(applyMigrations(db, [...MIGRATIONS, next])).toEqual([next.version]);
    expect(tableNames(db)).toContain('added_later');
  });

  it('applyMigrations refuses migrations that are not numbered 1, 2, 3… in order', () => {
    const db = temp.open(temp.newFile());
    const misnumbered = [{ version: 2, name: 'skips one', sql: 'SELECT 1;' }];
    expect(() => applyMigrations(db, misnumbered)).toThrow(/number 2 but stands at position 1/);
  });
});

describe('migration 2 (branch edits belong to pick sets)', () => {
  it('gives edits stored under schema 1 the newest pick set created at or before them', () => {
    const file = temp.newFile();
    const raw = new BetterSqlite3(file);
    raw.pragma('journal_mode = WAL');
    applyMigrations(raw, MIGRATIONS.slice(0, 1));
    raw.exec(`
      INSERT INTO surveys (id, name, description, display_scale, version, created_at, updated_at) VALUES ('s1', 'Line', '', 'engineering', 4, 't0', 't3');
      INSERT INTO pick_sets (id, survey_id, upload_id, pick_set_json, created_at) VALUES (10, 's1', NULL, '{}', '2026-01-01T00:00:00.000Z');
      INSERT INTO branch_edits (survey_id, sequence, edits_json, created_at) VALUES ('s1', 1, '[]', '2026-01-01T00:00:01.000Z');
      INSERT INTO pick_sets (id, survey_id, upload_id, pick_set_json, created_at) VALUES (11, 's1', NULL, '{}', '2026-01-01T00:00:02.000Z');
      INSERT INTO branch_edits (survey_id, sequence, edits_json, created_at) VALUES ('s1', 2, '[]', '2026-01-01T00:00:03.000Z');
    `);
    raw.close();
    const db = temp.open(file);
    expect(db.prepare<[], [number, number]>('SELECT sequence, pick_set_id FROM branch_edits ORDER BY sequence').raw().all()).toEqual([
      [1, 10],
      [2, 11],
    ]);
  });
});
