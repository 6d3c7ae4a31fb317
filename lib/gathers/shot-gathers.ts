/**
 * Shot gathers out of a gather file: the traces grouped into shots, each trace placed on the line.
 *
 * A SEG-2 file is usually one shot; a SEG-Y file may hold many. Traces are grouped in file order:
 * a new shot starts where the shot key changes — the field record number (SEG-Y bytes 9–12) when
 * the file sets it, else the source station, else the source position. Grouping consecutive runs
 * (not a global sort) lets a file of many gigabytes be split while it is read trace by trace.
 *
 * Geometry comes from the headers (source and receiver x, elevations, SEG-Y offsets) and can be
 * supplied or corrected by the user with a {@link GeometryCorrection}: a source position, a first
 * receiver position and spacing (receivers in channel order), a shot name. A SEG-Y trace whose
 * coordinates are all zero but whose offset is set is placed at source x + offset (signed, as the
 * standard allows for split spreads). A trace that still has no receiver position refuses the shot
 * with a message saying which correction to give.
 */
import type { Problem } from '../problems.js';
import type { Gather, GatherTrace } from './gather.js';

/** Corrections the user gives to the geometry the headers carry. Every field is optional. */
export interface GeometryCorrection {
  /** Shot name to use instead of the one derived from the file (one shot only). */
  readonly shot?: string;
  /** Source position along the line, metres (one shot only). */
  readonly sourceX?: number;
  /** Position of the first trace's receiver, metres; with `receiverSpacing`, every receiver's. */
  readonly firstReceiverX?: number;
  /** Distance between consecutive traces' receivers, metres (negative when they run backwards). */
  readonly receiverSpacing?: number;
}

/** Longest shot name kept (the pick table and the store take up to 200 characters). */
export const MAX_SHOT_NAME = 200;

/** One trace placed on the line. */
export interface PlacedTrace {
  readonly trace: GatherTrace;
  /** 0-based position of the trace in its file. */
  readonly fileTraceIndex: number;
  /** Receiver identifier carried by the pick: the receiver station, else `ch<channel>`. */
  readonly receiver: string;
  readonly receiverX: number;
  readonly receiverElevation: number | null;
  /** receiverX − sourceX, metres. */
  readonly offset: number;
}

export interface ShotGather {
  /** Shot identifier for the pick set. */
  readonly shot: string;
  /** 1-based position of the shot among the file's shots. */
  readonly shotNumber: number;
  readonly sourceX: number;
  readonly sourceElevation: number | null;
  /** Source depth below the surface, metres, when the file gives one (SEG-Y bytes 49–52). */
  readonly sourceDepth: number | null;
  readonly traces: readonly PlacedTrace[];
}

export type ShotGathersOutcome =
  | { readonly ok: true; readonly value: readonly ShotGather[]; readonly warnings: readonly Problem[] }
  | { readonly ok: false; readonly problems: readonly Problem[] };

/** The header values a shot key is made of (from a trace, or from a SEG-Y trace header alone). */
export interface ShotKeyParts {
  readonly fieldRecord: string | undefined;
  readonly sourceStation: string | null;
  readonly sourceX: number | null;
}

/** The key that separates one shot's traces from the next in file order. */
export function shotKeyOf(parts: ShotKeyParts): string {
  if (parts.fieldRecord !== undefined && parts.fieldRecord !== '0') return `record ${parts.fieldRecord}`;
  if (parts.sourceStation !== null) return `station ${parts.sourceStation}`;
  if (parts.sourceX !== null) return `source ${parts.sourceX}`;
  return 'single shot';
}

export function shotKey(trace: GatherTrace): string {
  return shotKeyOf({ fieldRecord: trace.metadata.get('originalFieldRecordNumber'), sourceStation: trace.sourceStation, sourceX: trace.source?.x ?? null });
}

/** Consecutive runs of traces with one shot key, with each trace's position in the file. */
export function* shotRuns(traces: Iterable<GatherTrace>): Generator<{ readonly key: string; readonly traces: readonly { trace: GatherTrace; index: number }[] }> {
  let run: { trace: GatherTrace; index: number }[] = [];
  let key: string | null = null;
  let index = 0;
  for (const trace of traces) {
    const next = shotKey(trace);
    if (key !== null && next !== key) {
      yield { key, traces: run };
      run = [];
    }
    key = next;
    run.push({ trace, index });
    index += 1;
  }
  if (key !== null) yield { key, traces: run };
}

/** SEG-Y offset (bytes 37–40) when the reader gave it, else null. */
function headerOffset(trace: GatherTrace): number | null {
  const offset = (trace as GatherTrace & { readonly offset?: number }).offset;
  return typeof offset === 'number' && Number.isFinite(offset) ? offset : null;
}

const nonZero = (value: number | null | undefined): value is number => value !== null && value !== undefined && value !== 0;

function problem(code: string, message: string, fix: string, severity: 'error' | 'warning' = 'error'): Problem {
  return { code, severity, line: 0, column: null, message, fix };
}

function channelOf(trace: GatherTrace, runIndex: number): string {
  const channel = trace.metadata.get('CHANNEL_NUMBER') ?? trace.metadata.get('traceNumberWithinOriginalFieldRecord');
  return channel !== undefined && /^\d+$/.test(channel.trim()) && channel.trim() !== '0' ? channel.trim() : String(runIndex + 1);
}

/** The shot's name: the correction's, else the source station, else the field record, else the file name. */
function shotName(first: GatherTrace, key: string, fileStem: string, shotCount: number, shotNumber: number): string {
  if (shotCount === 1 && first.sourceStation === null) return fileStem;
  if (first.sourceStation !== null) return `SP${first.sourceStation}`;
  if (key.startsWith('record ')) return `FFID${key.slice('record '.length)}`;
  return `${fileStem}-${shotNumber}`;
}

/**
 * Place one run of traces (one shot) on the line. `shotCount` is how many shots the file holds
 * (needed to name a lone shot after its file and to refuse one-shot corrections on several shots).
 */
export function placeShot(
  run: { readonly key: string; readonly traces: readonly { trace: GatherTrace; index: number }[] },
  shotNumber: number,
  shotCount: number,
  fileStem: string,
  correction: GeometryCorrection = {},
): { ok: true; value: ShotGather; warnings: Problem[] } | { ok: false; problems: Problem[] } {
  const first = run.traces[0]!.trace;
  const warnings: Problem[] = [];
  const label = shotCount === 1 ? 'the shot' : `shot ${shotNumber} (${run.key})`;
  // Coordinates that are all zero while offsets are set mean "positions not filled in".
  const positionsBlank = run.traces.every(({ trace }) => (trace.source?.x ?? 0) === 0 && (trace.receiver?.x ?? 0) === 0);
  const offsetsGiven = run.traces.some(({ trace }) => nonZero(headerOffset(trace)));
  const sourceX = correction.sourceX ?? (positionsBlank ? 0 : first.source?.x ?? null);
  if (sourceX === null) {
    return { ok: false, problems: [problem('gather-source-position-missing', `${label} gives no source position`, 'give the source position along the line (the source-x correction)')] };
  }
  if (correction.sourceX === undefined && positionsBlank && offsetsGiven && correction.firstReceiverX === undefined) {
    warnings.push(problem('gather-source-position-assumed', `${label}'s headers give offsets but no positions: the source was put at 0 m and each receiver at its offset`,
      'give the source position along the line (the source-x correction) to place the shot on the survey line', 'warning'));
  }
  const spacing = correction.receiverSpacing;
  if ((correction.firstReceiverX === undefined) !== (spacing === undefined)) {
    return { ok: false, problems: [problem('gather-receiver-correction-incomplete', 'a receiver correction needs both the first receiver position and the receiver spacing', 'give both, or neither')] };
  }
  const traces: PlacedTrace[] = [];
  for (const [runIndex, { trace, index }] of run.traces.entries()) {
    let receiverX: number | null;
    if (correction.firstReceiverX !== undefined && spacing !== undefined) receiverX = correction.firstReceiverX + runIndex * spacing;
    else if (positionsBlank) receiverX = offsetsGiven ? sourceX + (headerOffset(trace) ?? 0) : null;
    else receiverX = trace.receiver?.x ?? null;
    if (receiverX === null || !Number.isFinite(receiverX)) {
      return {
        ok: false,
        problems: [problem('gather-receiver-position-missing', `trace ${index + 1} of ${label} gives no receiver position (no coordinates and no offset in its header)`,
          'give the first receiver position and the receiver spacing (receivers in trace order)')],
      };
    }
    const elevation = trace.receiver?.elevation ?? null;
    traces.push({
      trace, fileTraceIndex: index,
      receiver: trace.receiverStation ?? `ch${channelOf(trace, runIndex)}`,
      receiverX, receiverElevation: elevation, offset: receiverX - sourceX,
    });
  }
  // Elevations that are all zero are "not given" in SEG-Y; keep them only when one is not zero.
  const elevationsGiven = traces.some((placed) => nonZero(placed.receiverElevation)) || nonZero(first.source?.elevation);
  const shot: ShotGather = {
    shot: correction.shot ?? shotName(first, run.key, fileStem, shotCount, shotNumber),
    shotNumber,
    sourceX,
    sourceElevation: elevationsGiven ? first.source?.elevation ?? null : null,
    sourceDepth: nonZero((first as GatherTrace & { sourceDepth?: number | null }).sourceDepth) ? (first as GatherTrace & { sourceDepth: number }).sourceDepth : null,
    traces: elevationsGiven ? traces : traces.map((placed) => ({ ...placed, receiverElevation: null })),
  };
  const receivers = new Set(traces.map((placed) => placed.receiver));
  if (receivers.size < traces.length) {
    return { ok: false, problems: [problem('gather-receiver-repeated', `${label} has ${traces.length} traces but only ${receivers.size} distinct receiver names`, 'check the channel and receiver station numbers in the headers')] };
  }
  return { ok: true, value: shot, warnings };
}

/**
 * Warnings when a SEG-Y file holds fewer traces than its binary header declares — the total
 * (rev 2, bytes 3513–3520) or the traces per ensemble (bytes 3213–3214) — as a file cut short
 * between two traces does: the reader cannot tell such a file from a shorter one by its length.
 */
export function completenessWarnings(
  format: Gather['format'],
  header: (name: string) => string | undefined,
  traceCount: number,
  shots: readonly { readonly shot: string; readonly traceCount: number }[],
): Problem[] {
  if (format !== 'SEG-Y') return [];
  const declared = (name: string) => {
    const value = Number(header(name) ?? '0');
    return Number.isSafeInteger(value) && value > 0 ? value : null;
  };
  const warnings: Problem[] = [];
  const inFile = declared('numberOfTracesInFile');
  if (inFile !== null && traceCount < inFile) {
    warnings.push(problem('gather-traces-missing', `the file holds ${traceCount} traces, and its binary header (bytes 3513–3520) declares ${inFile}: it may have been cut short`,
      'copy the file again from the recorder or the original medium', 'warning'));
  }
  const perEnsemble = declared('dataTracesPerEnsemble');
  if (perEnsemble !== null) {
    for (const shot of shots) {
      if (shot.traceCount >= perEnsemble) continue;
      warnings.push(problem('gather-shot-incomplete', `shot ${JSON.stringify(shot.shot)} has ${shot.traceCount} traces, and the binary header (bytes 3213–3214) declares ${perEnsemble} per ensemble: traces may be missing (a file cut short, or channels left out)`,
        'check the file is complete; picks are made on the traces there are', 'warning'));
    }
  }
  return warnings;
}

/** Every shot of a gather, placed on the line. `fileStem` names a file's lone shot. */
export function shotGathers(gather: Gather, fileStem: string, correction: GeometryCorrection = {}): ShotGathersOutcome {
  const runs = [...shotRuns(gather.traces)];
  if (runs.length > 1 && (correction.shot !== undefined || correction.sourceX !== undefined)) {
    return {
      ok: false,
      problems: [problem('gather-correction-ambiguous', `the file holds ${runs.length} shots, and a shot name or source position applies to one`,
        'split the file by shot, or correct the headers, or give only the receiver correction')],
    };
  }
  const shots: ShotGather[] = [];
  const warnings: Problem[] = [];
  for (const [index, run] of runs.entries()) {
    const placed = placeShot(run, index + 1, runs.length, fileStem, correction);
    if (!placed.ok) return placed;
    shots.push(placed.value);
    warnings.push(...placed.warnings);
  }
  warnings.push(...completenessWarnings(gather.format, (name) => gather.metadata.get(name), gather.traces.length,
    shots.map((shot) => ({ shot: shot.shot, traceCount: shot.traces.length }))));
  const names = new Set<string>();
  for (const shot of shots) {
    if (shot.shot.trim() === '' || shot.shot.length > MAX_SHOT_NAME) {
      return { ok: false, problems: [problem('gather-shot-name-invalid', `shot ${shots.indexOf(shot) + 1}'s name ${JSON.stringify(shot.shot.slice(0, 40))}${shot.shot.length > 40 ? '…' : ''} is ${shot.shot.trim() === '' ? 'empty' : `${shot.shot.length} characters long`}; a shot name has 1 to ${MAX_SHOT_NAME} characters`,
        'name the shot (the shot-name correction), or correct the source station in the headers')] };
    }
    if (names.has(shot.shot)) {
      return { ok: false, problems: [problem('gather-shot-repeated', `shot ${JSON.stringify(shot.shot)} appears twice in the file, separated by other shots`, 'keep each shot\'s traces together in the file')] };
    }
    names.add(shot.shot);
  }
  return { ok: true, value: shots, warnings };
}
