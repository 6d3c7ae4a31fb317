/**
 * Opening the SQLite database: connection settings and schema migrations.
 */
import BetterSqlite3 from 'better-sqlite3';
import { MIGRATIONS, type Migration } from './migrations.js';
import { SchemaTooNewError } from './errors.js';

/** A better-sqlite3 connection. */
export type Database = BetterSqlite3.Database;

/** How long a connection waits for another connection's write lock before giving up, in ms. */
export const BUSY_TIMEOUT_MS = 5000;

/**
 * Opens (creating if needed) the database in `file`, sets the connection up and brings the schema
 * up to date.
 *
 * Settings, read back by the tests:
 * - `journal_mode = WAL`: readers never block the writer nor the writer the readers, so colleagues
 *   can read a survey while someone uploads. WAL needs a file on a local disk; `:memory:` or a
 *   file system without shared memory leaves another journal mode, and this function then throws
 *   rather than run with weaker guarantees than documented.
 * - `synchronous = FULL`: every commit syncs the write-ahead log to disk before it returns, so a
 *   write the caller was told succeeded survives a power cut or an operating-system crash, not
 *   only a killed process. `NORMAL` would be enough against a killed process (the WAL is already
 *   in the operating system's hands at commit) but could drop the last commits on power loss; an
 *   office service writes a few times a second at most, so the extra sync per commit is cheap and
 *   the promise "nothing saved is ever lost" keeps.
 * - `foreign_keys = ON`: deleting a survey removes its uploads, pick sets, edits and revisions.
 * - `busy_timeout` = {@link BUSY_TIMEOUT_MS}: a second process that wants the write lock waits
 *   instead of failing at once.
 *
 * Migrations: every entry of {@link MIGRATIONS} not yet recorded in `schema_migrations` is applied
 * in its own transaction (see {@link applyMigrations}). A database that records a version newer
 * than the newest this code knows is refused with {@link SchemaTooNewError} and left untouched; the
 * connection is closed before the error is thrown.
 *
 * @example
 *   const db = openDatabase('data/slopebreak.sqlite');
 *   db.pragma('journal_mode', { simple: true }); // 'wal'
 */
export function openDatabase(file: string): Database {
  const db = new BetterSqlite3(file);
  try {
    const journalMode = db.pragma('journal_mode = WAL', { simple: true });
    if (journalMode !== 'wal') {
      throw new Error(
        `database ${file}: SQLite would not switch to WAL mode (it stays in ${String(journalMode)} mode); ` +
          'keep the database in a file on a local disk',
      );
    }
    db.pragma('synchronous = FULL');
    db.pragma('foreign_keys = ON');
    db.pragma(`busy_timeout = ${BUSY_TIMEOUT_MS}`);
    applyMigrations(db, MIGRATIONS, file);
    return db;
  } catch (error) {
    db.close();
    throw error;
  }
}

/**
 * Applies the migrations a database does not yet hold, oldest first, and returns the versions it
 * applied (empty when the schema was already current, so reopening is idempotent).
 *
 * Each migration runs in one `BEGIN IMMEDIATE` transaction together with its row in
 * `schema_migrations (version, name, applied_at)`: a migration that fails leaves neither its
 * tables nor its row behind, and two processes starting at once cannot both apply the same one
 * (the second waits for the lock, then sees it recorded). Throws {@link SchemaTooNewError} when the
 * database holds a version beyond the last of `migrations`, and a plain Error when `migrations` is
 * not numbered 1, 2, 3… (a programming error).
 */
export function applyMigrations(db: Database, migrations: readonly Migration[], file: string = db.name): number[] {
  migrations.forEach((migration, index) => {
    if (migration.version !== index + 1) {
      throw new Error(`migration "${migration.name}" is number ${migration.version} but stands at position ${index + 1}; number migrations 1, 2, 3… in order`);
    }
  });
  db.exec(`CREATE TABLE IF NOT EXISTS schema_migrations (
    version    INTEGER PRIMARY KEY,
    name       TEXT NOT NULL,
    applied_at TEXT NOT NULL
  ) STRICT`);
  const newestRecorded = db.prepare<[], number | null>('SELECT max(version) FROM schema_migrations').pluck();
  const knownVersion = migrations.length;
  const databaseVersion = newestRecorded.get() ?? 0;
  if (databaseVersion > knownVersion) throw new SchemaTooNewError(file, databaseVersion, knownVersion);

  const record = db.prepare<[number, string, string]>('INSERT INTO schema_migrations (version, name, applied_at) VALUES (?, ?, ?)');
  const applyOne = db.transaction((migration: Migration): boolean => {
    // Re-read inside the lock: another process may have applied it while we waited.
    if ((newestRecorded.get() ?? 0) >= migration.version) return false;
    db.exec(migration.sql);
    record.run(migration.version, migration.name, new Date().toISOString());
    return true;
  });
  const applied: number[] = [];
  for (const migration of migrations.slice(databaseVersion)) {
    if (applyOne.immediate(migration)) applied.push(migration.version);
  }
  return applied;
}
