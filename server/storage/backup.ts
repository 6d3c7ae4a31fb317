/**
 * Online backup of the database to a new file.
 */
import { closeSync, openSync, rmSync } from 'node:fs';
import type { Database } from './database.js';
import { BackupTargetExistsError } from './errors.js';

/** Pages copied per step; between steps the event loop runs, so the service keeps answering. */
const PAGES_PER_STEP = 256;

/**
 * Copies the database behind `db` into `toFile` with SQLite's online backup API (through
 * better-sqlite3's `db.backup`), while other work goes on.
 *
 * The copy is consistent: it is one committed state of the database, never a mixture. A write
 * made through `db` itself during the backup is carried into the copy; a write from another
 * connection makes SQLite restart the copy at the next step, so under a steady stream of writes
 * from elsewhere the backup finishes once the stream pauses long enough for one full pass. The
 * result is a self-contained database file (no `-wal` file is needed to read it).
 *
 * Refuses to overwrite: `toFile` is created exclusively first, so an existing file — even one that
 * appears between a check and the copy — makes the promise reject with
 * {@link BackupTargetExistsError} and leaves that file untouched. If the copy itself fails, the
 * partial file is removed before the error is passed on.
 *
 * @example
 *   await backupDatabase(db, 'backups/slopebreak-2024-05-01.sqlite');
 */
export async function backupDatabase(db: Database, toFile: string): Promise<void> {
  try {
    closeSync(openSync(toFile, 'wx'));
  } catch (error) {
    if ((error as NodeJS.ErrnoException).code === 'EEXIST') throw new BackupTargetExistsError(toFile);
    throw error;
  }
  try {
    await db.backup(toFile, { progress: () => PAGES_PER_STEP });
  } catch (error) {
    rmSync(toFile, { force: true });
    throw error;
  }
}
