/**
 * Pieces every route uses: the id patterns (checked before a value reaches the store), the version
 * precondition (If-Match or a body `version`), the ETag and CSV replies.
 */
import type { Request, Response } from 'express';
import * as z from 'zod';
import type { Problem } from '../../lib/problems.js';
import { ApiError, parseRequest } from '../errors.js';

/** Store ids: letters, digits, dash and underscore, 1–64 characters (no dots or slashes, so never a path). */
export const StoredId = z.string().regex(/^[A-Za-z0-9_-]{1,64}$/, 'an id is 1 to 64 letters, digits, dashes or underscores');
/** Revision numbers: whole numbers from 1, written in decimal without leading zeros. */
export const RevisionNumber = z.string().regex(/^[1-9][0-9]{0,8}$/, 'a revision number is a whole number from 1').transform(Number);

export const SurveyParams = z.strictObject({ id: StoredId });
export const RevisionParams = z.strictObject({ id: StoredId, number: RevisionNumber });
export const UploadParams = z.strictObject({ id: StoredId, uploadId: StoredId });

export function surveyId(request: Request): string {
  return parseRequest(SurveyParams, request.params, 'params').id;
}

/** The ETag of a survey version: `"v3"`. */
export function versionTag(version: number): string {
  return `"v${version}"`;
}

/** One strong entity tag (RFC 9110 compares If-Match strongly, so a weak `W/` tag never matches). */
const IF_MATCH = /^"v([1-9][0-9]{0,8})"$/;

/**
 * The survey version a write was made against: from `If-Match: "v<n>"` or the body's `version`.
 * Refused with 428 when neither is given, 400 when the header is not a version tag or the two disagree.
 */
export function expectedVersion(request: Request, bodyVersion?: number): number {
  const header = request.get('if-match');
  let fromHeader: number | undefined;
  if (header !== undefined) {
    const match = IF_MATCH.exec(header.trim());
    if (match === null) {
      throw new ApiError({
        code: 'if-match-invalid', status: 400,
        message: `the If-Match header ${JSON.stringify(header)} is not one strong survey version tag (weak W/ tags, lists and * are not accepted)`,
        fix: 'send the one ETag the survey was read with, such as If-Match: "v3"',
      });
    }
    fromHeader = Number(match[1]);
  }
  if (fromHeader !== undefined && bodyVersion !== undefined && fromHeader !== bodyVersion) {
    throw new ApiError({
      code: 'version-conflicting', status: 400,
      message: `If-Match names version ${fromHeader} but the body's version is ${bodyVersion}`,
      fix: 'send one of them, or make them agree',
    });
  }
  const version = fromHeader ?? bodyVersion;
  if (version === undefined) {
    throw new ApiError({
      code: 'version-required', status: 428,
      message: 'this change must say which version of the survey it was made against, and it says none',
      fix: 'read the survey, then send its ETag as If-Match (e.g. If-Match: "v3") or its version as "version" in the body',
    });
  }
  return version;
}

/** A 422 carrying a reader's or editor's problem list. */
export function problemsError(code: string, what: string, problems: readonly Problem[]): ApiError {
  const first = problems[0];
  return new ApiError({
    code, status: 422,
    message: `${what} was refused with ${problems.length} problem${problems.length === 1 ? '' : 's'}${first ? `; the first: line ${first.line}: ${first.message}` : ''}; nothing was stored`,
    fix: first ? `${first.fix} (details.problems lists every problem with its line and column)` : 'correct the input and send it again',
    details: { problems },
  });
}

/** Send a CSV text as a download. `fileName` must already be safe (built by the server, never from a request). */
export function sendCsv(response: Response, fileName: string, csv: string): void {
  response.type('text/csv; charset=utf-8').attachment(fileName).send(csv);
}

/**
 * Refuses (413) an interpretation of more picks than `maxInterpretPicks`: one request runs on the
 * service's single event loop, so its size is bounded to keep the service answering colleagues.
 */
export function limitInterpretSize(pickCount: number, maxInterpretPicks: number): void {
  if (pickCount <= maxInterpretPicks) return;
  throw new ApiError({
    code: 'interpretation-too-large', status: 413,
    message: `the pick table holds ${pickCount} picks; this service interprets at most ${maxInterpretPicks} in one request; nothing was stored`,
    fix: 'interpret it with the command line (slopebreak interpret FILE), split it by shot, or ask the operator to raise maxInterpretPicks',
    details: { pickCount, maxInterpretPicks },
  });
}
