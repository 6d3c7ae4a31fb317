/**
 * Starting the office service: open the database, build the app (`createApp`), listen, say where
 * to open it, and stop gracefully.
 *
 * - Access token: when the server listens beyond this machine and no token is configured, one is
 *   generated on first start, kept in `<dataDir>/access-token` (readable by its owner only) and
 *   printed once; later starts read it and say where it is. Colleagues read without it; writes from
 *   other machines need it (`Authorization: Bearer <token>`).
 * - URLs: the local URL, and every non-internal IPv4 address of this machine when the server
 *   listens on all interfaces (`0.0.0.0`), so a colleague knows what to type.
 * - Graceful shutdown (SIGINT, SIGTERM, or `stop()`): stop accepting connections, let in-flight
 *   requests — writes included — finish, then close the database; after `SHUTDOWN_GRACE_MS` the
 *   remaining idle connections are closed.
 */
import { existsSync, mkdirSync, readdirSync, readFileSync, writeFileSync } from 'node:fs';
import { randomBytes } from 'node:crypto';
import type { AddressInfo } from 'node:net';
import { createServer, type Server } from 'node:http';
import { networkInterfaces } from 'node:os';
import { basename, join } from 'node:path';
import { readPickTable } from '../lib/picks/index.js';
import { createApp, DATABASE_FILE_NAME } from './app.js';
import type { LogSink } from './logging.js';
import { parseConfig, LOOPBACK_ADDRESSES, type ServerConfigInput } from './config.js';
import { openDatabase } from './storage/database.js';
import { createSurveyStore, type SurveyStore } from './storage/survey-store.js';
import { interpretAndStore } from './revisions.js';
import { pickUploadedGathers, type PickedUpload } from './gather-uploads.js';
import { softwareVersion } from './version.js';

/** The file in the data folder that keeps a generated access token. */
export const TOKEN_FILE_NAME = 'access-token';
/** How long shutdown waits for in-flight requests before closing idle connections, ms. */
export const SHUTDOWN_GRACE_MS = 10_000;

export interface RunningServer {
  readonly server: Server;
  /** URLs a person can open, the local one first. */
  readonly urls: readonly string[];
  readonly port: number;
  /** Stop gracefully: finish in-flight requests, then close the database. */
  readonly stop: () => Promise<void>;
}

export interface ServeOptions extends ServerConfigInput {
  /** Where messages for the operator go (URLs, the token). Default standard output. */
  readonly say?: (line: string) => void;
  /** A folder of pick tables to load as surveys when the database holds none yet. */
  readonly sampleFolder?: string;
  /** Where the request log lines go; default standard error. */
  readonly logSink?: LogSink;
}

/** File names of SEG-Y and SEG-2 samples. */
const SEGY_SAMPLE = /\.(sgy|segy)$/i;
const SEG2_SAMPLE = /\.(sg2|seg2|dat)$/i;

/**
 * Loads a sample of shot gathers as a survey: a SEG-Y file, or a folder of SEG-2 files (one per
 * shot). The picker's picks are its pick set, interpreted as revision 1. Returns false (after
 * saying why) when the gathers were refused.
 */
function loadSampleGathers(store: SurveyStore, name: string, paths: readonly string[], say: (line: string) => void): boolean {
  const files = paths.map((path) => ({ file: { fileName: basename(path), declaredType: '', bytes: new Uint8Array(readFileSync(path)) }, mediaType: 'application/octet-stream' }));
  let picked: PickedUpload;
  try {
    picked = pickUploadedGathers(files, {}, [], Number.MAX_SAFE_INTEGER);
  } catch (error) {
    say(`Sample ${name} was not loaded: ${(error as Error).message}`);
    return false;
  }
  if (picked.pickSet.picks.length === 0) {
    say(`Sample ${name} was not loaded: no shot kept enough picks (${picked.warnings[0]?.message ?? 'none found'})`);
    return false;
  }
  for (const warning of picked.warnings) say(`Sample ${name}: ${warning.message}`);
  const survey = store.createSurvey({ name, description: 'shot gathers, picked automatically', scale: picked.pickSet.suggestedScale });
  try {
    store.addGatherUpload(survey.id, {
      files: picked.files.map((entry) => ({
        fileName: entry.fileName, mediaType: entry.mediaType, bytes: entry.file.bytes,
        shots: entry.shots.map((shot) => ({ shotNumber: shot.shotNumber, shot: shot.shot, summaryJson: JSON.stringify(shot.summary) })),
      })),
      pickSetJson: JSON.stringify(picked.pickSet),
    }, survey.version);
    interpretAndStore(store, survey.id, picked.pickSet, { scale: picked.pickSet.suggestedScale }, { sourceName: name, softwareVersion: softwareVersion() });
  } catch (error) {
    // Leave no half-made sample behind: it would also stop the other samples loading next time.
    store.deleteSurvey(survey.id, store.getSurvey(survey.id).version);
    say(`Sample ${name} was not loaded: ${(error as Error).message}`);
    return false;
  }
  return true;
}

/**
 * Loads every `.csv` pick table in `folder` as a survey (name from the file, description from its
 * first comment line), every SEG-Y file and every sub-folder of SEG-2 files as a survey of shot
 * gathers, each with a first interpretation as revision 1, when the store holds no survey yet; a
 * file the readers refuse is skipped and named. Returns how many were loaded.
 */
export function loadSampleSurveys(store: SurveyStore, folder: string, say: (line: string) => void): number {
  if (store.listSurveys({}).length > 0) return 0;
  let loaded = 0;
  const entries = readdirSync(folder, { withFileTypes: true }).sort((a, b) => a.name.localeCompare(b.name));
  for (const entry of entries) {
    if (entry.isFile() && SEGY_SAMPLE.test(entry.name)) {
      if (loadSampleGathers(store, entry.name.replace(SEGY_SAMPLE, ''), [join(folder, entry.name)], say)) loaded += 1;
    } else if (entry.isDirectory()) {
      const shots = readdirSync(join(folder, entry.name)).filter((name) => SEG2_SAMPLE.test(name)).sort();
      if (shots.length > 0 && loadSampleGathers(store, entry.name, shots.map((name) => join(folder, entry.name, name)), say)) loaded += 1;
    }
  }
  for (const name of entries.filter((entry) => entry.isFile() && entry.name.endsWith('.csv')).map((entry) => entry.name)) {
    const bytes = readFileSync(join(folder, name));
    const outcome = readPickTable(bytes);
    if (!outcome.ok) {
      say(`Sample ${name} was not loaded: ${outcome.problems[0]?.message ?? 'refused'}`);
      continue;
    }
    const comment = bytes.toString('utf8').split(/\r?\n/).find((line) => line.startsWith('#'));
    const survey = store.createSurvey({
      name: basename(name, '.csv'),
      ...(comment ? { description: comment.replace(/^#\s*/, '') } : {}),
      scale: outcome.value.suggestedScale,
    });
    store.addPickUpload(survey.id, { fileName: name, mediaType: 'text/csv', bytes, pickSetJson: JSON.stringify(outcome.value) }, survey.version);
    // A first revision with the default options, so a newcomer sees a result without a click.
    interpretAndStore(store, survey.id, outcome.value, { scale: outcome.value.suggestedScale }, { sourceName: name, softwareVersion: softwareVersion() });
    loaded += 1;
  }
  return loaded;
}

/** True for an address that stays on this machine. */
export function isLoopbackHost(host: string): boolean {
  return host === 'localhost' || LOOPBACK_ADDRESSES.includes(host) || /^127\./.test(host);
}

/** The token for a server listening beyond this machine: configured, kept from an earlier start, or new. */
export function accessTokenFor(dataDir: string, configured: string | undefined, say: (line: string) => void): string {
  if (configured) return configured;
  const file = join(dataDir, TOKEN_FILE_NAME);
  if (existsSync(file)) {
    say(`Access token for writes from other machines: kept in ${file}`);
    return readFileSync(file, 'utf8').trim();
  }
  const token = randomBytes(24).toString('base64url');
  writeFileSync(file, `${token}\n`, { mode: 0o600, flag: 'wx' });
  say(`Access token for writes from other machines (shown once; kept in ${file}): ${token}`);
  return token;
}

/** The URLs to open: local first, then this machine's network addresses when listening on all interfaces. */
export function serverUrls(host: string, port: number): string[] {
  const local = `http://${isLoopbackHost(host) || host === '0.0.0.0' || host === '::' ? '127.0.0.1' : host}:${port}/`;
  if (host !== '0.0.0.0' && host !== '::') return [local];
  const lan = Object.values(networkInterfaces())
    .flat()
    .filter((entry) => entry !== undefined && entry.family === 'IPv4' && !entry.internal)
    .map((entry) => `http://${entry!.address}:${port}/`);
  return [local, ...lan];
}

export async function startServer(options: ServeOptions): Promise<RunningServer> {
  const say = options.say ?? ((line: string) => process.stdout.write(`${line}\n`));
  const { say: _say, sampleFolder, logSink, ...configInput } = options;
  const preliminary = parseConfig(configInput);
  mkdirSync(preliminary.dataDir, { recursive: true });
  const accessToken = isLoopbackHost(preliminary.host)
    ? preliminary.accessToken
    : accessTokenFor(preliminary.dataDir, preliminary.accessToken, say);
  const db = openDatabase(join(preliminary.dataDir, DATABASE_FILE_NAME));
  const store = createSurveyStore(db);
  if (sampleFolder) {
    const loaded = loadSampleSurveys(store, sampleFolder, say);
    if (loaded > 0) say(`Loaded ${loaded} sample survey(s) from ${sampleFolder}`);
  }
  const app = createApp({ ...configInput, ...(accessToken ? { accessToken } : {}) }, { store, ...(logSink ? { logSink } : {}) });
  const server = createServer(app);
  // Requests Node refuses before Express sees them (headers too large, a garbled request line) still
  // get a JSON error body, like every other refusal of this service.
  server.on('clientError', (error: NodeJS.ErrnoException, socket) => {
    if (!socket.writable) return;
    const status = error.code === 'HPE_HEADER_OVERFLOW' ? 431 : 400;
    const body = JSON.stringify({
      error: {
        code: status === 431 ? 'headers-too-large' : 'request-malformed',
        message: status === 431 ? 'the request headers (or URL) are larger than this server accepts' : 'the request could not be parsed as HTTP',
        fix: status === 431 ? 'send a shorter URL and fewer or smaller headers' : 'send a well-formed HTTP/1.1 request',
        details: {},
      },
    });
    socket.end(`HTTP/1.1 ${status} ${status === 431 ? 'Request Header Fields Too Large' : 'Bad Request'}\r\ncontent-type: application/json; charset=utf-8\r\ncontent-length: ${Buffer.byteLength(body)}\r\nconnection: close\r\n\r\n${body}`);
  });
  await new Promise<void>((resolve, reject) => {
    server.once('error', reject);
    server.listen(preliminary.port, preliminary.host, () => resolve());
  });
  const { port } = server.address() as AddressInfo;
  const urls = serverUrls(preliminary.host, port);
  let stopping: Promise<void> | null = null;
  const stop = () => {
    stopping ??= new Promise<void>((resolve) => {
      const grace = setTimeout(() => server.closeAllConnections(), SHUTDOWN_GRACE_MS);
      server.close(() => {
        clearTimeout(grace);
        db.close();
        resolve();
      });
      server.closeIdleConnections();
    });
    return stopping;
  };
  return { server, urls, port, stop };
}
