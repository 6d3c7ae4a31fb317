/**
 * Uploads: a file arrives as one multipart field (`file`) or as the raw request body (text/csv), is
 * held in memory within the configured limits, and is recognised by its content, never by its name
 * or declared type. A registry of sniffers tries each known kind: a shot gather (any format of
 * lib/gathers/formats.ts: SEG-2, SEG-Y) or a pick table. An upload no sniffer accepts is refused
 * with 415 naming what each found. Nothing here touches the store, so a refused
 * upload leaves nothing behind.
 */
import express, { type Request, type RequestHandler } from 'express';
import multer from 'multer';
import { GATHER_SNIFF_BYTES, identifyGather } from '../lib/gathers/formats.js';
import { ApiError } from './errors.js';

/** An upload held in memory, before it is recognised. */
export interface ReceivedFile {
  /** The name the client gave (sanitised before it is ever shown or sent back). */
  readonly fileName: string;
  /** The media type the client declared (kept for the record, never trusted). */
  readonly declaredType: string;
  readonly bytes: Uint8Array;
}

/** A kind of upload the server can read. */
export type UploadKind = 'pick-table' | 'shot-gather';

export interface UploadKindInfo {
  readonly kind: UploadKind;
  /** Media type stored with the file and sent when it is downloaded. */
  readonly mediaType: string;
  /** The gather format, for a shot gather. */
  readonly format?: string;
}

/** A sniffer's answer: the kind, or the reason it is not this kind (in words, for the 415 message). */
export type SniffResult = { readonly ok: true; readonly info: UploadKindInfo } | { readonly ok: false; readonly reason: string };

export interface UploadSniffer {
  readonly kind: UploadKind;
  sniff(bytes: Uint8Array): SniffResult;
}

/** How many leading bytes the text checks look at (a header line is far shorter). */
const SNIFF_BYTES = 64 * 1024;

function leadingText(bytes: Uint8Array): { text: string } | { reason: string } {
  const head = bytes.subarray(0, SNIFF_BYTES);
  if (head.length === 0) return { reason: 'an empty file' };
  if (head.includes(0)) return { reason: 'binary data (a zero byte in the first 64 KiB)' };
  try {
    // A multi-byte character cut at the window's edge is not a fault: decode in streaming mode.
    return { text: new TextDecoder('utf-8', { fatal: true }).decode(head, { stream: head.length < bytes.length }) };
  } catch {
    return { reason: 'text that is not UTF-8' };
  }
}

/** Any of the separators a pick-table header might be written with; the reader explains a wrong one. */
const HEADER_SEPARATORS = /[,;\t]/;

/**
 * The pick-table sniffer: UTF-8 text whose first line that is neither blank nor a `#` comment has a
 * `shot` column (case-insensitive, quotes and spaces ignored). Semicolon- and tab-separated headers
 * pass here so that the reader can say which separator to use.
 */
export const pickTableSniffer: UploadSniffer = {
  kind: 'pick-table',
  sniff(bytes) {
    const decoded = leadingText(bytes);
    if ('reason' in decoded) return { ok: false, reason: decoded.reason };
    const text = decoded.text.replace(/^\uFEFF/, '');
    const header = text.split(/\r\n|\n|\r/).find((line) => line.trim() !== '' && !line.trimStart().startsWith('#'));
    if (header === undefined) return { ok: false, reason: 'text with only comments or blank lines' };
    const columns = header.split(HEADER_SEPARATORS).map((cell) => cell.trim().replace(/^"(.*)"$/, '$1').trim().toLowerCase());
    if (!columns.includes('shot')) {
      const shown = header.length > 80 ? `${header.slice(0, 80)}…` : header;
      return { ok: false, reason: `text whose first line ${JSON.stringify(shown)} has no shot column` };
    }
    return { ok: true, info: { kind: 'pick-table', mediaType: 'text/csv' } };
  },
};

/** The shot-gather sniffer: any format the gather registry recognises by its leading bytes. */
export const shotGatherSniffer: UploadSniffer = {
  kind: 'shot-gather',
  sniff(bytes) {
    const identity = identifyGather(bytes.subarray(0, GATHER_SNIFF_BYTES));
    if (!identity.ok) return { ok: false, reason: identity.reasons.join('; ') };
    return { ok: true, info: { kind: 'shot-gather', mediaType: identity.format.mediaType, format: identity.format.name } };
  },
};

/** Every sniffer, tried in order (binary formats first: their magic numbers are definite). */
export const UPLOAD_SNIFFERS: readonly UploadSniffer[] = [shotGatherSniffer, pickTableSniffer];

/** Recognise an upload, or throw the 415 naming what each sniffer found. */
export function recogniseUpload(file: ReceivedFile, accepted: readonly UploadKind[], sniffers: readonly UploadSniffer[] = UPLOAD_SNIFFERS): UploadKindInfo {
  const reasons: string[] = [];
  for (const sniffer of sniffers) {
    if (!accepted.includes(sniffer.kind)) continue;
    const result = sniffer.sniff(file.bytes);
    if (result.ok) return result.info;
    reasons.push(result.reason);
  }
  throw new ApiError({
    code: 'upload-type-unsupported', status: 415,
    message: `the upload ${JSON.stringify(sanitiseFileName(file.fileName))} is neither a shot gather nor a pick table: found ${reasons.join('; ') || 'nothing this server reads'}; nothing was stored`,
    fix: 'upload SEG-2 or SEG-Y shot gathers as the recorder wrote them, or a UTF-8 CSV pick table whose header row has a shot column (see the README)',
    details: { accepted, found: reasons },
  });
}

/** Media types accepted as a raw-body upload. */
const RAW_BODY_TYPES = ['text/csv', 'text/plain', 'application/octet-stream'];

export interface UploadSettings {
  readonly maxUploadBytes: number;
  readonly maxUploadRequestBytes: number;
  readonly maxFilesPerUpload: number;
}

/**
 * Middleware that puts the upload on `request.file` / `request.body`: multipart (memory storage,
 * size and count limits from config) or a raw body of one of `RAW_BODY_TYPES` (same size limit).
 * Build once per app; holds no state between requests.
 */
export function receiveUpload(settings: UploadSettings): RequestHandler[] {
  const multipart = multer({
    storage: multer.memoryStorage(),
    limits: { fileSize: settings.maxUploadBytes, files: settings.maxFilesPerUpload, fields: 10, fieldSize: 64 * 1024, parts: settings.maxFilesPerUpload + 10 },
  }).any();
  // multer passes the multipart parser's own errors (no boundary, truncated or garbled parts)
  // through as plain errors: they are the client's malformed upload, a 400, never a 500.
  const multipartOrFault: RequestHandler = (request, response, next) => {
    multipart(request, response, (error?: unknown) => {
      if (error === undefined || error === null || error instanceof multer.MulterError || error instanceof ApiError) {
        next(error as Error | undefined);
        return;
      }
      next(
        new ApiError({
          code: 'upload-malformed', status: 400,
          message: `the multipart upload could not be read (${error instanceof Error ? error.message : 'malformed'}); nothing was stored`,
          fix: 'send the file as multipart/form-data with a boundary and one field named "file", or as the body with Content-Type: text/csv',
        }),
      );
    });
  };
  const raw = express.raw({ type: RAW_BODY_TYPES, limit: settings.maxUploadBytes });
  // Files are held in memory: bound the request as a whole, not only each file, before reading it.
  const requestSize: RequestHandler = (request, _response, next) => {
    const declared = request.get('content-length');
    if (request.is('multipart/form-data') && declared === undefined) {
      next(new ApiError({
        code: 'upload-length-required', status: 411,
        message: 'a multipart upload must give its length (Content-Length); nothing was stored',
        fix: 'send the upload with a Content-Length header (browsers and curl -F do)',
      }));
      return;
    }
    if (declared !== undefined && Number(declared) > settings.maxUploadRequestBytes) {
      next(new ApiError({
        code: 'upload-request-too-large', status: 413,
        message: `the upload request is ${declared} bytes, more than this server accepts in one request (${settings.maxUploadRequestBytes} bytes); nothing was stored`,
        fix: 'send the files in several requests, or ask the operator to raise maxUploadRequestBytes',
        details: { limit: 'maxUploadRequestBytes', maxBytes: settings.maxUploadRequestBytes },
      }));
      return;
    }
    next();
  };
  return [requestSize, multipartOrFault, raw];
}

/** Name given to a raw-body upload that names nothing. */
const RAW_BODY_NAME = 'upload.csv';

/** The one file of an upload request (after `receiveUpload`), or a 400 saying how to send it. */
export function receivedFile(request: Request): ReceivedFile {
  const files = receivedFiles(request);
  if (files.length > 1) {
    throw new ApiError({
      code: 'upload-one-file', status: 400,
      message: `this endpoint takes one pick table per request, and the upload has ${files.length} files`,
      fix: 'send each file in its own request',
    });
  }
  return files[0]!;
}

/** Every file of an upload request (after `receiveUpload`; at least one), or a 400 saying how to send them. */
export function receivedFiles(request: Request): ReceivedFile[] {
  const files = Array.isArray(request.files) ? request.files : [];
  if (files.length > 0) return files.map((file) => ({ fileName: file.originalname, declaredType: file.mimetype, bytes: new Uint8Array(file.buffer) }));
  if (Buffer.isBuffer(request.body) && request.body.length > 0) {
    const named = request.get('x-file-name');
    return [{ fileName: named ?? RAW_BODY_NAME, declaredType: request.get('content-type') ?? '', bytes: new Uint8Array(request.body) }];
  }
  throw new ApiError({
    code: 'upload-missing', status: 400,
    message: 'the request carries no file: neither a multipart field nor a text/csv body',
    fix: 'send the pick table as multipart/form-data (field "file") or as the body with Content-Type: text/csv',
  });
}

/** Longest file name kept. */
const MAX_NAME_LENGTH = 120;

/**
 * A file name safe to show and to put in a Content-Disposition header: the last path segment only,
 * letters, digits, dot, dash, underscore and space kept, anything else replaced by `_`, no leading
 * dots, at most 120 characters; `upload` when nothing is left. Never used as a path.
 */
export function sanitiseFileName(name: string): string {
  const lastSegment = name.split(/[\\/]/).pop() ?? '';
  const cleaned = lastSegment
    .normalize('NFKC')
    .replace(/[^A-Za-z0-9._ -]/g, '_')
    .replace(/^[.\s]+/, '')
    .trim()
    .slice(0, MAX_NAME_LENGTH);
  return cleaned === '' || /^_+$/.test(cleaned) ? 'upload' : cleaned;
}
