/**
 * Gather files named on the command line, read and picked. SEG-2 files and SEG-Y files up to
 * `STREAM_ABOVE_BYTES` are read whole; a larger SEG-Y is read one trace at a time through a file
 * descriptor (server/gather-file.ts) and picked shot by shot, so a file of many gigabytes needs
 * memory for one shot only. Either way the picks are the same (lib/gathers/pick-gathers.ts).
 */
import { closeSync, openSync, readFileSync, readSync, statSync } from 'node:fs';
import { basename } from 'node:path';
import { GATHER_SNIFF_BYTES, identifyGather, readGather } from '../lib/gathers/formats.js';
import type { GatherTrace } from '../lib/gathers/gather.js';
import { fileStemOf, pickGather, pickShotOutcome } from '../lib/gathers/pick-gathers.js';
import { shotPicks } from '../lib/gathers/gather-picks.js';
import { completenessWarnings, placeShot, shotKeyOf, shotRuns, type GeometryCorrection } from '../lib/gathers/shot-gathers.js';
import { openSegy } from '../lib/gathers/segy/index.js';
import type { PickingOptions } from '../lib/picking/index.js';
import type { Pick } from '../lib/picks/types.js';
import type { Problem } from '../lib/problems.js';
import { openFileByteSource } from './gather-file.js';

/** SEG-Y files larger than this are streamed trace by trace: 256 MiB. */
export const STREAM_ABOVE_BYTES = 256 * 2 ** 20;

/** One file's shots as picked: names and counts (the samples are not kept). */
export interface PickedFileShot {
  readonly shot: string;
  readonly traceCount: number;
  readonly pickCount: number;
  readonly lowConfidence: number;
  readonly rejected: number;
}

export type PickedFile =
  | { readonly ok: true; readonly format: string; readonly shots: readonly PickedFileShot[]; readonly picks: readonly Pick[]; readonly warnings: readonly Problem[] }
  | { readonly ok: false; readonly problems: readonly Problem[] };

function refused(message: string, fix: string): PickedFile {
  return { ok: false, problems: [{ code: 'gather-unreadable', severity: 'error', line: 0, column: null, message, fix }] };
}

function leadingBytes(path: string): Uint8Array {
  const fd = openSync(path, 'r');
  try {
    const head = new Uint8Array(GATHER_SNIFF_BYTES);
    const read = readSync(fd, head, 0, head.length, 0);
    return head.subarray(0, read);
  } finally {
    closeSync(fd);
  }
}

function counted(shot: string, traceCount: number, firstBreaks: readonly { rejected: boolean; lowConfidence: boolean; time: number | null }[], picks: number): PickedFileShot {
  return {
    shot, traceCount, pickCount: picks,
    lowConfidence: firstBreaks.filter((pick) => !pick.rejected && pick.lowConfidence && pick.time !== null).length,
    rejected: firstBreaks.filter((pick) => pick.rejected || pick.time === null).length,
  };
}

/** Read and pick one gather file (any registered format). Never throws on a bad file. */
export function pickGatherPath(path: string, correction: GeometryCorrection, picking: Partial<PickingOptions>): PickedFile {
  let size: number;
  try {
    const stat = statSync(path);
    if (!stat.isFile()) return refused(`${path} is not a regular file`, 'give the path of a gather file');
    size = stat.size;
  } catch (error) {
    const code = (error as { code?: string }).code;
    return refused(`cannot read ${path}: ${code === 'ENOENT' ? 'no such file' : code === 'EACCES' ? 'permission denied' : (error as Error).message}`, 'check the path');
  }
  const identity = identifyGather(leadingBytes(path));
  if (!identity.ok) return refused(`${path} is neither SEG-2 nor SEG-Y (${identity.reasons.join('; ')})`, 'give SEG-2 or SEG-Y shot gathers as the recorder wrote them');
  const stem = fileStemOf(basename(path));
  if (identity.format.name === 'SEG-Y' && size > STREAM_ABOVE_BYTES) return streamSegy(path, stem, correction, picking);
  const read = readGather(new Uint8Array(readFileSync(path)));
  if (!read.ok) return read;
  const picked = pickGather(read.value, stem, correction, picking);
  if (!picked.ok) return picked;
  let line = 1;
  const picks: Pick[] = [];
  const shots = picked.shots.map((shot) => {
    const made = shotPicks(shot.gather, shot.firstBreaks, line);
    line += made.length;
    picks.push(...made);
    return counted(shot.gather.shot, shot.gather.traces.length, shot.firstBreaks, made.length);
  });
  return { ok: true, format: read.value.format, shots, picks, warnings: [...read.warnings, ...picked.warnings] };
}

/** A large SEG-Y: count its shots from the trace headers, then read, place and pick one shot at a time. */
function streamSegy(path: string, stem: string, correction: GeometryCorrection, picking: Partial<PickingOptions>): PickedFile {
  const source = openFileByteSource(path);
  try {
    const opened = openSegy(source);
    if (!opened.ok) return opened;
    const file = opened.value;
    let shotCount = 0;
    let previous: string | null = null;
    for (let index = 0; index < file.traceCount; index += 1) {
      const header = file.readTraceHeader(index);
      if (header === null) break;
      const lengths = header.coordinateUnits === 0 || header.coordinateUnits === 1;
      const key = shotKeyOf({
        fieldRecord: String(header.originalFieldRecordNumber),
        sourceStation: header.energySourcePointNumber === 0 ? null : String(header.energySourcePointNumber),
        sourceX: lengths ? header.sourceCoordinateX : null,
      });
      if (key !== previous) shotCount += 1;
      previous = key;
    }
    if (shotCount > 1 && (correction.shot !== undefined || correction.sourceX !== undefined)) {
      return refused(`${path} holds ${shotCount} shots, and a shot name or source position applies to one`, 'split the file by shot, or give only the receiver correction');
    }
    const warnings: Problem[] = [...opened.warnings];
    const failure: { problems: readonly Problem[] | null } = { problems: null };
    function* traces(): Generator<GatherTrace> {
      for (let index = 0; index < file.traceCount; index += 1) {
        const trace = file.readTrace(index);
        if (!trace.ok) {
          failure.problems = trace.problems;
          return;
        }
        warnings.push(...trace.warnings);
        yield trace.value;
      }
    }
    const shots: PickedFileShot[] = [];
    const picks: Pick[] = [];
    let shotNumber = 0;
    for (const run of shotRuns(traces())) {
      shotNumber += 1;
      const placed = placeShot(run, shotNumber, shotCount, stem, correction);
      if (!placed.ok) return placed;
      warnings.push(...placed.warnings);
      const outcome = pickShotOutcome(placed.value, picking);
      if (!outcome.ok) return outcome;
      const picked = outcome.value;
      const made = shotPicks(placed.value, picked.firstBreaks, picks.length + 1);
      picks.push(...made);
      shots.push(counted(placed.value.shot, placed.value.traces.length, picked.firstBreaks, made.length));
    }
    if (failure.problems !== null) return { ok: false, problems: failure.problems };
    warnings.push(...completenessWarnings('SEG-Y', (name) => String(file.binaryHeader[name as keyof typeof file.binaryHeader] ?? ''), file.traceCount, shots));
    return { ok: true, format: 'SEG-Y', shots, picks, warnings: dedupe(warnings) };
  } finally {
    source.close();
  }
}

/** One warning per code and message (a header fault repeated on every trace is said once). */
function dedupe(warnings: readonly Problem[]): Problem[] {
  const seen = new Set<string>();
  return warnings.filter((warning) => {
    const key = `${warning.code}\u0000${warning.message}`;
    if (seen.has(key)) return false;
    seen.add(key);
    return true;
  });
}
