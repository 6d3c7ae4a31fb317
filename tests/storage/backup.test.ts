import { createHash } from 'node:crypto';
import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { backupDatabase } from '../../server/storage/backup.js';
import type { Database } from '../../server/storage/database.js';
import { BackupTargetExistsError } from '../../server/storage/errors.js';
import { createSurveyStore, type SurveyStore } from '../../server/storage/survey-store.js';
import { useTempDatabases } from './temp-database.js';

const temp = useTempDatabases();

/** 8 KiB per upload, so 200 surveys make a database of several hundred pages (several backup steps). */
const UPLOAD_BYTES = 8192;
const SURVEYS_BEFORE_BACKUP = 200;
/** Writes the second connection makes while the backup runs (each restarts the copy; bounded so it ends). */
const CONCURRENT_WRITES = 40;

/** A survey with one upload whose bytes depend on `serial`, so each copy can be checked against its hash. */
function addSurveyWithUpload(store: SurveyStore, serial: number): void {
  const survey = store.createSurvey({ name: `line ${serial}`, scale: 'engineering' });
  const bytes = new Uint8Array(UPLOAD_BYTES).map((_, index) => (index * 31 + serial) % 251);
  store.addPickUpload(survey.id, { fileName: `line-${serial}.csv`, mediaType: 'text/csv', bytes, pickSetJson: `{"serial":${serial}}` }, 1);
}

function count(db: Database, table: string): number {
  return db.prepare<[], number>(`SELECT count(*) FROM ${table}`).pluck().get() ?? -1;
}

describe('backupDatabase', () => {
  it('backupDatabase made while another connection writes opens cleanly and holds whole surveys only', async () => {
    const file = temp.newFile();
    const db = temp.open(file);
    const store = createSurveyStore(db);
    for (let serial = 0; serial < SURVEYS_BEFORE_BACKUP; serial++) addSurveyWithUpload(store, serial);

    const writer = createSurveyStore(temp.open(file));
    const backupFile = join(temp.folder(), 'copy.sqlite');
    let finished = false;
    let writesWhilePending = 0;
    const backup = backupDatabase(db, backupFile).finally(() => {
      finished = true;
    });
    await new Promise<void>((resolve) => {
      const writeOne = (): void => {
        if (finished || writesWhilePending === CONCURRENT_WRITES) return resolve();
        addSurveyWithUpload(writer, SURVEYS_BEFORE_BACKUP + writesWhilePending);
        writesWhilePending++;
        setImmediate(writeOne);
      };
      setImmediate(writeOne);
    });
    await backup;
    expect(writesWhilePending).toBeGreaterThan(0); // the backup really overlapped writes

    const copy = temp.open(backupFile);
    expect(copy.pragma('integrity_check', { simple: true })).toBe('ok');
    const surveys = count(copy, 'surveys');
    expect(surveys).toBeGreaterThanOrEqual(SURVEYS_BEFORE_BACKUP);
    expect(surveys).toBeLessThanOrEqual(SURVEYS_BEFORE_BACKUP + writesWhilePending);
    // Whole writes only: each survey in the copy has its upload and its pick set, bytes intact.
    expect(count(copy, 'uploads')).toBe(surveys);
    expect(count(copy, 'pick_sets')).toBe(surveys);
    const copiedStore = createSurveyStore(copy);
    for (const survey of copiedStore.listSurveys()) {
      const pickSet = copiedStore.getCurrentPickSet(survey.id);
      const upload = copiedStore.getUpload(survey.id, pickSet.uploadId ?? '');
      expect(upload.sha256).toBe(createHash('sha256').update(upload.bytes).digest('hex'));
    }
    // The source has every write, and keeps working after the backup.
    expect(count(db, 'surveys')).toBe(SURVEYS_BEFORE_BACKUP + writesWhilePending);
  });

  it('backupDatabase refuses to overwrite an existing file and leaves it untouched', async () => {
    const db = temp.open(temp.newFile());
    createSurveyStore(db).createSurvey({ name: 'line', scale: 'engineering' });
    const target = join(temp.folder(), 'existing.sqlite');
    writeFileSync(target, 'an older backup');
    await expect(backupDatabase(db, target)).rejects.toBeInstanceOf(BackupTargetExistsError);
    expect(readFileSync(target, 'utf8')).toBe('an older backup');
  });

  it('backupDatabase into a folder that does not exist rejects and creates nothing', async () => {
    const db = temp.open(temp.newFile());
    await expect(backupDatabase(db, join(temp.folder(), 'missing', 'copy.sqlite'))).rejects.toThrow(/ENOENT/);
  });
});
