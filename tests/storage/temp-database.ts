/**
 * Real SQLite files in fresh temporary folders, closed and removed after each test. No mocks: the
 * storage tests run against the same better-sqlite3 build the service uses.
 */
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterEach } from 'vitest';
import { openDatabase, type Database } from '../../server/storage/database.js';

export interface TempDatabases {
  /** A new empty temporary folder. */
  folder(): string;
  /** A path for a database file in a new temporary folder (the file does not exist yet). */
  newFile(): string;
  /** `openDatabase(file)`, closed automatically after the test. */
  open(file: string): Database;
}

/** Call at the top of a test file. */
export function useTempDatabases(): TempDatabases {
  const folders: string[] = [];
  const connections: Database[] = [];
  afterEach(() => {
    for (const db of connections.splice(0)) if (db.open) db.close();
    for (const folder of folders.splice(0)) rmSync(folder, { recursive: true, force: true });
  });
  const folder = (): string => {
    const created = mkdtempSync(join(tmpdir(), 'slopebreak-storage-'));
    folders.push(created);
    return created;
  };
  return {
    folder,
    newFile: () => join(folder(), 'slopebreak.sqlite'),
    open(file) {
      const db = openDatabase(file);
      connections.push(db);
      return db;
    },
  };
}
