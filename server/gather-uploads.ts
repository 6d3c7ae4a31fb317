/**
 * Shot gathers arriving at the service: the geometry corrections and picking options an upload may
 * carry (form fields or query parameters), the summary stored with each shot (what the picker made
 * of every trace, so the gather view can show rejected candidates and confidences without
 * re-picking), and the pick set the upload makes.
 */
import * as z from 'zod';
import { readGather } from '../lib/gathers/formats.js';
import type { GatherFormatName } from '../lib/gathers/formats.js';
import { fileStemOf, mergeShotPicks, pickGather, type PickedShot } from '../lib/gathers/pick-gathers.js';
import type { GeometryCorrection, ShotGather } from '../lib/gathers/shot-gathers.js';
import { shotGathers } from '../lib/gathers/shot-gathers.js';
import { DEFAULT_PICKING_OPTIONS, type PickingOptions, type TracePick } from '../lib/picking/index.js';
import type { Pick, PickSet } from '../lib/picks/types.js';
import type { Problem } from '../lib/problems.js';
import { ApiError, parseRequest } from './errors.js';
import { problemsError } from './routes/common.js';
import { sanitiseFileName, type ReceivedFile } from './uploads.js';

/** A number sent as a form field or query parameter (text), or as JSON. */
const Metres = z.union([z.number(), z.string().trim().regex(/^-?\d+(\.\d+)?$/, 'a number of metres such as 12.5').transform(Number)])
  .refine((value) => Number.isFinite(value) && Math.abs(value) <= 1e7, 'a position within 10,000 km');
const Positive = (what: string) => z.union([z.number(), z.string().trim().regex(/^\d+(\.\d+)?$/, what).transform(Number)])
  .refine((value) => Number.isFinite(value) && value > 0 && value <= 1e6, `${what}, more than 0 and at most 1,000,000`);
const Flag = z.union([z.boolean(), z.enum(['true', 'false']).transform((text) => text === 'true')]);

/** What a gather upload may say besides its files (all optional). Frequencies Hz, times s, positions m. */
export const GatherUploadFields = z.strictObject({
  shot: z.string().trim().min(1).max(200).optional(),
  sourceX: Metres.optional(),
  firstReceiverX: Metres.optional(),
  receiverSpacing: Metres.refine((value) => value !== 0, 'a receiver spacing other than 0').optional(),
  bandLow: Positive('a low corner in Hz').optional(),
  bandHigh: Positive('a high corner in Hz').optional(),
  agcWindow: Positive('an AGC window in seconds').optional(),
  normalise: Flag.optional(),
  estimator: z.enum(['sta-lta', 'energy-ratio']).optional(),
  consistency: Flag.optional(),
});
export type GatherUploadFields = z.infer<typeof GatherUploadFields>;

/** The fields split into a geometry correction and picking options (defaults filled in). */
export function uploadSettings(fields: GatherUploadFields): { correction: GeometryCorrection; picking: PickingOptions } {
  if ((fields.bandLow === undefined) !== (fields.bandHigh === undefined)) {
    throw new ApiError({
      code: 'band-pass-incomplete', status: 422,
      message: 'a band-pass filter needs both corners, bandLow and bandHigh, and the upload gives one',
      fix: 'give both corners in Hz (e.g. bandLow=20 and bandHigh=250), or neither',
    });
  }
  if (fields.bandLow !== undefined && fields.bandHigh !== undefined && fields.bandLow >= fields.bandHigh) {
    throw new ApiError({
      code: 'band-pass-reversed', status: 422,
      message: `the band-pass low corner ${fields.bandLow} Hz is not below the high corner ${fields.bandHigh} Hz`,
      fix: 'give the lower corner as bandLow and the higher as bandHigh',
    });
  }
  const correction: GeometryCorrection = {
    ...(fields.shot !== undefined ? { shot: fields.shot } : {}),
    ...(fields.sourceX !== undefined ? { sourceX: fields.sourceX } : {}),
    ...(fields.firstReceiverX !== undefined ? { firstReceiverX: fields.firstReceiverX } : {}),
    ...(fields.receiverSpacing !== undefined ? { receiverSpacing: fields.receiverSpacing } : {}),
  };
  const picking: PickingOptions = {
    ...DEFAULT_PICKING_OPTIONS,
    ...(fields.bandLow !== undefined && fields.bandHigh !== undefined ? { bandPass: { low: fields.bandLow, high: fields.bandHigh } } : {}),
    ...(fields.agcWindow !== undefined ? { gain: { window: fields.agcWindow } } : {}),
    ...(fields.normalise !== undefined ? { normalise: fields.normalise } : {}),
    ...(fields.estimator !== undefined ? { estimator: fields.estimator } : {}),
    ...(fields.consistency !== undefined ? { consistency: fields.consistency } : {}),
  };
  return { correction, picking };
}

/** The fields of an upload request: multipart form fields, else query parameters. */
export function gatherUploadFields(body: unknown, query: unknown): GatherUploadFields {
  const fromBody = body !== null && typeof body === 'object' && !Buffer.isBuffer(body) ? body : {};
  const source = Object.keys(fromBody).length > 0 ? fromBody : query ?? {};
  return parseRequest(GatherUploadFields, source, Object.keys(fromBody).length > 0 ? 'body' : 'query');
}

/** What the picker made of one trace, as stored (its position is the trace's place in the list). */
export type StoredFirstBreak = Omit<TracePick, 'traceIndex'>;

/** Everything stored with one shot gather besides its file's bytes. */
export interface StoredGatherSummary {
  readonly fileName: string;
  readonly format: GatherFormatName;
  readonly shot: string;
  readonly shotNumber: number;
  readonly sourceX: number;
  readonly sampleInterval: number;
  readonly sampleCount: number;
  /** Time of the last sample of the longest-reaching trace after the shot, s. */
  readonly recordEnd: number;
  /** The correction and picking options it was read and picked with (re-applied for display). */
  readonly correction: GeometryCorrection;
  readonly picking: PickingOptions;
  readonly traces: readonly {
    readonly receiver: string;
    readonly receiverX: number;
    readonly receiverElevation: number | null;
    readonly offset: number;
    /** The trace's own time axis: first sample (s after the shot), interval (s) and sample count. */
    readonly delay: number;
    readonly sampleInterval: number;
    readonly sampleCount: number;
    readonly automatic: StoredFirstBreak;
  }[];
}

function summaryOf(fileName: string, format: GatherFormatName, picked: PickedShot, correction: GeometryCorrection, picking: PickingOptions): StoredGatherSummary {
  const gather = picked.gather;
  return {
    fileName, format, shot: gather.shot, shotNumber: gather.shotNumber, sourceX: gather.sourceX,
    sampleInterval: gather.traces[0]!.trace.sampleInterval,
    sampleCount: gather.traces.reduce((most, placed) => Math.max(most, placed.trace.samples.length), 0),
    recordEnd: gather.traces.reduce((latest, placed) => Math.max(latest, placed.trace.delay + (placed.trace.samples.length - 1) * placed.trace.sampleInterval), Number.NEGATIVE_INFINITY),
    correction, picking,
    traces: gather.traces.map((placed, index) => {
      const pick = picked.firstBreaks[index]!;
      return {
        receiver: placed.receiver, receiverX: placed.receiverX, receiverElevation: placed.receiverElevation, offset: placed.offset,
        delay: placed.trace.delay, sampleInterval: placed.trace.sampleInterval, sampleCount: placed.trace.samples.length,
        automatic: { time: pick.time, sigma: pick.sigma, confidence: pick.confidence, lowConfidence: pick.lowConfidence, rejected: pick.rejected, note: pick.note },
      };
    }),
  };
}

/** Files read and picked, ready to store. */
export interface PickedUpload {
  readonly files: {
    readonly file: ReceivedFile;
    readonly fileName: string;
    readonly mediaType: string;
    readonly shots: readonly { readonly shotNumber: number; readonly shot: string; readonly summary: StoredGatherSummary }[];
  }[];
  readonly pickSet: PickSet;
  readonly warnings: readonly Problem[];
}

/**
 * Reads and picks every file (422 naming the file on the first one refused), then merges their
 * picks into `earlierPicks` (shots picked now replace earlier picks of the same name). Nothing is
 * stored here.
 */
export function pickUploadedGathers(
  files: readonly { readonly file: ReceivedFile; readonly mediaType: string }[],
  fields: GatherUploadFields,
  earlierPicks: readonly Pick[],
  maxBytes: number,
): PickedUpload {
  const { correction, picking } = uploadSettings(fields);
  if (files.length > 1 && (correction.shot !== undefined || correction.sourceX !== undefined)) {
    throw new ApiError({
      code: 'gather-correction-ambiguous', status: 400,
      message: `a shot name or source position applies to one shot, and the upload has ${files.length} files`,
      fix: 'upload that gather on its own with its correction, or correct the files\' headers',
    });
  }
  const picked: PickedUpload['files'][number][] = [];
  const warnings: Problem[] = [];
  const allShots: PickedShot[] = [];
  const seen = new Map<string, string>();
  for (const { file, mediaType } of files) {
    const fileName = sanitiseFileName(file.fileName);
    const what = `the gather ${JSON.stringify(fileName)}`;
    const read = readGather(file.bytes, { maxBytes });
    if (!read.ok) throw problemsError('gather-refused', what, read.problems);
    const result = pickGather(read.value, fileStemOf(fileName), correction, picking);
    if (!result.ok) throw problemsError('gather-refused', what, result.problems);
    for (const warning of [...read.warnings, ...result.warnings]) warnings.push({ ...warning, message: `${fileName}: ${warning.message}` });
    for (const shot of result.shots) {
      const other = seen.get(shot.gather.shot);
      if (other !== undefined) {
        throw new ApiError({
          code: 'gather-shot-repeated', status: 422,
          message: `shot ${JSON.stringify(shot.gather.shot)} is in both ${JSON.stringify(other)} and ${JSON.stringify(fileName)}; nothing was stored`,
          fix: 'upload each shot once, or rename one with the shot field',
        });
      }
      seen.set(shot.gather.shot, fileName);
      allShots.push(shot);
    }
    picked.push({
      file, fileName, mediaType,
      shots: result.shots.map((shot) => ({ shotNumber: shot.gather.shotNumber, shot: shot.gather.shot, summary: summaryOf(fileName, read.value.format, shot, correction, picking) })),
    });
  }
  const merged = mergeShotPicks(earlierPicks, allShots);
  if (merged.usable.size === 0) {
    throw problemsError('gather-no-picks', 'the gather upload', merged.warnings.map((warning) => ({ ...warning, severity: 'error' as const })));
  }
  // A shot that gave too few picks is not stored as a gather: its earlier gather and picks stay current.
  const stored = picked.map((entry) => ({ ...entry, shots: entry.shots.filter((shot) => merged.usable.has(shot.shot)) }));
  return { files: stored, pickSet: merged.pickSet, warnings: [...warnings, ...merged.warnings] };
}

/** The shot of a stored gather file, placed again with the correction it was stored with. */
export function storedShot(bytes: Uint8Array, summary: StoredGatherSummary): ShotGather {
  const unreadable = (why: string) => new ApiError({
    code: 'gather-unreadable', status: 409,
    message: `the stored gather ${JSON.stringify(summary.fileName)} ${why} with this version of slopebreak`,
    fix: 'upload the gather again',
  });
  const read = readGather(bytes);
  if (!read.ok) throw unreadable(`no longer reads (${read.problems[0]?.message ?? 'refused'})`);
  const shots = shotGathers(read.value, fileStemOf(summary.fileName), summary.correction);
  if (!shots.ok) throw unreadable(`no longer splits into shots (${shots.problems[0]?.message ?? 'refused'})`);
  const shot = shots.value[summary.shotNumber - 1];
  if (shot === undefined) throw unreadable(`has no shot ${summary.shotNumber}`);
  return shot;
}
