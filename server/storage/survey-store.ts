/**
 * The survey store: every read and write the service makes on surveys and what they hold.
 */
import { createHash, randomUUID } from 'node:crypto';
import BetterSqlite3 from 'better-sqlite3';
import type { DisplayScale } from '../../lib/units.js';
import type { Database } from './database.js';
import { InvalidRecordError, NotFoundError, StaleVersionError } from './errors.js';

/** A survey as stored. Times are ISO 8601 UTC strings. */
export interface SurveyRecord {
  readonly id: string;
  readonly name: string;
  readonly description: string;
  readonly scale: DisplayScale;
  readonly createdAt: string;
  readonly updatedAt: string;
  /** Goes up by one on every write to the survey; writes name the version they were made against. */
  readonly version: number;
}

/** An upload's metadata (everything but the bytes). */
export interface UploadInfo {
  readonly id: string;
  readonly surveyId: string;
  /** The file name as the client gave it: text to show, never used as a path. */
  readonly fileName: string;
  readonly mediaType: string;
  readonly byteSize: number;
  /** SHA-256 of the bytes, 64 lower-case hex digits. */
  readonly sha256: string;
  readonly createdAt: string;
}

/** An upload with its bytes exactly as received. */
export interface UploadRecord extends UploadInfo {
  readonly bytes: Uint8Array;
}

export interface PickSetRecord {
  /** Row id: edits name the pick set they were made on by it. */
  readonly id: number;
  readonly surveyId: string;
  /** The upload it was parsed from; null if it came from somewhere else (an edit, say). */
  readonly uploadId: string | null;
  readonly pickSetJson: string;
  readonly createdAt: string;
}

export interface BranchEditRecord {
  readonly surveyId: string;
  /** 1, 2, 3… per survey, in the order the edits were made. */
  readonly sequence: number;
  /** The pick set that was current when the edits were made (null only if the survey had none). */
  readonly pickSetId: number | null;
  readonly editsJson: string;
  readonly createdAt: string;
}

/** A revision without its result body, as listed. */
export interface RevisionSummary {
  readonly surveyId: string;
  /** 1, 2, 3… per survey. */
  readonly number: number;
  readonly optionsJson: string;
  /** The survey version whose inputs the interpretation was computed from. */
  readonly surveyVersion: number;
  /**
   * The picks it was computed from, `<pick set id>:<last edit sequence on it>` (see `picksState`);
   * null for revisions stored before migration 3.
   */
  readonly picksState: string | null;
  readonly createdAt: string;
}

export interface RevisionRecord extends RevisionSummary {
  readonly resultJson: string;
}

export interface NewSurvey {
  readonly name: string;
  readonly description?: string;
  readonly scale: DisplayScale;
}

export interface SurveyChanges {
  readonly name?: string;
  readonly description?: string;
  /** Display units: engineering or crustal. */
  readonly scale?: DisplayScale;
}

export interface PickUpload {
  readonly fileName: string;
  readonly mediaType: string;
  readonly bytes: Uint8Array;
  readonly pickSetJson: string;
}

/** One shot of an uploaded gather file, as stored. */
export interface ShotGatherRecord {
  /** `<upload id>.<shot number>`. */
  readonly id: string;
  readonly surveyId: string;
  readonly uploadId: string;
  readonly shotNumber: number;
  readonly shot: string;
  /** The summary and automatic picks, as JSON (the routes' own shape). */
  readonly summaryJson: string;
  readonly createdAt: string;
}

/** Gather files uploaded together, their shots, and the pick set made from them (and any kept picks). */
export interface GatherUpload {
  readonly files: readonly {
    readonly fileName: string;
    readonly mediaType: string;
    readonly bytes: Uint8Array;
    readonly shots: readonly { readonly shotNumber: number; readonly shot: string; readonly summaryJson: string }[];
  }[];
  readonly pickSetJson: string;
}

export interface NewRevision {
  readonly optionsJson: string;
  readonly resultJson: string;
}

export interface StoreOptions {
  /** The clock for created/updated times; the wall clock unless a test fixes it. */
  readonly now?: () => Date;
}

export type SurveyStore = ReturnType<typeof createSurveyStore>;

interface SurveyRow {
  id: string;
  name: string;
  description: string;
  display_scale: DisplayScale;
  created_at: string;
  updated_at: string;
  version: number;
}

const surveyColumns = 'id, name, description, display_scale, created_at, updated_at, version';
const uploadInfoColumns =
  'id, survey_id AS surveyId, file_name AS fileName, media_type AS mediaType, byte_size AS byteSize, sha256, created_at AS createdAt';
const revisionSummaryColumns =
  'survey_id AS surveyId, number, options_json AS optionsJson, survey_version AS surveyVersion, picks_state AS picksState, created_at AS createdAt';

function surveyFromRow(row: SurveyRow): SurveyRecord {
  return {
    id: row.id,
    name: row.name,
    description: row.description,
    scale: row.display_scale,
    createdAt: row.created_at,
    updatedAt: row.updated_at,
    version: row.version,
  };
}

/** A view of the caller's bytes as a Buffer (no copy), the type better-sqlite3 binds as a BLOB. */
function asBuffer(bytes: Uint8Array): Buffer {
  return Buffer.from(bytes.buffer, bytes.byteOffset, bytes.byteLength);
}

/**
 * A CHECK constraint failure becomes an {@link InvalidRecordError} naming the constraint (the
 * schema gives each a readable name); any other error passes through unchanged.
 */
function translateConstraintFailure(error: unknown, surveyId: string | null): unknown {
  if (error instanceof BetterSqlite3.SqliteError && error.code === 'SQLITE_CONSTRAINT_CHECK') {
    return new InvalidRecordError(surveyId, error.message.replace(/^CHECK constraint failed: /, ''));
  }
  return error;
}

/**
 * The survey store over an open database (from `openDatabase`).
 *
 * Every method is synchronous. Every write runs in ONE `BEGIN IMMEDIATE` transaction, so it is
 * stored whole or not at all, and a second process waits for the lock instead of reading a stale
 * snapshot. Writes to an existing survey take `expectedVersion`, the version the caller read; the
 * write happens only if the survey is still at that version, and then raises it by one. Otherwise
 * it throws {@link StaleVersionError} carrying the current version — never a silent overwrite — or
 * {@link NotFoundError} when the survey does not exist. A value the schema refuses (an empty name,
 * text that is not JSON) throws {@link InvalidRecordError} and stores nothing.
 *
 * Adding a revision does NOT raise the survey's version: a revision is a result computed from the
 * survey's inputs at some version and records that version, so two interpretations of unchanged
 * inputs share it, and an edit made against version N is not refused merely because someone ran
 * an interpretation meanwhile.
 *
 * @example
 *   const store = createSurveyStore(openDatabase(file));
 *   const survey = store.createSurvey({ name: 'Quarry line 1', scale: 'engineering' });
 *   store.renameSurvey(survey.id, { name: 'Quarry line 1 (north)' }, survey.version); // version 2
 */
export function createSurveyStore(db: Database, options: StoreOptions = {}) {
  const now = (): string => (options.now ?? (() => new Date()))().toISOString();

  const selectSurvey = db.prepare<[string], SurveyRow>(`SELECT ${surveyColumns} FROM surveys WHERE id = ?`);
  const selectVersion = db.prepare<[string], number>('SELECT version FROM surveys WHERE id = ?').pluck();
  const bump = db.prepare<[string, string, number]>(
    'UPDATE surveys SET version = version + 1, updated_at = ? WHERE id = ? AND version = ?',
  );

  function requireSurvey(surveyId: string): SurveyRecord {
    const row = selectSurvey.get(surveyId);
    if (row === undefined) throw new NotFoundError('survey', surveyId);
    return surveyFromRow(row);
  }

  /** After a conditional statement changed nothing: say why (gone, or moved on). */
  function refuseConditionalWrite(surveyId: string, expectedVersion: number): never {
    const currentVersion = selectVersion.get(surveyId);
    if (currentVersion === undefined) throw new NotFoundError('survey', surveyId);
    throw new StaleVersionError(surveyId, expectedVersion, currentVersion);
  }

  /** Raises the version if it still is `expectedVersion`; returns the new version. */
  function claimVersion(surveyId: string, expectedVersion: number, updatedAt: string): number {
    if (bump.run(updatedAt, surveyId, expectedVersion).changes === 0) refuseConditionalWrite(surveyId, expectedVersion);
    return expectedVersion + 1;
  }

  /** Wraps `work` as an immediate transaction whose constraint failures name the survey. */
  function writeTransaction<Args extends [string, ...unknown[]], Result>(work: (...args: Args) => Result) {
    const transaction = db.transaction(work);
    return (...args: Args): Result => {
      try {
        return transaction.immediate(...args);
      } catch (error) {
        throw translateConstraintFailure(error, args[0]);
      }
    };
  }

  const insertSurvey = db.prepare<[string, string, string, string, string, string]>(
    `INSERT INTO surveys (id, name, description, display_scale, created_at, updated_at, version)
     VALUES (?, ?, ?, ?, ?, ?, 1)`,
  );
  const createOne = writeTransaction((id: string, survey: NewSurvey): SurveyRecord => {
    const createdAt = now();
    insertSurvey.run(id, survey.name, survey.description ?? '', survey.scale, createdAt, createdAt);
    return requireSurvey(id);
  });

  const selectSurveys = db.prepare<[string], SurveyRow>(
    `SELECT ${surveyColumns} FROM surveys WHERE instr(lower(name), lower(?)) > 0 ORDER BY created_at, id`,
  );

  const updateNaming = db.prepare<[string | null, string | null, string | null, string, string, number]>(
    `UPDATE surveys SET name = coalesce(?, name), description = coalesce(?, description), display_scale = coalesce(?, display_scale),
       version = version + 1, updated_at = ? WHERE id = ? AND version = ?`,
  );
  const renameOne = writeTransaction((surveyId: string, changes: SurveyChanges, expectedVersion: number): SurveyRecord => {
    const result = updateNaming.run(changes.name ?? null, changes.description ?? null, changes.scale ?? null, now(), surveyId, expectedVersion);
    if (result.changes === 0) refuseConditionalWrite(surveyId, expectedVersion);
    return requireSurvey(surveyId);
  });

  const deleteIfAt = db.prepare<[string, number]>('DELETE FROM surveys WHERE id = ? AND version = ?');
  const deleteOne = writeTransaction((surveyId: string, expectedVersion: number): void => {
    if (deleteIfAt.run(surveyId, expectedVersion).changes === 0) refuseConditionalWrite(surveyId, expectedVersion);
  });

  const insertUpload = db.prepare<[string, string, string, string, number, string, Buffer, string]>(
    `INSERT INTO uploads (id, survey_id, file_name, media_type, byte_size, sha256, bytes, created_at)
     VALUES (?, ?, ?, ?, ?, ?, ?, ?)`,
  );
  const insertPickSet = db.prepare<[string, string | null, string, string]>(
    'INSERT INTO pick_sets (survey_id, upload_id, pick_set_json, created_at) VALUES (?, ?, ?, ?)',
  );
  const addUpload = writeTransaction(
    (surveyId: string, upload: PickUpload, expectedVersion: number): { upload: UploadInfo; version: number } => {
      const createdAt = now();
      const version = claimVersion(surveyId, expectedVersion, createdAt);
      const info: UploadInfo = {
        id: randomUUID(),
        surveyId,
        fileName: upload.fileName,
        mediaType: upload.mediaType,
        byteSize: upload.bytes.byteLength,
        sha256: createHash('sha256').update(upload.bytes).digest('hex'),
        createdAt,
      };
      insertUpload.run(info.id, surveyId, info.fileName, info.mediaType, info.byteSize, info.sha256, asBuffer(upload.bytes), createdAt);
      insertPickSet.run(surveyId, info.id, upload.pickSetJson, createdAt);
      return { upload: info, version };
    },
  );

  const deleteGatherOfShot = db.prepare<[string, string]>('DELETE FROM shot_gathers WHERE survey_id = ? AND shot = ?');
  const insertGather = db.prepare<[string, string, string, number, string, string, string]>(
    `INSERT INTO shot_gathers (id, survey_id, upload_id, shot_number, shot, summary_json, created_at) VALUES (?, ?, ?, ?, ?, ?, ?)`,
  );
  const addGathers = writeTransaction(
    (surveyId: string, upload: GatherUpload, expectedVersion: number): { uploads: UploadInfo[]; gathers: ShotGatherRecord[]; version: number } => {
      const createdAt = now();
      const version = claimVersion(surveyId, expectedVersion, createdAt);
      const uploads: UploadInfo[] = [];
      const gathers: ShotGatherRecord[] = [];
      for (const file of upload.files) {
        const info: UploadInfo = {
          id: randomUUID(), surveyId, fileName: file.fileName, mediaType: file.mediaType, byteSize: file.bytes.byteLength,
          sha256: createHash('sha256').update(file.bytes).digest('hex'), createdAt,
        };
        insertUpload.run(info.id, surveyId, info.fileName, info.mediaType, info.byteSize, info.sha256, asBuffer(file.bytes), createdAt);
        uploads.push(info);
        for (const shot of file.shots) {
          const gather: ShotGatherRecord = { id: `${info.id}.${shot.shotNumber}`, surveyId, uploadId: info.id, shotNumber: shot.shotNumber, shot: shot.shot, summaryJson: shot.summaryJson, createdAt };
          deleteGatherOfShot.run(surveyId, shot.shot);
          insertGather.run(gather.id, surveyId, gather.uploadId, gather.shotNumber, gather.shot, gather.summaryJson, createdAt);
          gathers.push(gather);
        }
      }
      // A pick set made from several files belongs to none of them.
      insertPickSet.run(surveyId, uploads.length === 1 ? uploads[0]!.id : null, upload.pickSetJson, createdAt);
      return { uploads, gathers, version };
    },
  );
  const addDerivedPickSet = writeTransaction((surveyId: string, pickSetJson: string, expectedVersion: number): { version: number } => {
    const createdAt = now();
    const version = claimVersion(surveyId, expectedVersion, createdAt);
    insertPickSet.run(surveyId, null, pickSetJson, createdAt);
    return { version };
  });
  const gatherColumns = 'id, survey_id AS surveyId, upload_id AS uploadId, shot_number AS shotNumber, shot, summary_json AS summaryJson, created_at AS createdAt';
  const selectGathers = db.prepare<[string], ShotGatherRecord>(`SELECT ${gatherColumns} FROM shot_gathers WHERE survey_id = ? ORDER BY rowid`);
  const selectGather = db.prepare<[string, string], ShotGatherRecord>(`SELECT ${gatherColumns} FROM shot_gathers WHERE survey_id = ? AND id = ?`);

  const selectCurrentPickSet = db.prepare<[string], PickSetRecord>(
    `SELECT id, survey_id AS surveyId, upload_id AS uploadId, pick_set_json AS pickSetJson, created_at AS createdAt
     FROM pick_sets WHERE survey_id = ? ORDER BY id DESC LIMIT 1`,
  );
  const selectUpload = db.prepare<[string, string], UploadInfo & { bytes: Buffer }>(
    `SELECT ${uploadInfoColumns}, bytes FROM uploads WHERE survey_id = ? AND id = ?`,
  );

  const nextEditSequence = db.prepare<[string], number>(
    'SELECT coalesce(max(sequence), 0) + 1 FROM branch_edits WHERE survey_id = ?',
  ).pluck();
  const insertEdit = db.prepare<[string, number, number | null, string, string]>(
    'INSERT INTO branch_edits (survey_id, sequence, pick_set_id, edits_json, created_at) VALUES (?, ?, ?, ?, ?)',
  );
  const addEdits = writeTransaction(
    (surveyId: string, editsJson: string, expectedVersion: number): { sequence: number; pickSetId: number | null; version: number } => {
      const createdAt = now();
      const version = claimVersion(surveyId, expectedVersion, createdAt);
      const sequence = nextEditSequence.get(surveyId) ?? 1;
      // Inside the transaction: the pick set the edit was made on cannot change under it.
      const pickSetId = selectCurrentPickSet.get(surveyId)?.id ?? null;
      insertEdit.run(surveyId, sequence, pickSetId, editsJson, createdAt);
      return { sequence, pickSetId, version };
    },
  );
  const selectEdits = db.prepare<[string], BranchEditRecord>(
    `SELECT survey_id AS surveyId, sequence, pick_set_id AS pickSetId, edits_json AS editsJson, created_at AS createdAt
     FROM branch_edits WHERE survey_id = ? ORDER BY sequence`,
  );

  const selectPicksState = db.prepare<[string], string>(
    `SELECT p.id || ':' || (SELECT coalesce(max(e.sequence), 0) FROM branch_edits e WHERE e.survey_id = p.survey_id AND e.pick_set_id = p.id)
     FROM pick_sets p WHERE p.survey_id = ? ORDER BY p.id DESC LIMIT 1`,
  ).pluck();

  const nextRevisionNumber = db.prepare<[string], number>(
    'SELECT coalesce(max(number), 0) + 1 FROM revisions WHERE survey_id = ?',
  ).pluck();
  const insertRevision = db.prepare<[string, number, string, string, number, string | null, string]>(
    `INSERT INTO revisions (survey_id, number, options_json, result_json, survey_version, picks_state, created_at)
     VALUES (?, ?, ?, ?, ?, ?, ?)`,
  );
  const addOneRevision = writeTransaction(
    (surveyId: string, revision: NewRevision, expectedVersion: number | undefined): RevisionSummary => {
      const surveyVersion = selectVersion.get(surveyId);
      if (surveyVersion === undefined) throw new NotFoundError('survey', surveyId);
      if (expectedVersion !== undefined && expectedVersion !== surveyVersion) {
        throw new StaleVersionError(surveyId, expectedVersion, surveyVersion);
      }
      const summary: RevisionSummary = {
        surveyId,
        number: nextRevisionNumber.get(surveyId) ?? 1,
        optionsJson: revision.optionsJson,
        surveyVersion,
        picksState: selectPicksState.get(surveyId) ?? null,
        createdAt: now(),
      };
      insertRevision.run(surveyId, summary.number, revision.optionsJson, revision.resultJson, surveyVersion, summary.picksState, summary.createdAt);
      return summary;
    },
  );
  const selectRevisions = db.prepare<[string], RevisionSummary>(
    `SELECT ${revisionSummaryColumns} FROM revisions WHERE survey_id = ? ORDER BY number`,
  );
  const selectRevision = db.prepare<[string, number], RevisionRecord>(
    `SELECT ${revisionSummaryColumns}, result_json AS resultJson FROM revisions WHERE survey_id = ? AND number = ?`,
  );

  return {
    /** Creates a survey at version 1 with a fresh random URL-safe id (a UUID). */
    createSurvey(survey: NewSurvey): SurveyRecord {
      const id = randomUUID();
      try {
        return createOne(id, survey);
      } catch (error) {
        // No survey exists yet, so the error must not name the id we made up.
        throw error instanceof InvalidRecordError ? new InvalidRecordError(null, error.constraint) : error;
      }
    },

    /**
     * Surveys in the order they were created; with `nameContains`, only those whose name holds
     * it (case-insensitive for ASCII letters, SQLite's `lower`). An empty string matches all.
     */
    listSurveys(filter: { nameContains?: string } = {}): SurveyRecord[] {
      return selectSurveys.all(filter.nameContains ?? '').map(surveyFromRow);
    },

    getSurvey(surveyId: string): SurveyRecord {
      return requireSurvey(surveyId);
    },

    /**
     * Changes the name and/or the description; a field left out keeps its value. Giving neither
     * is a programming error and throws before anything is written.
     */
    renameSurvey(surveyId: string, changes: SurveyChanges, expectedVersion: number): SurveyRecord {
      if (changes.name === undefined && changes.description === undefined && changes.scale === undefined) {
        throw new Error(`renameSurvey on survey ${surveyId}: give a new name, description or scale`);
      }
      return renameOne(surveyId, changes, expectedVersion);
    },

    /** Deletes the survey and, by cascade, its uploads, pick sets, branch edits and revisions. */
    deleteSurvey(surveyId: string, expectedVersion: number): void {
      deleteOne(surveyId, expectedVersion);
    },

    /**
     * Stores an uploaded file byte for byte with its SHA-256, and the pick set parsed from it as
     * the survey's current one. The file name is kept as text only. Returns the upload's metadata
     * and the survey's new version.
     */
    addPickUpload(surveyId: string, upload: PickUpload, expectedVersion: number): { upload: UploadInfo; version: number } {
      return addUpload(surveyId, upload, expectedVersion);
    },

    /**
     * Stores gather files byte for byte, one row per shot in them (replacing any older gather of
     * the same shot), and the pick set made from them as the survey's current one, in one
     * transaction. Returns the uploads, the gathers and the survey's new version.
     */
    addGatherUpload(surveyId: string, upload: GatherUpload, expectedVersion: number): { uploads: UploadInfo[]; gathers: ShotGatherRecord[]; version: number } {
      return addGathers(surveyId, upload, expectedVersion);
    },

    /** Stores a pick set made from the current one (hand edits of picks) as the survey's current one. */
    addPickSet(surveyId: string, pickSetJson: string, expectedVersion: number): { version: number } {
      return addDerivedPickSet(surveyId, pickSetJson, expectedVersion);
    },

    /** The survey's shot gathers in upload order. */
    listGathers(surveyId: string): ShotGatherRecord[] {
      requireSurvey(surveyId);
      return selectGathers.all(surveyId);
    },

    /** One shot gather of the survey; NotFoundError('gather') when it has none of that id. */
    getGather(surveyId: string, gatherId: string): ShotGatherRecord {
      requireSurvey(surveyId);
      const gather = selectGather.get(surveyId, gatherId);
      if (gather === undefined) throw new NotFoundError('gather', surveyId, gatherId);
      return gather;
    },

    /** The newest pick set; NotFoundError('pick set') when nothing was uploaded yet. */
    /**
     * Which picks are current: `<pick set id>:<last edit sequence on it>` (0 without edits), or null
     * when the survey has no pick set. Changes with every upload and every branch edit, and only
     * then; a revision stores the state it was computed from.
     */
    picksState(surveyId: string): string | null {
      requireSurvey(surveyId);
      return selectPicksState.get(surveyId) ?? null;
    },

    getCurrentPickSet(surveyId: string): PickSetRecord {
      requireSurvey(surveyId);
      const pickSet = selectCurrentPickSet.get(surveyId);
      if (pickSet === undefined) throw new NotFoundError('pick set', surveyId);
      return pickSet;
    },

    /** The upload with its bytes exactly as received; it must belong to this survey. */
    getUpload(surveyId: string, uploadId: string): UploadRecord {
      requireSurvey(surveyId);
      const upload = selectUpload.get(surveyId, uploadId);
      if (upload === undefined) throw new NotFoundError('upload', surveyId, uploadId);
      return upload;
    },

    /** Appends a set of branch assignments / pick edits as the next in sequence, tied to the current pick set. */
    addBranchEdits(surveyId: string, editsJson: string, expectedVersion: number): { sequence: number; pickSetId: number | null; version: number } {
      return addEdits(surveyId, editsJson, expectedVersion);
    },

    /** All branch edits of the survey, oldest first. */
    listBranchEdits(surveyId: string): BranchEditRecord[] {
      requireSurvey(surveyId);
      return selectEdits.all(surveyId);
    },

    /**
     * Stores an interpretation as the next revision (previous number + 1, decided inside the
     * transaction). With `expectedVersion`, refuses with StaleVersionError if the survey's inputs
     * changed since the interpretation was computed from that version.
     */
    addRevision(surveyId: string, revision: NewRevision, expectedVersion?: number): RevisionSummary {
      return addOneRevision(surveyId, revision, expectedVersion);
    },

    /** Revisions oldest first, without their result bodies. */
    listRevisions(surveyId: string): RevisionSummary[] {
      requireSurvey(surveyId);
      return selectRevisions.all(surveyId);
    },

    getRevision(surveyId: string, revisionNumber: number): RevisionRecord {
      requireSurvey(surveyId);
      const revision = selectRevision.get(surveyId, revisionNumber);
      if (revision === undefined) throw new NotFoundError('revision', surveyId, revisionNumber);
      return revision;
    },
  };
}
