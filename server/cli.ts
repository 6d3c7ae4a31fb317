#!/usr/bin/env node
/**
 * The slopebreak command line.
 *
 *   slopebreak pick GATHER... [--out FILE] [--band LOW-HIGH] [--agc SECONDS] [--normalise]
 *                             [--estimator sta-lta|energy-ratio] [--no-consistency]
 *                             [--shot NAME] [--source-x X] [--first-receiver-x X --receiver-spacing DX]
 *   slopebreak interpret FILE... [--json] [--robust | --fit METHOD] [--bootstrap N] [--seed S]
 *                             [--scale engineering|crustal] [--pair A:B]... [--datum ELEV]
 *                             [--no-forward-check] [--earth auto|flat|spherical] [--time-terms | --no-time-terms]
 *   slopebreak schema            print the JSON Schema of the interpretation
 *   slopebreak --help | --version
 *
 * Exit codes: 0 success; 1 the input was refused or unreadable, or nothing could be interpreted
 * from it (the reasons are on stderr); 2 usage error; 3 internal error (a bug). A closed output pipe
 * ends the command quietly.
 */
import { closeSync, existsSync, openSync, readFileSync, readSync, realpathSync, renameSync, rmSync, statSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { basename } from 'node:path';
import { parseArgs } from 'node:util';
import { readPickTable, writePickTable, type Pick, type PickSet } from '../lib/picks/index.js';
import { GATHER_SNIFF_BYTES, identifyGather } from '../lib/gathers/formats.js';
import { pickSetOf } from '../lib/gathers/gather-picks.js';
import type { GeometryCorrection } from '../lib/gathers/shot-gathers.js';
import type { PickingOptions } from '../lib/picking/index.js';
import { DISPLAY_UNITS } from '../lib/units.js';
import { pickGatherPath } from './gather-paths.js';
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
  slopebreak interpret FILE... [options]   interpret a pick table (CSV), or shot gathers (SEG-2,
                                        SEG-Y) picked first, and print a summary
  slopebreak pick GATHER... [options]   pick the first breaks of shot gathers (SEG-2, SEG-Y) and
                                        write them as a pick table with a sigma column
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

pick options (also taken by interpret when it is given gathers):
  --out FILE             write the pick table to FILE (default: standard output)
  --band LOW-HIGH        band-pass the traces before picking, corners in Hz (e.g. 15-800)
  --agc SECONDS          automatic gain control with this window before picking (e.g. 0.05)
  --normalise            scale every trace to its largest sample before picking
  --estimator NAME       first estimate: sta-lta or energy-ratio (default from the picker)
  --no-consistency       keep picks that disagree with their neighbouring traces
  --shot NAME            name the shot (one gather file of one shot)
  --source-x X           source position along the line, metres (one shot; --source-x=-8 for a negative one)
  --first-receiver-x X   first trace's receiver position, metres (with --receiver-spacing)
  --receiver-spacing DX  distance between consecutive traces' receivers, metres

serve options:
  --host H               interface to listen on (default 127.0.0.1; 0.0.0.0 opens it to the office network)
  --port P               TCP port (default 8080; 0 picks a free one)
  --data DIR             folder of the database (default .slopebreak-data)
  --token T              access token for writes from other machines (default: generated on first start)
  --lock-reads           require the token for reads from other machines too
  --samples DIR          load the pick tables and gathers in DIR as surveys when the database is empty
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

/** Options `pick` takes, and `interpret` too when it is given gathers. */
const PICK_OPTIONS = {
  out: { type: 'string' },
  band: { type: 'string' },
  agc: { type: 'string' },
  normalise: { type: 'boolean' },
  estimator: { type: 'string' },
  'no-consistency': { type: 'boolean' },
  shot: { type: 'string' },
  'source-x': { type: 'string' },
  'first-receiver-x': { type: 'string' },
  'receiver-spacing': { type: 'string' },
} as const;

type PickOptionValues = { [name in keyof typeof PICK_OPTIONS]?: (typeof PICK_OPTIONS)[name]['type'] extends 'boolean' ? boolean : string };

function metres(value: string | undefined, option: string): number | undefined {
  if (value === undefined) return undefined;
  if (!/^-?\d+(\.\d+)?$/.test(value.trim()) || Math.abs(Number(value)) > 1e7) throw new UsageError(`${option} takes metres within 10,000 km, e.g. 12.5, got "${value}"`);
  return Number(value);
}

function pickSettings(values: PickOptionValues): { correction: GeometryCorrection; picking: Partial<PickingOptions> } {
  let bandPass: PickingOptions['bandPass'] | undefined;
  if (values.band !== undefined) {
    const match = /^(\d+(?:\.\d+)?)-(\d+(?:\.\d+)?)$/.exec(values.band.trim());
    if (match === null || Number(match[1]) <= 0 || Number(match[1]) >= Number(match[2])) {
      throw new UsageError(`--band takes LOW-HIGH in Hz with 0 < LOW < HIGH, e.g. 15-800, got "${values.band}"`);
    }
    bandPass = { low: Number(match[1]), high: Number(match[2]) };
  }
  let gain: PickingOptions['gain'] | undefined;
  if (values.agc !== undefined) {
    if (!/^\d+(\.\d+)?$/.test(values.agc.trim()) || Number(values.agc) <= 0) throw new UsageError(`--agc takes a window in seconds, more than 0, e.g. 0.05, got "${values.agc}"`);
    gain = { window: Number(values.agc) };
  }
  if (values.estimator !== undefined && values.estimator !== 'sta-lta' && values.estimator !== 'energy-ratio') {
    throw new UsageError(`--estimator takes sta-lta or energy-ratio, got "${values.estimator}"`);
  }
  const firstReceiverX = metres(values['first-receiver-x'], '--first-receiver-x');
  const receiverSpacing = metres(values['receiver-spacing'], '--receiver-spacing');
  if ((firstReceiverX === undefined) !== (receiverSpacing === undefined)) throw new UsageError('--first-receiver-x and --receiver-spacing go together; give both or neither');
  if (receiverSpacing === 0) throw new UsageError('--receiver-spacing cannot be 0');
  const sourceX = metres(values['source-x'], '--source-x');
  if (values.shot !== undefined && (values.shot.trim() === '' || values.shot.trim().length > 200)) throw new UsageError('--shot takes a name of 1 to 200 characters');
  return {
    correction: {
      ...(values.shot !== undefined ? { shot: values.shot.trim() } : {}),
      ...(sourceX !== undefined ? { sourceX } : {}),
      ...(firstReceiverX !== undefined && receiverSpacing !== undefined ? { firstReceiverX, receiverSpacing } : {}),
    },
    picking: {
      ...(bandPass !== undefined ? { bandPass } : {}),
      ...(gain !== undefined ? { gain } : {}),
      ...(values.normalise ? { normalise: true } : {}),
      ...(values.estimator !== undefined ? { estimator: values.estimator as PickingOptions['estimator'] } : {}),
      ...(values['no-consistency'] ? { consistency: false } : {}),
    },
  };
}

/**
 * Pick every gather file; the pick set of them all, or null after saying on stderr why a file was
 * refused. Per-shot counts go to stderr so that stdout stays the table (or the summary).
 */
function pickFiles(files: readonly string[], values: PickOptionValues): PickSet | null {
  const { correction, picking } = pickSettings(values);
  if (files.length > 1 && (correction.shot !== undefined || correction.sourceX !== undefined)) {
    throw new UsageError('--shot and --source-x apply to one gather file of one shot; give one file');
  }
  const picks: Pick[] = [];
  const seen = new Map<string, string>();
  for (const file of files) {
    const picked = pickGatherPath(file, correction, picking);
    if (!picked.ok) {
      process.stderr.write(`slopebreak: ${file} was refused; nothing was picked:\n`);
      for (const problem of picked.problems) process.stderr.write(`  ${file}: ${problem.message}; ${problem.fix}\n`);
      return null;
    }
    for (const warning of picked.warnings) process.stderr.write(`slopebreak: note: ${file}: ${warning.message}; ${warning.fix}\n`);
    for (const shot of picked.shots) {
      const other = seen.get(shot.shot);
      if (other !== undefined) {
        process.stderr.write(`slopebreak: shot "${shot.shot}" is in both ${other} and ${file}; name one with --shot (one file at a time) or correct the headers\n`);
        return null;
      }
      seen.set(shot.shot, file);
      process.stderr.write(`slopebreak: ${file}: shot ${shot.shot}: ${shot.traceCount} traces, ${shot.pickCount} picks (${shot.lowConfidence} low-confidence, ${shot.rejected} rejected or none found)\n`);
    }
    picks.push(...picked.picks);
  }
  const { pickSet, warnings } = pickSetOf(picks, { shots: [...seen.keys()] });
  for (const warning of warnings) process.stderr.write(`slopebreak: note: ${warning.message}; ${warning.fix}\n`);
  if (pickSet.picks.length === 0) {
    process.stderr.write('slopebreak: no shot kept enough picks to make a pick table\n');
    return null;
  }
  return pickSet;
}

/** `--help` or `-h` among a command's arguments: print the usage and succeed. */
function wantsHelp(args: readonly string[]): boolean {
  if (!args.some((arg) => arg === '--help' || arg === '-h')) return false;
  process.stdout.write(USAGE);
  return true;
}

function runPick(args: readonly string[]): number {
  if (wantsHelp(args)) return 0;
  const { values, positionals } = parseArgs({ args: [...args], allowPositionals: true, options: PICK_OPTIONS });
  if (positionals.length === 0) throw new UsageError('pick takes one or more gather files (SEG-2 or SEG-Y)');
  const pickSet = pickFiles(positionals, values);
  if (pickSet === null) return 1;
  const table = writePickTable(pickSet, DISPLAY_UNITS[pickSet.suggestedScale]);
  if (values.out === undefined) {
    process.stdout.write(table);
    return 0;
  }
  // Written whole to a temporary name and renamed: a reader never sees half a table.
  const temporary = `${values.out}.partial-${process.pid}`;
  try {
    writeFileSync(temporary, table);
    renameSync(temporary, values.out);
  } catch (error) {
    rmSync(temporary, { force: true });
    process.stderr.write(`slopebreak: cannot write ${values.out}: ${(error as Error).message}; check the folder exists and is writable\n`);
    return 1;
  }
  process.stderr.write(`slopebreak: ${pickSet.picks.length} picks of ${pickSet.shotIds.length} shot${pickSet.shotIds.length === 1 ? '' : 's'} written to ${values.out}\n`);
  return 0;
}

/** True when the file's leading bytes are a gather format (else it is read as a pick table). */
function isGatherFile(path: string): boolean {
  try {
    const fd = openSync(path, 'r');
    try {
      const head = new Uint8Array(GATHER_SNIFF_BYTES);
      return identifyGather(head.subarray(0, readSync(fd, head, 0, head.length, 0))).ok;
    } finally {
      closeSync(fd);
    }
  } catch {
    return false;
  }
}

function runInterpret(args: readonly string[]): number {
  if (wantsHelp(args)) return 0;
  const { values, positionals } = parseArgs({
    args: [...args],
    allowPositionals: true,
    options: {
      ...PICK_OPTIONS,
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
  if (positionals.length === 0) throw new UsageError('interpret takes one pick-table file, or one or more gather files');
  const gathers = positionals.map(isGatherFile);
  if (positionals.length > 1 && !gathers.every(Boolean)) throw new UsageError('interpret takes one pick-table file on its own; several files must all be gathers (SEG-2 or SEG-Y)');
  if (values.out !== undefined) throw new UsageError('--out belongs to pick; interpret prints its result (use pick --out to keep the picks)');
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
  const sourceName = positionals.length === 1 ? basename(file) : `${basename(file)} and ${positionals.length - 1} more gather file(s)`;
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

  let pickSet: PickSet;
  if (gathers[0]) {
    const picked = pickFiles(positionals, values);
    if (picked === null) return 1;
    pickSet = picked;
  } else {
    const given = Object.keys(PICK_OPTIONS).filter((name) => values[name as keyof typeof PICK_OPTIONS] !== undefined);
    if (given.length > 0) throw new UsageError(`--${given[0]} is a picking option, and ${file} is a pick table (already picked); give it gathers (SEG-2 or SEG-Y), or leave it out`);
    const read = readTableFile(file);
    if (read === null) return 1;
    pickSet = read;
  }
  const result = interpret(pickSet, {
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
    sourceName,
    softwareVersion: softwareVersion(),
  });
  process.stdout.write(values.json ? `${JSON.stringify(result, null, 2)}\n` : formatSummary(result));
  if (result.layers.length === 0) {
    process.stderr.write(`slopebreak: nothing could be interpreted from ${sourceName}: no shot side has a branch that could be fitted (see the warnings)\n`);
    return 1;
  }
  return 0;
}

/** Read a pick-table file, or say on stderr why not and return null. */
function readTableFile(file: string): PickSet | null {
  let bytes: Buffer;
  try {
    if (!statSync(file).isFile()) throw Object.assign(new Error('not a regular file'), { code: 'EISDIR' });
    bytes = readFileSync(file);
  } catch (error) {
    const code = (error as { code?: string }).code;
    const reason = code === 'ENOENT' ? 'no such file' : code === 'EACCES' ? 'permission denied' : code === 'EISDIR' ? 'it is a folder' : (error as Error).message;
    process.stderr.write(`slopebreak: cannot read ${file}: ${reason}; check the path\n`);
    return null;
  }
  const outcome = readPickTable(bytes);
  if (!outcome.ok) {
    process.stderr.write(`slopebreak: ${file} was refused (${outcome.problems.length} problem(s)); nothing was interpreted:\n`);
    for (const problem of outcome.problems) process.stderr.write(`  ${file}: ${formatProblem(problem)}\n`);
    return null;
  }
  for (const warning of outcome.warnings) process.stderr.write(`slopebreak: note: ${file}: ${formatProblem(warning)}\n`);
  return outcome.value;
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
      case 'pick':
        return runPick(rest);
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
