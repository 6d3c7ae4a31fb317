/**
 * Server configuration: one schema that documents every key, gives the TypeScript type and checks
 * the values once at start-up. `parseConfig` fills defaults and refuses a bad value with a message
 * naming the key, what was wrong and how to fix it.
 */
import * as z from 'zod';

/** 1 MiB: the largest JSON body a request may carry by default (edits and options are small). */
export const DEFAULT_JSON_BODY_LIMIT = 2 ** 20;
/** 50 MiB: the largest upload by default (a pick table of about 1.5 million picks). */
export const DEFAULT_MAX_UPLOAD_BYTES = 50 * 2 ** 20;
/** Addresses that count as this machine: IPv4 loopback, IPv6 loopback, and IPv4 loopback mapped into IPv6. */
export const LOOPBACK_ADDRESSES: readonly string[] = ['127.0.0.1', '::1', '::ffff:127.0.0.1'];

export const ConfigSchema = z.strictObject({
  /** Interface to listen on; `127.0.0.1` keeps the server on this machine, `0.0.0.0` opens it to the network. */
  host: z.string().min(1).default('127.0.0.1'),
  /** TCP port; 0 lets the system choose a free one. */
  port: z.number().int().min(0).max(65535).default(8080),
  /** Folder holding the database; the server never builds a path from a request value. */
  dataDir: z.string().min(1),
  /**
   * Access token for writes (and for reads when `lockReads`), sent as `Authorization: Bearer <token>`.
   * Absent: only requests from `trustedAddresses` may write.
   */
  accessToken: z.string().min(16, 'an access token needs at least 16 characters so that it cannot be guessed').optional(),
  /** When true, reads need the token as well (from addresses outside `trustedAddresses`). */
  lockReads: z.boolean().default(false),
  /** Largest uploaded file, in bytes; a larger one is refused with 413 naming this limit. */
  maxUploadBytes: z.number().int().min(1).default(DEFAULT_MAX_UPLOAD_BYTES),
  /**
   * Largest upload request in all, bytes (several gather files in one request); a larger one is
   * refused with 413 before it is read. Multipart uploads must give their length.
   */
  maxUploadRequestBytes: z.number().int().min(1).default(4 * DEFAULT_MAX_UPLOAD_BYTES),
  /** Most files in one multipart upload (the shot gathers of a line); more are refused with 413. */
  maxFilesPerUpload: z.number().int().min(1).default(200),
  /** Largest JSON request body, in bytes; a larger one is refused with 413. */
  jsonBodyLimit: z.number().int().min(1).default(DEFAULT_JSON_BODY_LIMIT),
  /** DNS names this machine answers to besides IP literals and `localhost` (requests naming another host get 421). */
  allowedHostNames: z.array(z.string().min(1)).default([]),
  /** Most picks one interpretation request may carry; a larger table is refused with 413 (keeps one request to seconds). */
  maxInterpretPicks: z.number().int().min(3).default(100_000),
  /** Folder of the built browser client (`npm run build:client`); default the build next to this server. */
  clientDir: z.string().min(1).optional(),
  /** Remote addresses that may write without the token (this machine by default). */
  trustedAddresses: z.array(z.string().min(1)).default([...LOOPBACK_ADDRESSES]),
});

export type ServerConfig = z.infer<typeof ConfigSchema>;
/** What a caller may pass: every key with a default may be left out. */
export type ServerConfigInput = z.input<typeof ConfigSchema>;

/** Thrown by `parseConfig` when the configuration cannot start a server; the message lists every fault. */
export class ConfigError extends Error {
  constructor(readonly faults: readonly string[]) {
    super(`the server configuration is not valid:\n  ${faults.join('\n  ')}`);
    this.name = 'ConfigError';
  }
}

/**
 * Check a configuration and fill its defaults. Throws `ConfigError` naming each bad key (misuse:
 * a configuration is the operator's, not a request's, and the server must not start with it).
 */
export function parseConfig(input: unknown): ServerConfig {
  const parsed = ConfigSchema.safeParse(input);
  if (parsed.success) return parsed.data;
  throw new ConfigError(
    parsed.error.issues.map((issue) => {
      const key = issue.path.length > 0 ? issue.path.join('.') : '(the configuration)';
      return `${key}: ${issue.message}; fix the value in the configuration (see server/config.ts for what each key means)`;
    }),
  );
}
