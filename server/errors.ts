/**
 * The API's errors: one class for the errors routes raise on purpose, and one middleware that turns
 * every error — ours, the store's, the body parsers', multer's, zod's, and anything unexpected —
 * into the one JSON shape with the status that fits:
 *
 *   { "error": { "code": "survey-not-found", "message": "…", "fix": "…", "details": { … } } }
 *
 * `code` is stable (never renamed once released), `message` names the thing and the likely cause,
 * `fix` says what to do (its own field, always present, so a client can show it apart from the
 * message), `details` carries machine-readable facts (the field path, the limit, the current
 * version) and is `{}` when there are none. A 500 never carries a stack or the thrown message: it
 * is logged, and the body only says something went wrong on the server.
 */
import type { ErrorRequestHandler, RequestHandler } from 'express';
import multer from 'multer';
import * as z from 'zod';
import type { Logger } from './logging.js';
import { InvalidRecordError, NotFoundError, StaleVersionError } from './storage/errors.js';

export type ErrorDetails = Readonly<Record<string, unknown>>;

export interface ApiErrorFields {
  /** Stable machine code, kebab-case. */
  readonly code: string;
  /** HTTP status, 400–599. */
  readonly status: number;
  /** What is wrong: the thing, and the likely cause. */
  readonly message: string;
  /** What the caller should do about it. */
  readonly fix: string;
  readonly details?: ErrorDetails;
}

/** An error a route raises on purpose; the middleware sends it as it is. */
export class ApiError extends Error {
  readonly code: string;
  readonly status: number;
  readonly fix: string;
  readonly details: ErrorDetails;

  constructor(fields: ApiErrorFields) {
    super(fields.message);
    if (!(Number.isInteger(fields.status) && fields.status >= 400 && fields.status <= 599)) {
      throw new RangeError(`ApiError: status must be an HTTP error status 400–599, got ${fields.status} for ${fields.code}`);
    }
    this.name = 'ApiError';
    this.code = fields.code;
    this.status = fields.status;
    this.fix = fields.fix;
    this.details = fields.details ?? {};
  }
}

/** The JSON body of every error response. */
export interface ErrorBody {
  readonly error: { readonly code: string; readonly message: string; readonly fix: string; readonly details: ErrorDetails };
}

export function errorBody(error: ApiError): ErrorBody {
  return { error: { code: error.code, message: error.message, fix: error.fix, details: error.details } };
}

/** Where a request value came from; body faults are 422 (well-formed but unacceptable), the rest 400. */
export type RequestPart = 'body' | 'query' | 'params' | 'headers';

/** One zod issue as the API reports it: the field path in dotted form and the message. */
function issueList(error: z.ZodError): { path: string; message: string }[] {
  return error.issues.map((issue) => ({ path: issue.path.map(String).join('.'), message: issue.message }));
}

/** An ApiError for a value that failed its schema, naming every field at fault. */
export function validationError(error: z.ZodError, part: RequestPart): ApiError {
  const issues = issueList(error);
  const first = issues[0];
  const where = first && first.path !== '' ? `${part} field ${first.path}` : `the request ${part}`;
  const more = issues.length > 1 ? ` (and ${issues.length - 1} more problem${issues.length > 2 ? 's' : ''} in details.issues)` : '';
  return new ApiError({
    code: `invalid-${part === 'params' ? 'path' : part}`,
    status: part === 'body' ? 422 : 400,
    message: `${where}: ${first?.message ?? 'not valid'}${more}`,
    fix: 'correct the named fields and send the request again (the API reference lists each field)',
    details: { part, issues },
  });
}

/** Parse `value` with `schema`, or throw the ApiError naming the fields at fault. */
export function parseRequest<Schema extends z.ZodType>(schema: Schema, value: unknown, part: RequestPart): z.infer<Schema> {
  const parsed = schema.safeParse(value);
  if (!parsed.success) throw validationError(parsed.error, part);
  return parsed.data;
}

/** Readable byte counts for limits: "1 MiB", "50 MiB", "300 bytes". */
export function formatBytes(bytes: number): string {
  if (bytes >= 2 ** 20 && bytes % 2 ** 20 === 0) return `${bytes / 2 ** 20} MiB`;
  if (bytes >= 2 ** 10 && bytes % 2 ** 10 === 0) return `${bytes / 2 ** 10} KiB`;
  return `${bytes} bytes`;
}

/** Limits the multer error middleware names when one is exceeded. */
export interface UploadLimits {
  readonly maxUploadBytes: number;
  readonly maxFilesPerUpload: number;
}

function multerError(error: multer.MulterError, limits: UploadLimits): ApiError {
  switch (error.code) {
    case 'LIMIT_FILE_SIZE':
      return new ApiError({
        code: 'upload-too-large', status: 413,
        message: `the uploaded file is larger than this server accepts (${formatBytes(limits.maxUploadBytes)}); nothing was stored`,
        fix: 'split the survey into smaller files, or ask the operator to raise maxUploadBytes',
        details: { limit: 'maxUploadBytes', maxBytes: limits.maxUploadBytes },
      });
    case 'LIMIT_FILE_COUNT':
      return new ApiError({
        code: 'upload-too-many-files', status: 413,
        message: `the upload has more files than this server accepts in one request (${limits.maxFilesPerUpload}); nothing was stored`,
        fix: 'send the files in separate requests, or ask the operator to raise maxFilesPerUpload',
        details: { limit: 'maxFilesPerUpload', maxFiles: limits.maxFilesPerUpload },
      });
    case 'LIMIT_FIELD_KEY':
    case 'LIMIT_FIELD_VALUE':
    case 'LIMIT_FIELD_COUNT':
    case 'LIMIT_PART_COUNT':
      return new ApiError({
        code: 'upload-form-too-large', status: 413,
        message: `the multipart form exceeds a limit on its fields (${error.code}); nothing was stored`,
        fix: 'send only the file, in a field named "file"',
        details: { limit: error.code },
      });
    default:
      return new ApiError({
        code: 'upload-malformed', status: 400,
        message: `the multipart upload could not be read (${error.message}); nothing was stored`,
        fix: 'send the file as multipart/form-data in a field named "file", or as a text/csv body',
        details: { multerCode: error.code },
      });
  }
}

/** An error thrown by the body parsers (they mark it with `type` and `status`). */
interface BodyParserError {
  readonly type: string;
  readonly status: number;
  readonly limit?: number;
}

function isBodyParserError(error: unknown): error is BodyParserError {
  return typeof error === 'object' && error !== null && typeof (error as { type?: unknown }).type === 'string'
    && typeof (error as { status?: unknown }).status === 'number';
}

function bodyParserError(error: BodyParserError, limits: { readonly jsonBodyLimit: number }): ApiError | null {
  switch (error.type) {
    case 'entity.parse.failed':
      return new ApiError({
        code: 'body-not-json', status: 400,
        message: 'the request body is not valid JSON',
        fix: 'send a JSON document with Content-Type: application/json (check quotes, commas and brackets)',
      });
    case 'entity.too.large': {
      const limit = error.limit ?? limits.jsonBodyLimit;
      return new ApiError({
        code: 'body-too-large', status: 413,
        message: `the request body is larger than this server accepts (${formatBytes(limit)}); nothing was stored`,
        fix: 'send a smaller body, or upload large files as multipart/form-data',
        details: { maxBytes: limit },
      });
    }
    case 'encoding.unsupported':
    case 'charset.unsupported':
      return new ApiError({
        code: 'body-encoding-unsupported', status: 415,
        message: `the request body's encoding or character set is not supported (${error.type})`,
        fix: 'send the body as UTF-8 without content encoding',
      });
    case 'request.aborted':
      return new ApiError({ code: 'request-aborted', status: 400, message: 'the request was aborted before its body arrived', fix: 'send the request again' });
    default:
      return null;
  }
}

/** Turns an error from another layer (the store) into an ApiError, or returns null when it is not one of its errors. */
export type ErrorTranslator = (error: unknown) => ApiError | null;

/**
 * The store's errors: not found → 404, stale version → 409 with the current version in details,
 * a refused record → 422. Its start-up and backup errors are not request errors: they fall through
 * to the 500 (and the log).
 */
export const storageErrors: ErrorTranslator = (error) => {
  if (error instanceof NotFoundError) {
    return new ApiError({
      code: `${error.thing.replace(' ', '-')}-not-found`, status: 404, message: error.message,
      fix: error.thing === 'pick set' ? 'upload a pick table to the survey first' : 'list what exists and use one of its ids',
      details: { surveyId: error.surveyId, ...(error.key === undefined ? {} : { key: error.key }) },
    });
  }
  if (error instanceof StaleVersionError) {
    return new ApiError({
      code: 'version-stale', status: 409, message: error.message,
      fix: `reload the survey (it is at version ${error.currentVersion}) and send the change again with If-Match: "v${error.currentVersion}"`,
      details: { surveyId: error.surveyId, expectedVersion: error.expectedVersion, currentVersion: error.currentVersion },
    });
  }
  if (error instanceof InvalidRecordError) {
    return new ApiError({
      code: 'record-invalid', status: 422, message: error.message,
      fix: 'correct the value and send it again', details: { constraint: error.constraint },
    });
  }
  return null;
};

export interface ErrorMiddlewareOptions extends UploadLimits {
  readonly jsonBodyLimit: number;
  readonly logger: Logger;
  /** Translators tried in order before the built-in ones (the store's errors come after these). */
  readonly translators: readonly ErrorTranslator[];
}

/** Any error as an ApiError; unexpected ones become a bare 500 (the caller logs the original). */
export function toApiError(error: unknown, options: Omit<ErrorMiddlewareOptions, 'logger'>): ApiError | null {
  if (error instanceof ApiError) return error;
  for (const translate of [...options.translators, storageErrors]) {
    const translated = translate(error);
    if (translated) return translated;
  }
  if (error instanceof multer.MulterError) return multerError(error, options);
  if (error instanceof z.ZodError) return validationError(error, 'body');
  if (isBodyParserError(error)) {
    const translated = bodyParserError(error, options);
    if (translated) return translated;
  }
  return clientFault(error);
}

/**
 * Errors that the layers below Express (the router, body-parser) already marked as the client's
 * fault with a 4xx status but no type we translate: an undecodable percent-escape in the path
 * (`URIError`), a body whose Content-Encoding does not match its bytes. They are the client's
 * mistake, never a 500.
 */
function clientFault(error: unknown): ApiError | null {
  if (typeof error !== 'object' || error === null) return null;
  const status = (error as { status?: unknown; statusCode?: unknown }).status ?? (error as { statusCode?: unknown }).statusCode;
  if (typeof status !== 'number' || status < 400 || status > 499) return null;
  if (error instanceof URIError) {
    return new ApiError({
      code: 'path-not-decodable', status: 400,
      message: 'the request path holds a percent-escape that is not valid UTF-8',
      fix: 'percent-encode the path as UTF-8 (for example %20 for a space), or use the ids the API returned',
    });
  }
  const message = error instanceof Error ? error.message : '';
  if (/incorrect header check|unexpected end of file|invalid|zlib|decompress/i.test(message) || (error as { code?: unknown }).code === 'Z_DATA_ERROR') {
    return new ApiError({
      code: 'body-encoding-invalid', status: 400,
      message: 'the request body does not match its Content-Encoding (it could not be decompressed); nothing was stored',
      fix: 'send the body uncompressed, or compress it as the Content-Encoding header says',
    });
  }
  return new ApiError({
    code: 'request-malformed', status: 400,
    message: 'the request could not be read as sent; nothing was stored',
    fix: 'check the request line, headers and body against the API description at GET /api',
  });
}

const INTERNAL_ERROR = new ApiError({
  code: 'internal-error', status: 500,
  message: 'something went wrong on the server; the request may not have been completed',
  fix: 'try again; if it keeps failing, give the operator the time of the request (the server log has the cause)',
});

/** The one error middleware: every error becomes the JSON error body; 500s are logged with their stack. */
export function errorMiddleware(options: ErrorMiddlewareOptions): ErrorRequestHandler {
  return (error: unknown, request, response, next) => {
    if (response.headersSent) {
      next(error);
      return;
    }
    const apiError = toApiError(error, options);
    if (apiError === null) {
      options.logger.error('unexpected error', {
        method: request.method,
        path: request.path,
        error: error instanceof Error ? { name: error.name, message: error.message, stack: error.stack ?? null } : String(error),
      });
    }
    const sent = apiError ?? INTERNAL_ERROR;
    response.status(sent.status).json(errorBody(sent));
  };
}

/** The 404 for a route that does not exist (mounted after every route). */
export const unknownRoute: RequestHandler = (request, _response, next) => {
  next(new ApiError({
    code: 'route-not-found', status: 404,
    message: `there is no ${request.method} ${request.path} in this API`,
    fix: 'check the path and method; GET /api/health answers when the server is up',
    details: { method: request.method, path: request.path },
  }));
};
