/**
 * One HTTP request to a server on this machine (127.0.0.1 only), each on its OWN TCP connection
 * (`agent: false`, no keep-alive pool), so concurrent calls are separate clients as far as the
 * server can tell. Every call is bounded by a timeout. A reply of any status resolves; a request
 * that gets no reply (connection refused or reset, timeout) rejects with the socket error, whose
 * `code` says which.
 */
import { request as httpRequest, type IncomingHttpHeaders } from 'node:http';

/** The only address these helpers talk to. */
export const LOOPBACK_HOST = '127.0.0.1';

export interface LoopbackRequest {
  readonly method: 'GET' | 'POST' | 'PATCH' | 'DELETE';
  readonly path: string;
  readonly headers?: Readonly<Record<string, string>>;
  /** A value to send as JSON, or raw bytes / text sent as given (set Content-Type in `headers`). */
  readonly json?: unknown;
  readonly body?: string | Buffer;
  /** Give up (and reject with code `ETIMEDOUT`) after this many ms. */
  readonly timeoutMs: number;
  /** Called once the whole request has been handed to the operating system (it may be in the server's hands). */
  readonly onSent?: () => void;
}

export interface LoopbackReply {
  readonly status: number;
  readonly headers: IncomingHttpHeaders;
  /** The body parsed as JSON when the reply says it is JSON, otherwise undefined. */
  readonly json: unknown;
  readonly text: string;
}

export function sendOverLoopback(port: number, call: LoopbackRequest): Promise<LoopbackReply> {
  const payload = call.json !== undefined ? Buffer.from(JSON.stringify(call.json), 'utf8') : call.body === undefined ? undefined : Buffer.from(call.body);
  const headers: Record<string, string> = { ...(call.json !== undefined ? { 'content-type': 'application/json' } : {}), ...call.headers };
  if (payload !== undefined) headers['content-length'] = String(payload.length);
  return new Promise<LoopbackReply>((resolve, reject) => {
    const outgoing = httpRequest({ host: LOOPBACK_HOST, port, method: call.method, path: call.path, headers, agent: false }, (incoming) => {
      const chunks: Buffer[] = [];
      incoming.on('data', (chunk: Buffer) => chunks.push(chunk));
      incoming.on('error', reject);
      incoming.on('end', () => {
        const text = Buffer.concat(chunks).toString('utf8');
        const isJson = /json/.test(incoming.headers['content-type'] ?? '');
        resolve({ status: incoming.statusCode ?? 0, headers: incoming.headers, json: isJson && text !== '' ? (JSON.parse(text) as unknown) : undefined, text });
      });
    });
    outgoing.setTimeout(call.timeoutMs, () => outgoing.destroy(Object.assign(new Error(`no reply within ${call.timeoutMs} ms`), { code: 'ETIMEDOUT' })));
    outgoing.on('error', reject);
    if (call.onSent) outgoing.on('finish', call.onSent);
    outgoing.end(payload);
  });
}

/** The `error` object of a JSON error reply (`{ error: { code, message, details } }`), or undefined. */
export function errorOf(reply: LoopbackReply): { code: string; message: string; details: Record<string, unknown> } | undefined {
  const body = reply.json as { error?: { code: string; message: string; details: Record<string, unknown> } } | undefined;
  return body?.error;
}
