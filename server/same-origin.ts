/**
 * Guards against a web page turning a colleague's browser against the service (cross-site
 * requests, DNS rebinding). Trust by address is about the machine a request comes from; a browser
 * on that machine can be made to send requests for any page it visits, so:
 *
 * - Host: a request must name the service by an IP literal, `localhost`, or one of
 *   `allowedHostNames` (the office's DNS names for this machine). A page on `evil.example` whose
 *   name was re-pointed at this machine sends `Host: evil.example` and gets 421.
 * - Writes: when the browser says where the request comes from — `Origin`, or
 *   `Sec-Fetch-Site: cross-site` — it must be this service itself; otherwise 403. Scripts and
 *   command-line clients send neither header and are not affected.
 */
import { isIP } from 'node:net';
import type { RequestHandler } from 'express';
import { ApiError } from './errors.js';
import { isWrite } from './auth.js';

/** The host name of a Host header value (`[::1]:8080` → `::1`, `box.office:80` → `box.office`). */
export function hostNameOf(hostHeader: string): string {
  const trimmed = hostHeader.trim().toLowerCase();
  if (trimmed.startsWith('[')) return trimmed.slice(1, trimmed.indexOf(']'));
  const colon = trimmed.lastIndexOf(':');
  return colon > 0 && trimmed.indexOf(':') === colon ? trimmed.slice(0, colon) : trimmed;
}

export function hostAllowed(hostHeader: string | undefined, allowedHostNames: readonly string[]): boolean {
  if (hostHeader === undefined) return true; // HTTP/1.0 clients name no host; nothing to rebind
  const name = hostNameOf(hostHeader);
  return isIP(name) !== 0 || name === 'localhost' || allowedHostNames.map((entry) => entry.toLowerCase()).includes(name);
}

export function sameOrigin(allowedHostNames: readonly string[]): RequestHandler {
  return (request, _response, next) => {
    const host = request.get('host');
    if (!hostAllowed(host, allowedHostNames)) {
      next(
        new ApiError({
          code: 'host-not-served', status: 421,
          message: `this service does not answer to the name ${JSON.stringify(host)}`,
          fix: "use the machine's address as the service printed it, or ask the operator to add this name to allowedHostNames",
        }),
      );
      return;
    }
    if (isWrite(request)) {
      const origin = request.get('origin');
      const site = request.get('sec-fetch-site');
      const foreignOrigin = origin !== undefined && origin !== 'null' && (() => {
        try {
          return new URL(origin).host.toLowerCase() !== (host ?? '').toLowerCase();
        } catch {
          return true;
        }
      })();
      if (foreignOrigin || origin === 'null' || site === 'cross-site') {
        next(
          new ApiError({
            code: 'cross-site-write', status: 403,
            message: 'a web page from another site tried to change surveys on this service; nothing was stored',
            fix: 'make changes from the service itself or from a script (which sends no Origin header)',
          }),
        );
        return;
      }
    }
    next();
  };
}
