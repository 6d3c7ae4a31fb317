/**
 * The client's only way to the server: JSON requests with the service's error shape turned into
 * `ServiceError`, the survey version sent back as `If-Match`, the access token (when the operator
 * gave one) sent as a bearer header, and uploads with progress.
 */
import type {
  BranchEdit, CurrentPicks, GatherDisplay, GatherSummary, Interpretation, PickEdit, Revision, RevisionSummary, Scale, Survey, TableProblem, UploadReply,
} from './api-types.js';

/** An upload that has not finished after this long is given up, ms (a 50 MiB table over a slow office link). */
const UPLOAD_TIMEOUT_MS = 10 * 60_000;

/** Where the access token is kept in this browser (set from the token dialog). */
const TOKEN_KEY = 'slopebreak.accessToken';

/** A refusal by the service: its stable code, message, fix and details, and the HTTP status. */
export class ServiceError extends Error {
  constructor(
    readonly status: number,
    readonly code: string,
    message: string,
    readonly fix: string,
    readonly details: Record<string, unknown>,
  ) {
    super(message);
    this.name = 'ServiceError';
  }

  /** The reader's problems, when a pick table was refused (422). */
  get problems(): readonly TableProblem[] {
    const problems = this.details['problems'];
    return Array.isArray(problems) ? (problems as TableProblem[]) : [];
  }

  /** True when the token is missing or wrong (the token dialog can fix it). */
  get needsToken(): boolean {
    return this.status === 401 || (this.status === 403 && this.code.startsWith('token'));
  }
}

export function storedToken(): string | null {
  try {
    return localStorage.getItem(TOKEN_KEY);
  } catch {
    return null;
  }
}

export function storeToken(token: string | null): void {
  if (token === null || token.trim() === '') localStorage.removeItem(TOKEN_KEY);
  else localStorage.setItem(TOKEN_KEY, token.trim());
}

function headers(extra: Record<string, string> = {}): Record<string, string> {
  const token = storedToken();
  return { Accept: 'application/json', ...(token ? { Authorization: `Bearer ${token}` } : {}), ...extra };
}

async function errorFrom(response: Response): Promise<ServiceError> {
  const text = await response.text();
  try {
    const body = JSON.parse(text) as { error?: { code?: string; message?: string; fix?: string; details?: Record<string, unknown> } };
    const error = body.error ?? {};
    return new ServiceError(response.status, error.code ?? 'unknown', error.message ?? `the service answered ${response.status}`, error.fix ?? 'try again', error.details ?? {});
  } catch {
    return new ServiceError(response.status, 'not-json', `the service answered ${response.status} ${response.statusText}`, 'check that the server is running and try again', {});
  }
}

async function request<T>(method: string, path: string, options: { body?: unknown; version?: number } = {}): Promise<T> {
  let response: Response;
  try {
    response = await fetch(path, {
      method,
      headers: headers({
        ...(options.body !== undefined ? { 'Content-Type': 'application/json' } : {}),
        ...(options.version !== undefined ? { 'If-Match': `"v${options.version}"` } : {}),
      }),
      ...(options.body !== undefined ? { body: JSON.stringify(options.body) } : {}),
    });
  } catch {
    throw new ServiceError(0, 'unreachable', 'the server did not answer', 'check that the slopebreak service is running and that this machine can reach it', {});
  }
  if (!response.ok) throw await errorFrom(response);
  if (response.status === 204) return undefined as T;
  return (await response.json()) as T;
}

const survey = (id: string) => `/api/surveys/${id}`;

export const api = {
  listSurveys: (name = '') => request<{ surveys: Survey[] }>('GET', `/api/surveys${name ? `?name=${encodeURIComponent(name)}` : ''}`).then((reply) => reply.surveys),
  getSurvey: (id: string) => request<Survey>('GET', survey(id)),
  createSurvey: (name: string, scale?: Scale) => request<Survey>('POST', '/api/surveys', { body: { name, ...(scale ? { scale } : {}) } }),
  updateSurvey: (id: string, changes: { name?: string; scale?: Scale }, version: number) => request<Survey>('PATCH', survey(id), { body: changes, version }),
  deleteSurvey: (id: string, version: number) => request<void>('DELETE', survey(id), { version }),
  listRevisions: (id: string) => request<{ revisions: RevisionSummary[] }>('GET', `${survey(id)}/revisions`).then((reply) => reply.revisions),
  getRevision: (id: string, number: number) => request<Revision>('GET', `${survey(id)}/revisions/${number}`),
  currentPicks: (id: string) => request<CurrentPicks>('GET', `${survey(id)}/picks`),
  addBranchEdits: (id: string, edits: readonly BranchEdit[], version: number) =>
    request<{ version: number }>('POST', `${survey(id)}/branch-edits`, { body: { edits }, version }),
  /** Interpret the current picks as a new revision, with `options` (those of the revision being edited, to keep its scale and fit). */
  interpret: (id: string, version: number, options: Readonly<Record<string, unknown>> = {}) =>
    request<Revision & { result: Interpretation }>('POST', `${survey(id)}/interpretations`, { body: options, version }),
  /** The shot gathers stored with a survey (none for a survey made from a pick table). */
  listGathers: (id: string) => request<{ gathers: GatherSummary[] }>('GET', `${survey(id)}/gathers`).then((reply) => reply.gathers),
  getGather: (id: string, gatherId: string) => request<GatherDisplay>('GET', `${survey(id)}/gathers/${encodeURIComponent(gatherId)}`),
  /** Hand edits of picks on the gathers: a new pick set for the survey (409 when `version` is stale). */
  addPickEdits: (id: string, edits: readonly PickEdit[], version: number) =>
    request<{ version: number; pickCount: number; picksState: string | null }>('POST', `${survey(id)}/pick-edits`, { body: { edits, version }, version }),
  layersCsvUrl: (id: string, number: number) => `${survey(id)}/revisions/${number}/layers.csv`,
  picksCsvUrl: (id: string) => `${survey(id)}/picks.csv`,
};

/**
 * Upload a pick table, or a set of shot-gather files, to a survey (multipart, one "file" field per
 * file, If-Match the survey version), reporting progress as a fraction 0–1. XMLHttpRequest,
 * because fetch reports no upload progress.
 */
export function uploadPicks(id: string, files: File | readonly File[], version: number, onProgress: (fraction: number) => void): Promise<UploadReply> {
  return new Promise((resolve, reject) => {
    const xhr = new XMLHttpRequest();
    xhr.open('POST', `${survey(id)}/picks`);
    for (const [name, value] of Object.entries(headers({ 'If-Match': `"v${version}"` }))) xhr.setRequestHeader(name, value);
    xhr.upload.addEventListener('progress', (event) => {
      if (event.lengthComputable) onProgress(event.loaded / event.total);
    });
    xhr.addEventListener('load', () => {
      if (xhr.status >= 200 && xhr.status < 300) {
        try {
          resolve(JSON.parse(xhr.responseText) as UploadReply);
        } catch {
          reject(new ServiceError(xhr.status, 'not-json', 'the server accepted the upload but its answer could not be read', 'reload the page to see whether the survey is there', {}));
        }
        return;
      }
      void errorFrom(new Response(xhr.responseText, { status: xhr.status, statusText: xhr.statusText })).then(reject);
    });
    const lost = (what: string) => () => reject(new ServiceError(0, 'unreachable', `the upload ${what}`, 'check the connection to the server and try again', {}));
    xhr.addEventListener('error', lost('did not reach the server'));
    xhr.addEventListener('abort', lost('was stopped'));
    xhr.addEventListener('timeout', lost('took too long'));
    xhr.timeout = UPLOAD_TIMEOUT_MS;
    const form = new FormData();
    for (const file of files instanceof File ? [files] : files) form.append('file', file, file.name);
    xhr.send(form);
  });
}

/**
 * Download a file the service makes (a CSV) under `fileName`. Fetched with the access token when
 * one is kept, so the download works on a server whose reads are locked too.
 */
export async function downloadFromService(path: string, fileName: string): Promise<void> {
  let response: Response;
  try {
    response = await fetch(path, { headers: headers({ Accept: 'text/csv, application/json' }) });
  } catch {
    throw new ServiceError(0, 'unreachable', 'the server did not answer', 'check that the slopebreak service is running and that this machine can reach it', {});
  }
  if (!response.ok) throw await errorFrom(response);
  const url = URL.createObjectURL(await response.blob());
  try {
    const link = document.createElement('a');
    link.href = url;
    link.download = fileName;
    document.body.append(link);
    link.click();
    link.remove();
  } finally {
    setTimeout(() => URL.revokeObjectURL(url), 10_000);
  }
}
