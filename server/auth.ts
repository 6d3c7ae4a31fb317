/**
 * Access control. Reads are open to the office network; writes need the access token
 * (`Authorization: Bearer <token>`) unless the request comes from a trusted address (this machine by
 * default). With `lockReads`, reads need it too. `POST /api/interpret` counts as a read: it stores
 * nothing.
 *
 * Statuses: 401 when the token is needed and the header is absent or not of the form
 * `Bearer <token>`; 403 when a token is sent but is not the server's (or the server has none, so no
 * token can open writes from elsewhere). The comparison takes the same time whatever the token.
 * The remote address is the socket's own: forwarded-for headers are not believed.
 */
import { createHash, timingSafeEqual } from 'node:crypto';
import type { Request, RequestHandler } from 'express';
import { ApiError } from './errors.js';

export interface AccessSettings {
  readonly accessToken?: string | undefined;
  readonly lockReads: boolean;
  readonly trustedAddresses: readonly string[];
}

const WRITE_METHODS: ReadonlySet<string> = new Set(['POST', 'PUT', 'PATCH', 'DELETE']);
/** Writes by method that store nothing, so they are treated as reads. */
const STATELESS_WRITES: ReadonlySet<string> = new Set(['POST /api/interpret']);

/** True when the request changes stored state. */
export function isWrite(request: Pick<Request, 'method' | 'path'>): boolean {
  return WRITE_METHODS.has(request.method) && !STATELESS_WRITES.has(`${request.method} ${request.path}`);
}

/** Same-time comparison of two tokens of any lengths (both are hashed to 32 bytes first). */
export function tokensMatch(sent: string, expected: string): boolean {
  const digest = (text: string) => createHash('sha256').update(text, 'utf8').digest();
  return timingSafeEqual(digest(sent), digest(expected));
}

const BEARER = /^Bearer ([\x21-\x7e]+)$/;

/** The outcome of the access check, as a value (the middleware turns a refusal into an ApiError). */
export type AccessDecision = { readonly allowed: true } | { readonly allowed: false; readonly error: ApiError };

export function decideAccess(
  request: { readonly method: string; readonly path: string; readonly remoteAddress: string | undefined; readonly authorization: string | undefined },
  settings: AccessSettings,
): AccessDecision {
  const write = isWrite(request);
  if (!write && !settings.lockReads) return { allowed: true };
  if (request.remoteAddress !== undefined && settings.trustedAddresses.includes(request.remoteAddress)) return { allowed: true };
  const action = write ? 'changing stored surveys' : 'reading surveys on this server';
  if (request.authorization === undefined) {
    return {
      allowed: false,
      error: new ApiError({
        code: 'token-required', status: 401,
        message: `${action} needs the access token, and the request sent none`,
        fix: 'send the header "Authorization: Bearer <token>" with the token the operator gave you',
      }),
    };
  }
  const match = BEARER.exec(request.authorization);
  if (match === null) {
    return {
      allowed: false,
      error: new ApiError({
        code: 'token-malformed', status: 401,
        message: 'the Authorization header is not of the form "Bearer <token>"',
        fix: 'send the header as "Authorization: Bearer <token>", one space, no quotes',
      }),
    };
  }
  const expected = settings.accessToken;
  if (expected === undefined || !tokensMatch(match[1] ?? '', expected)) {
    return {
      allowed: false,
      error: new ApiError({
        code: 'token-wrong', status: 403,
        message: expected === undefined
          ? `${action} from another machine is switched off: this server has no access token`
          : `the access token sent is not this server's; ${action} is refused`,
        fix: expected === undefined ? 'ask the operator to set an access token, or work on the server machine' : 'check the token with the operator',
      }),
    };
  }
  return { allowed: true };
}

export function accessControl(settings: AccessSettings): RequestHandler {
  return (request, _response, next) => {
    const decision = decideAccess(
      { method: request.method, path: request.path, remoteAddress: request.socket.remoteAddress, authorization: request.headers.authorization },
      settings,
    );
    next(decision.allowed ? undefined : decision.error);
  };
}
