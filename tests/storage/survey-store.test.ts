import { createHash } from 'node:crypto';
import { describe, expect, it } from 'vitest';
import type { Database } from '../../server/storage/database.js';
import { InvalidRecordError, NotFoundError, StaleVersionError } from '../../server/storage/errors.js';
import { createSurveyStore, type PickUpload, type SurveyStore } from '../../server/storage/survey-store.js';
import { useTempDatabases } from './temp-database.js';

const temp = useTempDatabases();

/** A fixed clock that moves one second per reading, so created/updated times are checkable. */
function steppingClock(): () => Date {
  let tick = 0;
  return () => new Date(Date.UTC(2024, 0, 1, 0, 0, tick++));
}

function newStore(): { db: Database; store: SurveyStore; file: string } {
  const file = temp.newFile();
  const db = temp.open(file);
  return { db, store: createSurveyStore(db, { now: steppingClock() }), file };
}

/** Every byte value 0–255 twice, then a CR LF and a NUL: bytes a text round trip would mangle. */
const awkwardBytes = Uint8Array.from([...Array.from({ length: 512 }, (_, index) => index % 256), 0x0d, 0x0a, 0x00]);

function pickUpload(overrides: Partial<PickUpload> = {}): PickUpload {
  return {
    fileName: '../../etc/passwd picks.csv',
    mediaType: 'text/csv',
    bytes: new TextEncoder().encode('shot,source_x_m,receiver_x_m,time_ms\nS1,0,10,5\n'),
    pickSetJson: JSON.stringify({ shots: [{ id: 'S1', picks: 1 }] }),
    ...overrides,
  };
}

function rowCount(db: Database, table: string, surveyId: string): number {
  return db.prepare<[string], number>(`SELECT count(*) FROM ${table} WHERE survey_id = ?`).pluck().get(surveyId) ?? -1;
}

/** Runs `write` and returns the error it throws (failing the test if it does not throw). */
function thrownBy(write: () => unknown): unknown {
  try {
    write();
  } catch (error) {
    return error;
  }
  throw new Error('expected the write to throw, it returned');
}

describe('createSurveyStore: surveys', () => {
  it('createSurvey stores a survey at version 1 with a random URL-safe id, and getSurvey reads it back', () => {
    const { store } = newStore();
    const created = store.createSurvey({ name: 'Quarry line 1', scale: 'engineering' });
    const other = store.createSurvey({ name: 'Quarry line 2', description: 'north bench', scale: 'crustal' });
    expect(created.id).toMatch(/^[0-9a-f]{8}-[0-9a-f]{4}-4[0-9a-f]{3}-[89ab][0-9a-f]{3}-[0-9a-f]{12}$/);
    expect(other.id).not.toBe(created.id);
    expect(created).toMatchObject({ name: 'Quarry line 1', description: '', scale: 'engineering', version: 1 });
    expect(created.updatedAt).toBe(created.createdAt);
    expect(store.getSurvey(other.id)).toEqual(other);
  });

  it('createSurvey refuses an empty name and an unknown scale with InvalidRecordError, storing nothing', () => {
    const { store } = newStore();
    const emptyName = thrownBy(() => store.createSurvey({ name: '   ', scale: 'engineering' }));
    expect(emptyName).toBeInstanceOf(InvalidRecordError);
    expect((emptyName as Error).message).toMatch(/^new survey: survey name must be 1 to 200 characters/);
    const badScale = { name: 'x', scale: 'planetary' } as unknown as Parameters<SurveyStore['createSurvey']>[0];
    expect((thrownBy(() => store.createSurvey(badScale)) as Error).message).toContain('display scale must be engineering or crustal');
    expect(store.listSurveys()).toEqual([]);
  });

  it('listSurveys returns surveys in creation order and filters by a case-insensitive name fragment', () => {
    const { store } = newStore();
    const names = ['Quarry north', 'Landfill cap', 'quarry SOUTH'];
    for (const name of names) store.createSurvey({ name, scale: 'engineering' });
    expect(store.listSurveys().map((survey) => survey.name)).toEqual(names);
    expect(store.listSurveys({ nameContains: 'QUARRY' }).map((survey) => survey.name)).toEqual(['Quarry north', 'quarry SOUTH']);
    expect(store.listSurveys({ nameContains: '%' })).toEqual([]); // not a LIKE wildcard
  });

  it('renameSurvey changes only the fields given, raises the version by one and moves updatedAt', () => {
    const { store } = newStore();
    const created = store.createSurvey({ name: 'Line A', description: 'first pass', scale: 'engineering' });
    const renamed = store.renameSurvey(created.id, { name: 'Line A (north)' }, created.version);
    expect(renamed).toMatchObject({ name: 'Line A (north)', description: 'first pass', version: 2, createdAt: created.createdAt });
    expect(renamed.updatedAt > created.updatedAt).toBe(true);
    const described = store.renameSurvey(created.id, { description: '' }, renamed.version);
    expect(described).toMatchObject({ name: 'Line A (north)', description: '', version: 3 });
    expect(() => store.renameSurvey(created.id, {}, described.version)).toThrow(/give a new name, description or scale/);
  });

  it('renameSurvey against an old version throws StaleVersionError with the current version and changes nothing', () => {
    const { store } = newStore();
    const created = store.createSurvey({ name: 'Line A', scale: 'engineering' });
    store.renameSurvey(created.id, { name: 'first writer' }, 1);
    const stale = thrownBy(() => store.renameSurvey(created.id, { name: 'second writer' }, 1));
    expect(stale).toBeInstanceOf(StaleVersionError);
    expect((stale as Error).name).toBe('StaleVersionError');
    expect(stale).toMatchObject({ surveyId: created.id, expectedVersion: 1, currentVersion: 2 });
    expect((stale as Error).message).toContain(`survey ${created.id} is at version 2`);
    expect(store.getSurvey(created.id)).toMatchObject({ name: 'first writer', version: 2 });
  });

  it('renameSurvey to an empty name throws InvalidRecordError naming the survey, version unchanged', () => {
    const { store } = newStore();
    const created = store.createSurvey({ name: 'Line A', scale: 'engineering' });
    const refused = thrownBy(() => store.renameSurvey(created.id, { name: '' }, 1));
    expect(refused).toBeInstanceOf(InvalidRecordError);
    expect((refused as Error).message).toContain(`survey ${created.id}: survey name must be 1 to 200 characters`);
    expect(store.getSurvey(created.id).version).toBe(1);
  });

  it('every method on a missing survey throws NotFoundError naming the survey', () => {
    const { store } = newStore();
    const missing = 'no-such-survey';
    const calls: Array<() => unknown> = [
      () => store.getSurvey(missing),
      () => store.renameSurvey(missing, { name: 'x' }, 1),
      () => store.deleteSurvey(missing, 1),
      () => store.addPickUpload(missing, pickUpload(), 1),
      () => store.getCurrentPickSet(missing),
      () => store.getUpload(missing, 'u'),
      () => store.addBranchEdits(missing, '[]', 1),
      () => store.listBranchEdits(missing),
      () => store.addRevision(missing, { optionsJson: '{}', resultJson: '{}' }),
      () => store.listRevisions(missing),
      () => store.getRevision(missing, 1),
    ];
    for (const call of calls) {
      const error = thrownBy(call);
      expect(error).toBeInstanceOf(NotFoundError);
      expect(error).toMatchObject({ thing: 'survey', surveyId: missing, code: 'not_found' });
      expect((error as Error).message).toContain(`survey ${missing} does not exist`);
    }
  });

  it('deleteSurvey with a stale version deletes nothing; with the current version it cascades to uploads, pick sets, edits and revisions', () => {
    const { db, store } = newStore();
    const kept = store.createSurvey({ name: 'kept', scale: 'engineering' });
    store.addPickUpload(kept.id, pickUpload(), 1);
    const doomed = store.createSurvey({ name: 'doomed', scale: 'engineering' });
    store.addPickUpload(doomed.id, pickUpload(), 1);
    store.addBranchEdits(doomed.id, '[{"pick":3,"branch":2}]', 2);
    store.addRevision(doomed.id, { optionsJson: '{}', resultJson: '{"layers":[]}' });
    const tables = ['uploads', 'pick_sets', 'branch_edits', 'revisions'];
    expect(tables.map((table) => rowCount(db, table, doomed.id))).toEqual([1, 1, 1, 1]);

    expect(thrownBy(() => store.deleteSurvey(doomed.id, 1))).toMatchObject({ currentVersion: 3 });
    expect(store.getSurvey(doomed.id).name).toBe('doomed');

    store.deleteSurvey(doomed.id, 3);
    expect(thrownBy(() => store.getSurvey(doomed.id))).toBeInstanceOf(NotFoundError);
    expect(tables.map((table) => rowCount(db, table, doomed.id))).toEqual([0, 0, 0, 0]);
    expect(tables.map((table) => rowCount(db, table, kept.id))).toEqual([1, 1, 0, 0]);
  });
});

describe('createSurveyStore: uploads and pick sets', () => {
  it('addPickUpload keeps the bytes byte for byte and their SHA-256 equals node:crypto of the input', () => {
    const { store } = newStore();
    const survey = store.createSurvey({ name: 'Line A', scale: 'engineering' });
    // A view into the middle of a larger buffer: only the viewed bytes must be stored.
    const backing = new Uint8Array(awkwardBytes.length + 20).fill(0xee);
    backing.set(awkwardBytes, 10);
    const view = backing.subarray(10, 10 + awkwardBytes.length);
    const { upload, version } = store.addPickUpload(survey.id, pickUpload({ bytes: view, mediaType: 'application/octet-stream' }), 1);
    expect(version).toBe(2);
    expect(store.getSurvey(survey.id).version).toBe(2);

    const stored = store.getUpload(survey.id, upload.id);
    expect(Buffer.from(stored.bytes).equals(Buffer.from(awkwardBytes))).toBe(true);
    expect(stored.byteSize).toBe(awkwardBytes.length);
    expect(stored.sha256).toBe(createHash('sha256').update(awkwardBytes).digest('hex'));
    expect(stored).toMatchObject({ fileName: '../../etc/passwd picks.csv', mediaType: 'application/octet-stream', surveyId: survey.id });
  });

  it('addPickUpload stores the FIPS 180-2 SHA-256 of "abc" (value checked with Python hashlib)', () => {
    // FIPS 180-2 appendix B.1 test vector, recalled from memory and confirmed with
    // python3 -c "import hashlib;print(hashlib.sha256(b'abc').hexdigest())" (Python's hashlib as the reference).
    const fipsAbc = 'ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad';
    const { store } = newStore();
    const survey = store.createSurvey({ name: 'vector', scale: 'engineering' });
    const { upload } = store.addPickUpload(survey.id, pickUpload({ bytes: new TextEncoder().encode('abc') }), 1);
    expect(upload.sha256).toBe(fipsAbc);
    expect(store.getUpload(survey.id, upload.id).sha256).toBe(fipsAbc);
  });

  it('addPickUpload makes the newest pick set current; getCurrentPickSet before any upload throws NotFoundError', () => {
    const { store } = newStore();
    const survey = store.createSurvey({ name: 'Line A', scale: 'engineering' });
    expect(thrownBy(() => store.getCurrentPickSet(survey.id))).toMatchObject({ thing: 'pick set', message: expect.stringContaining('upload a pick table first') });
    store.addPickUpload(survey.id, pickUpload({ pickSetJson: '{"first":true}' }), 1);
    const second = store.addPickUpload(survey.id, pickUpload({ pickSetJson: '{"second":true}' }), 2);
    expect(store.getCurrentPickSet(survey.id)).toMatchObject({ pickSetJson: '{"second":true}', uploadId: second.upload.id });
  });

  it('addPickUpload that fails after the upload insert (pick set not JSON) leaves no upload, no pick set and the old version', () => {
    const { db, store } = newStore();
    const survey = store.createSurvey({ name: 'Line A', scale: 'engineering' });
    const refused = thrownBy(() => store.addPickUpload(survey.id, pickUpload({ pickSetJson: '{"shots": [' }), 1));
    expect(refused).toBeInstanceOf(InvalidRecordError);
    expect((refused as Error).message).toContain(`survey ${survey.id}: pick set must be valid JSON`);
    expect(rowCount(db, 'uploads', survey.id)).toBe(0);
    expect(rowCount(db, 'pick_sets', survey.id)).toBe(0);
    expect(store.getSurvey(survey.id)).toEqual(survey);
  });

  it('addPickUpload against a stale version throws StaleVersionError and stores no bytes', () => {
    const { db, store } = newStore();
    const survey = store.createSurvey({ name: 'Line A', scale: 'engineering' });
    store.addPickUpload(survey.id, pickUpload(), 1);
    expect(thrownBy(() => store.addPickUpload(survey.id, pickUpload(), 1))).toMatchObject({ code: 'stale_version', currentVersion: 2 });
    expect(rowCount(db, 'uploads', survey.id)).toBe(1);
  });

  it('getUpload of an upload that belongs to another survey throws NotFoundError naming survey and upload', () => {
    const { store } = newStore();
    const first = store.createSurvey({ name: 'first', scale: 'engineering' });
    const second = store.createSurvey({ name: 'second', scale: 'engineering' });
    const { upload } = store.addPickUpload(first.id, pickUpload(), 1);
    const error = thrownBy(() => store.getUpload(second.id, upload.id));
    expect(error).toMatchObject({ thing: 'upload', surveyId: second.id, key: upload.id });
    expect((error as Error).message).toContain(`survey ${second.id} has no upload ${upload.id}`);
  });
});

describe('createSurveyStore: branch edits and revisions', () => {
  it('addBranchEdits numbers edits 1, 2, … raising the version; listBranchEdits returns them in order; stale edits are refused', () => {
    const { store } = newStore();
    const survey = store.createSurvey({ name: 'Line A', scale: 'engineering' });
    expect(store.addBranchEdits(survey.id, '[{"pick":1,"branch":1}]', 1)).toEqual({ sequence: 1, pickSetId: null, version: 2 });
    expect(store.addBranchEdits(survey.id, '[{"pick":7,"branch":2}]', 2)).toEqual({ sequence: 2, pickSetId: null, version: 3 });
    expect(thrownBy(() => store.addBranchEdits(survey.id, '[]', 2))).toMatchObject({ expectedVersion: 2, currentVersion: 3 });
    expect(thrownBy(() => store.addBranchEdits(survey.id, 'not json', 3))).toBeInstanceOf(InvalidRecordError);
    expect(store.listBranchEdits(survey.id).map((edit) => [edit.sequence, edit.editsJson])).toEqual([
      [1, '[{"pick":1,"branch":1}]'],
      [2, '[{"pick":7,"branch":2}]'],
    ]);
  });

  it('addBranchEdits ties each edit to the pick set current when it was made, even within one millisecond of a new upload', () => {
    const { db } = newStore();
    // A clock that never moves: the edit and the next upload share their creation time.
    const frozen = createSurveyStore(db, { now: () => new Date('2026-12-02T00:00:00.000Z') });
    const survey = frozen.createSurvey({ name: 'Line B', scale: 'engineering' });
    const first = frozen.addPickUpload(survey.id, pickUpload(), 1);
    const firstSet = frozen.getCurrentPickSet(survey.id);
    const edit = frozen.addBranchEdits(survey.id, '[{"pickIndex":0,"assign":"exclude"}]', first.version);
    expect(edit.pickSetId).toBe(firstSet.id);
    frozen.addPickUpload(survey.id, pickUpload(), edit.version);
    const secondSet = frozen.getCurrentPickSet(survey.id);
    expect(secondSet.id).not.toBe(firstSet.id);
    expect(frozen.listBranchEdits(survey.id).filter((entry) => entry.pickSetId === secondSet.id)).toEqual([]);
    expect(frozen.listBranchEdits(survey.id).map((entry) => entry.pickSetId)).toEqual([firstSet.id]);
  });

  it('addRevision records the survey version without raising it; listRevisions omits the result; getRevision returns it', () => {
    const { store } = newStore();
    const survey = store.createSurvey({ name: 'Line A', scale: 'engineering' });
    const first = store.addRevision(survey.id, { optionsJson: '{"robust":false}', resultJson: '{"layers":[1]}' }, 1);
    store.renameSurvey(survey.id, { name: 'Line A2' }, 1);
    const second = store.addRevision(survey.id, { optionsJson: '{"robust":true}', resultJson: '{"layers":[2]}' });
    expect([first.number, first.surveyVersion, second.number, second.surveyVersion]).toEqual([1, 1, 2, 2]);
    expect(store.getSurvey(survey.id).version).toBe(2);

    const listed = store.listRevisions(survey.id);
    expect(listed.map((revision) => revision.number)).toEqual([1, 2]);
    for (const revision of listed) expect(revision).not.toHaveProperty('resultJson');
    expect(store.getRevision(survey.id, 2)).toEqual({ ...second, resultJson: '{"layers":[2]}' });
  });

  it('addRevision computed from an old version throws StaleVersionError; getRevision of a missing number throws NotFoundError', () => {
    const { store } = newStore();
    const survey = store.createSurvey({ name: 'Line A', scale: 'engineering' });
    store.addBranchEdits(survey.id, '[]', 1);
    expect(thrownBy(() => store.addRevision(survey.id, { optionsJson: '{}', resultJson: '{}' }, 1))).toMatchObject({ currentVersion: 2 });
    expect(store.listRevisions(survey.id)).toEqual([]);
    expect(thrownBy(() => store.getRevision(survey.id, 1))).toMatchObject({ thing: 'revision', key: 1 });
    expect(thrownBy(() => store.addRevision(survey.id, { optionsJson: '{}', resultJson: '<html>' }))).toBeInstanceOf(InvalidRecordError);
  });

  it('addRevision numbers stay consecutive over 300 sequential writes alternating between two connections', () => {
    const { store, file } = newStore();
    const otherStore = createSurveyStore(temp.open(file));
    const survey = store.createSurvey({ name: 'busy', scale: 'engineering' });
    const writes = 300;
    const numbers: number[] = [];
    for (let index = 0; index < writes; index++) {
      const writer = index % 2 === 0 ? store : otherStore;
      numbers.push(writer.addRevision(survey.id, { optionsJson: `{"run":${index}}`, resultJson: '{}' }).number);
    }
    const expected = Array.from({ length: writes }, (_, index) => index + 1);
    expect(numbers).toEqual(expected);
    expect(store.listRevisions(survey.id).map((revision) => revision.number)).toEqual(expected);
  });
});
