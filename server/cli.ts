#!/usr/bin/env node
/**
 * The slopebreak command line.
 *
 *   slopebreak interpret FILE [--json] [--robust | --fit METHOD] [--bootstrap N] [--seed S]
 *                             [--scale engineering|crustal] [--pair A:B]... [--datum ELEV]
 *                             [--no-forward-check] [--earth auto|flat|spherical] [--time-terms | --no-time-terms]
 *   slopebreak schema            print the JSON Schema of the interpretation
 *   slopebreak --help | --version
 *
 * Exit codes: 0 success; 1 the input was refused or unreadable, or nothing could be interpreted
 * from it (the reasons are on stderr); 2 usage error; 3 internal error (a bug). A closed output pipe
 * ends the command quietly.
 */
import { existsSync, readFileSync, realpathSync, statSync } from 'node:fs';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { basename } from 'node:path';
import { parseArgs } from 'node:util';
import { readPickTable } from '../lib/picks/index.js';
import { formatProblem } from '../lib/problems.js';
import { interpret } from '../lib/interpret.js';
import { interpretationJsonSchema } from '../lib/interpretation/shape.js';
import type { FitMethod } from '../lib/branches/types.js';
import { formatSummary } from './summary.js';
import { softwareVersion } from './version.js';
import { startServer } from './serve.js';
import { DATABASE_FILE_NAME } from './app.js';
import BetterSqlite3 from 'better-sqlite3';
import { backupDatabase } from './storage/backup.js';

const USAGE = `slopebreak — seismic-refraction interpretation

usage:
  slopebreak interpret FILE [options]   interpret a pick table (CSV) and print a summary
  slopebreak serve [serve options]      run the office service (HTTP API) over a data folder
  slopebreak backup --data DIR --to FILE   write a consistent copy of the service's database
  slopebreak schema                     print the JSON Schema of the interpretation
  slopebreak --version | --help

interpret options:
  --json                 print the interpretation as JSON (the documented shape) instead
  --robust               fit branches with the Huber M-estimate (outlier picks down-weighted)
  --fit METHOD           least-squares (default), huber or theil-sen
  --bootstrap N          add residual-bootstrap depth intervals from N replicates (e.g. 2000)
  --seed S               seed of the bootstrap (default 1)
  --scale SCALE          engineering (m, ms, m/s) or crustal (km, s, km/s); default from the table
  --max-branches N       most branches per shot side (default 5)
  --min-picks N          fewest picks per automatic branch (default 3)
  --pair A:B             use this reversed pair (shot A's forward side, shot B's reverse side)
                         for the depths under the receivers; repeatable; default: automatic
  --datum ELEV           refer depths under the receivers to a flat datum at ELEV metres
                         (needs source and receiver elevations in the table)
  --no-forward-check     skip the grid forward check of the depth section
  --earth MODEL          auto (default: a spherical earth where the offsets are long enough for
                         curvature to matter), flat or spherical
  --time-terms           solve the time-term method on the deepest refractor (shot and station
                         delays, its depth under every station); default on for crustal tables
  --no-time-terms        skip it
  --time-term-gradient   add a velocity gradient below the refractor to the time-term model
                         (t = a + b + Δ/V − κΔ³; the gradient g = √(24κV³) is reported)

serve options:
  --host H               interface to listen on (default 127.0.0.1; 0.0.0.0 opens it to the office network)
  --port P               TCP port (default 8080; 0 picks a free one)
  --data DIR             folder of the database (default .slopebreak-data)
  --token T              access token for writes from other machines (default: generated on first start)
  --lock-reads           require the token for reads from other machines too
  --samples DIR          load the pick tables in DIR as surveys when the database is empty
  --host-name NAME       a DNS name colleagues use for this machine (repeatable); other names get 421
`;

class UsageError extends Error {}

function positiveInteger(value: string | undefined, option: string, minimum: number): number | undefined {
  if (value === undefined) return undefined;
  if (!/^\d+$/.test(value) || Number(value) < minimum) {
    throw new UsageError(`${option} takes a whole number of at least ${minimum}, got "${value}"`);
  }
  return Number(value);
}

function runInterpret(args: readonly string[]): number {
  const { values, positionals } = parseArgs({
    args: [...args],
    allowPositionals: true,
    options: {
      json: { type: 'boolean' },
      robust: { type: 'boolean' },
      fit: { type: 'string' },
      bootstrap: { type: 'string' },
      seed: { type: 'string' },
      scale: { type: 'string' },
      'max-branches': { type: 'string' },
      'min-picks': { type: 'string' },
      pair: { type: 'string', multiple: true },
      datum: { type: 'string' },
      'no-forward-check': { type: 'boolean' },
      earth: { type: 'string' },
      'no-time-terms': { type: 'boolean' },
      'time-terms': { type: 'boolean' },
      'time-term-gradient': { type: 'boolean' },
    },
  });
  if (positionals.length !== 1) throw new UsageError('interpret takes exactly one pick-table file');
  const reversedPairs = values.pair?.map((text) => {
    const parts = text.split(':');
    if (parts.length !== 2 || parts[0]!.trim() === '' || parts[1]!.trim() === '') {
      throw new UsageError(`--pair takes FORWARD:REVERSE, two shot ids joined by one colon (the shot whose forward side, then the shot whose reverse side), got "${text}"`);
    }
    return { forwardShot: parts[0]!.trim(), reverseShot: parts[1]!.trim() };
  });
  let datumElevation: number | undefined;
  if (values.datum !== undefined) {
    if (!/^-?\d+(\.\d+)?$/.test(values.datum.trim())) throw new UsageError(`--datum takes an elevation in metres, e.g. 95.5, got "${values.datum}"`);
    datumElevation = Number(values.datum);
  }
  const file = positionals[0]!;
  const fitNames: readonly FitMethod[] = ['least-squares', 'huber', 'theil-sen'];
  if (values.fit !== undefined && !fitNames.includes(values.fit as FitMethod)) {
    throw new UsageError(`--fit takes one of ${fitNames.join(', ')}, got "${values.fit}"`);
  }
  if (values['time-terms'] && values['no-time-terms']) throw new UsageError('--time-terms and --no-time-terms contradict each other; give one');
  if (values.robust && values.fit !== undefined && values.fit !== 'huber') {
    throw new UsageError('--robust means --fit huber; give one or the other');
  }
  if (values.scale !== undefined && values.scale !== 'engineering' && values.scale !== 'crustal') {
    throw new UsageError(`--scale takes engineering or crustal, got "${values.scale}"`);
  }
  const earthModels = ['auto', 'flat', 'spherical'] as const;
  if (values.earth !== undefined && !earthModels.includes(values.earth as (typeof earthModels)[number])) {
    throw new UsageError(`--earth takes auto, flat or spherical, got "${values.earth}"`);
  }
  const fitMethod: FitMethod = values.robust ? 'huber' : ((values.fit as FitMethod | undefined) ?? 'least-squares');
  const bootstrapReplicates = positiveInteger(values.bootstrap, '--bootstrap', 1) ?? 0;
  const seed = positiveInteger(values.seed, '--seed', 0) ?? 1;
  const maxBranches = positiveInteger(values['max-branches'], '--max-branches', 1);
  const minPicksPerBranch = positiveInteger(values['min-picks'], '--min-picks', 2);

  let bytes: Buffer;
  try {
    if (!statSync(file).isFile()) throw Object.assign(new Error('not a regular file'), { code: 'EISDIR' });
    bytes = readFileSync(file);
  } catch (error) {
    const code = (error as { code?: string }).code;
    const reason = code === 'ENOENT' ? 'no such file' : code === 'EACCES' ? 'permission denied' : code === 'EISDIR' ? 'it is a folder' : (error as Error).message;
    process.stderr.write(`slopebreak: cannot read ${file}: ${reason}; check the path\n`);
    return 1;
  }
  const outcome = readPickTable(bytes);
  if (!outcome.ok) {
    process.stderr.write(`slopebreak: ${file} was refused (${outcome.problems.length} problem(s)); nothing was interpreted:\n`);
    for (const problem of outcome.problems) process.stderr.write(`  ${file}: ${formatProblem(problem)}\n`);
    return 1;
  }
  for (const warning of outcome.warnings) process.stderr.write(`slopebreak: note: ${file}: ${formatProblem(warning)}\n`);
  const result = interpret(outcome.value, {
    fitMethod,
    bootstrapReplicates,
    seed,
    scale: values.scale as 'engineering' | 'crustal' | undefined,
    maxBranches,
    minPicksPerBranch,
    reversedPairs: reversedPairs ?? null,
    datumElevation: datumElevation ?? null,
    forwardCheck: !values['no-forward-check'],
    earthModel: values.earth as (typeof earthModels)[number] | undefined,
    timeTerms: values['no-time-terms'] ? false : values['time-terms'] ? true : undefined,
    timeTermGradient: values['time-term-gradient'] === true,
    sourceName: basename(file),
    softwareVersion: softwareVersion(),
  });
  process.stdout.write(values.json ? `${JSON.stringify(result, null, 2)}\n` : formatSummary(result));
  if (result.layers.length === 0) {
    process.stderr.write(`slopebreak: nothing could be interpreted from ${file}: no shot side has a branch that could be fitted (see the warnings)\n`);
    return 1;
  }
  return 0;
}

function runServe(args: readonly string[]): void {
  const { values, positionals } = parseArgs({
    args: [...args],
    allowPositionals: true,
    options: {
      host: { type: 'string' },
      port: { type: 'string' },
      data: { type: 'string' },
      token: { type: 'string' },
      'lock-reads': { type: 'boolean' },
      samples: { type: 'string' },
      'host-name': { type: 'string', multiple: true },
    },
  });
  if (positionals.length > 0) throw new UsageError(`serve takes no file, got "${positionals[0]}"`);
  const port = values.port === undefined ? undefined : positiveInteger(values.port, '--port', 0);
  if (port !== undefined && port > 65535) throw new UsageError(`--port takes 0 to 65535, got ${port}`);
  startServer({
    host: values.host ?? '127.0.0.1',
    ...(port !== undefined ? { port } : {}),
    dataDir: values.data ?? '.slopebreak-data',
    ...(values.token ? { accessToken: values.token } : {}),
    lockReads: values['lock-reads'] ?? false,
    ...(values.samples ? { sampleFolder: values.samples } : {}),
    ...(values['host-name'] ? { allowedHostNames: values['host-name'] } : {}),
  }).then(
    (running) => {
      process.stdout.write(`slopebreak ${softwareVersion()} is serving; open:\n${running.urls.map((url) => `  ${url}`).join('\n')}\n(Ctrl-C stops it after the requests in progress finish)\n`);
      const stop = () => {
        running.stop().then(() => process.exit(0), () => process.exit(1));
      };
      process.once('SIGINT', stop);
      process.once('SIGTERM', stop);
    },
    (error: Error) => {
      process.stderr.write(`slopebreak: the service could not start: ${error.message}\n`);
      process.exit(1);
    },
  );
}

function runBackup(args: readonly string[]): void {
  const { values } = parseArgs({ args: [...args], options: { data: { type: 'string' }, to: { type: 'string' } } });
  if (!values.to) throw new UsageError('backup needs --to FILE, the copy to write');
  const file = join(values.data ?? '.slopebreak-data', DATABASE_FILE_NAME);
  if (!existsSync(file)) {
    process.stderr.write(`slopebreak: no database at ${file}; give the service's --data folder\n`);
    process.exitCode = 1;
    return;
  }
  // Read-only and without migrations: a backup must never change the live database it copies.
  const db = new BetterSqlite3(file, { readonly: true, fileMustExist: true });
  backupDatabase(db, values.to).then(
    () => {
      db.close();
      process.stdout.write(`slopebreak: consistent copy of ${file} written to ${values.to}\n`);
    },
    (error: Error) => {
      db.close();
      process.stderr.write(`slopebreak: backup failed: ${error.message}\n`);
      process.exitCode = 1;
    },
  );
}

export function main(argv: readonly string[]): number {
  const [command, ...rest] = argv;
  try {
    switch (command) {
      case 'interpret':
        return runInterpret(rest);
      case 'serve':
        runServe(rest);
        return -1;
      case 'backup':
        runBackup(rest);
        return -1;
      case 'schema':
        process.stdout.write(`${JSON.stringify(interpretationJsonSchema(), null, 2)}\n`);
        return 0;
      case '--version':
      case '-v':
        process.stdout.write(`${softwareVersion()}\n`);
        return 0;
      case undefined:
      case '--help':
      case '-h':
      case 'help':
        process.stdout.write(USAGE);
        return command === undefined ? 2 : 0;
      default:
        throw new UsageError(`unknown command "${command}"`);
    }
  } catch (error) {
    if (error instanceof UsageError || (error as { code?: string }).code?.startsWith('ERR_PARSE_ARGS')) {
      process.stderr.write(`slopebreak: ${(error as Error).message}\n\n${USAGE}`);
      return 2;
    }
    throw error;
  }
}

function invokedDirectly(): boolean {
  const script = process.argv[1];
  if (script === undefined) return false;
  try {
    return realpathSync(script) === realpathSync(fileURLToPath(import.meta.url));
  } catch {
    return false;
  }
}

if (invokedDirectly()) {
  // A reader that closes the pipe early (`| head`) is not an error of ours: stop quietly.
  process.stdout.on('error', (error: NodeJS.ErrnoException) => {
    if (error.code === 'EPIPE') process.exit(0);
    throw error;
  });
  try {
    // Long-running commands (serve, backup) return −1 and set the exit code themselves.
    const status = main(process.argv.slice(2));
    if (status >= 0) process.exitCode = status;
  } catch (error) {
    // A programming error: say so plainly, with what a bug report needs, and exit non-zero.
    process.stderr.write(
      `slopebreak: internal error (${(error as Error).message}); this is a bug, please report it with the input file\n` +
        `${(error as Error).stack ?? ''}\n`,
    );
    process.exitCode = 3;
  }
}
