/**
 * Structured logs: one JSON object per line, written to a sink the app is given (standard error by
 * default; tests pass one that collects the lines). Nothing is kept at module level.
 */
import type { RequestHandler } from 'express';

/** Where log lines go: one JSON text per call, without the trailing newline. */
export type LogSink = (line: string) => void;

export type LogLevel = 'info' | 'warn' | 'error';

export interface Logger {
  info(message: string, fields?: Readonly<Record<string, unknown>>): void;
  warn(message: string, fields?: Readonly<Record<string, unknown>>): void;
  error(message: string, fields?: Readonly<Record<string, unknown>>): void;
}

export const stderrSink: LogSink = (line) => {
  process.stderr.write(`${line}\n`);
};

/** A logger writing `{time, level, message, …fields}` lines to `sink`; `now` gives the clock (tests fix it). */
export function createLogger(sink: LogSink, now: () => Date = () => new Date()): Logger {
  const write = (level: LogLevel, message: string, fields: Readonly<Record<string, unknown>> = {}) => {
    sink(JSON.stringify({ time: now().toISOString(), level, message, ...fields }));
  };
  return {
    info: (message, fields) => write('info', message, fields),
    warn: (message, fields) => write('warn', message, fields),
    error: (message, fields) => write('error', message, fields),
  };
}

/**
 * One line per finished request: method, path (without the query string, which may carry names),
 * status, duration in milliseconds, response bytes and the remote address. Level follows the status:
 * 5xx error, 4xx warn, else info.
 */
export function requestLogger(logger: Logger): RequestHandler {
  return (request, response, next) => {
    const started = process.hrtime.bigint();
    response.on('finish', () => {
      const durationMs = Number(process.hrtime.bigint() - started) / 1e6;
      const status = response.statusCode;
      const fields = {
        method: request.method,
        path: request.path,
        status,
        durationMs: Math.round(durationMs * 1000) / 1000,
        bytes: Number(response.getHeader('content-length') ?? 0),
        remote: request.socket.remoteAddress ?? null,
      };
      if (status >= 500) logger.error('request', fields);
      else if (status >= 400) logger.warn('request', fields);
      else logger.info('request', fields);
    });
    next();
  };
}
