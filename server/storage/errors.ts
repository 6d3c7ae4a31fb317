/**
 * The errors the storage layer throws. Each has a stable `code` the HTTP layer maps to a status
 * (not_found → 404, stale_version → 409, invalid_record → 422, schema_too_new and
 * backup_target_exists → 500 at start-up / in the operator's command), and a message that names
 * the survey, the likely cause and the fix.
 */

/** Common base, so callers can tell storage errors from bugs with one `instanceof`. */
export abstract class StorageError extends Error {
  abstract readonly code: string;
  constructor(message: string) {
    super(message);
    this.name = new.target.name;
  }
}

/** What a lookup was for. */
export type StoredThing = 'survey' | 'upload' | 'pick set' | 'revision' | 'gather';

/** The survey, or a thing inside it, does not exist (or was deleted). */
export class NotFoundError extends StorageError {
  readonly code = 'not_found';
  constructor(
    readonly thing: StoredThing,
    readonly surveyId: string,
    /** The upload id or revision number looked for; absent for the survey itself. */
    readonly key?: string | number,
  ) {
    super(
      thing === 'survey'
        ? `survey ${surveyId} does not exist; it may have been deleted — list the surveys to find its id`
        : thing === 'pick set'
          ? `survey ${surveyId} has no pick set yet; upload a pick table first`
          : `survey ${surveyId} has no ${thing} ${String(key)}; list the survey's ${thing}s to find one that exists`,
    );
  }
}

/** A write was made against a version of the survey that is no longer current. */
export class StaleVersionError extends StorageError {
  readonly code = 'stale_version';
  constructor(
    readonly surveyId: string,
    readonly expectedVersion: number,
    readonly currentVersion: number,
  ) {
    super(
      `survey ${surveyId} is at version ${currentVersion}, but this change was made against version ` +
        `${expectedVersion}; someone else changed it meanwhile — reload the survey and apply the change again`,
    );
  }
}

/** The database refused a value (a CHECK constraint named in `constraint`); nothing was written. */
export class InvalidRecordError extends StorageError {
  readonly code = 'invalid_record';
  constructor(
    readonly surveyId: string | null,
    readonly constraint: string,
  ) {
    super(
      `${surveyId === null ? 'new survey' : `survey ${surveyId}`}: ${constraint}; nothing was stored — correct the value and send it again`,
    );
  }
}

/** The database file was written by a newer slopebreak whose schema this code does not know. */
export class SchemaTooNewError extends StorageError {
  readonly code = 'schema_too_new';
  constructor(
    readonly file: string,
    readonly databaseVersion: number,
    readonly knownVersion: number,
  ) {
    super(
      `database ${file} has schema version ${databaseVersion}, but this slopebreak knows only up to ` +
        `${knownVersion}; it was written by a newer release — run that release, or restore a backup made by this one`,
    );
  }
}

/** A backup would have overwritten an existing file. */
export class BackupTargetExistsError extends StorageError {
  readonly code = 'backup_target_exists';
  constructor(readonly file: string) {
    super(`backup target ${file} already exists; a backup never overwrites a file — choose a new name or move the old one away`);
  }
}
