/**
 * Shot gathers of a survey: list them, show one (its traces prepared for display, with what the
 * picker made of each and the current pick), and edit picks by hand. Every hand edit request makes
 * the survey's next pick set — a new revision of its picks, the earlier ones kept — and raises the
 * survey's version; the client then interprets again as after a branch edit.
 */
import { Router } from 'express';
import * as z from 'zod';
import { conditionTrace } from '../../lib/picking/index.js';
import { pickSetOf } from '../../lib/gathers/gather-picks.js';
import { applyHandPicks, handPickSigma, type HandPick } from '../../lib/picks/hand-picks.js';
import type { Pick, PickSet } from '../../lib/picks/types.js';
import { ApiError, parseRequest } from '../errors.js';
import { storedShot, type StoredGatherSummary } from '../gather-uploads.js';
import type { ShotGatherRecord, SurveyStore } from '../storage/survey-store.js';
import { expectedVersion, problemsError, StoredId, surveyId, versionTag } from './common.js';
import type { RouteContext } from './context.js';
import { currentPicks } from './current-picks.js';

/** Gather ids: `<upload id>.<shot number>`. */
const GatherId = z.string().regex(/^[A-Za-z0-9_-]{1,64}\.[1-9][0-9]{0,5}$/, 'a gather id is an upload id, a dot and a shot number, as the gather list gives it');
const GatherParams = z.strictObject({ id: StoredId, gatherId: GatherId });

/** Most displayed samples per trace by default, and the most a client may ask for. */
export const DISPLAY_SAMPLES = 1500;
const MAX_DISPLAY_SAMPLES = 8000;

const DisplayQuery = z.strictObject({
  samples: z.string().regex(/^[1-9][0-9]{1,4}$/, 'a whole number of samples from 10').transform(Number)
    .refine((value) => value <= MAX_DISPLAY_SAMPLES, `at most ${MAX_DISPLAY_SAMPLES} samples per trace`).optional(),
});

/** Most hand edits in one request. */
export const MAX_PICK_EDITS = 5000;
const Seconds = z.number().finite().min(0, 'a pick time is at or after the shot (≥ 0 s)');
export const PickEditsBody = z.strictObject({
  edits: z.array(z.union([
    z.strictObject({ gatherId: GatherId, traceIndex: z.number().int().min(0), time: Seconds }),
    z.strictObject({ gatherId: GatherId, traceIndex: z.number().int().min(0), remove: z.literal(true) }),
  ])).min(1, 'send at least one pick edit').max(MAX_PICK_EDITS),
  version: z.number().int().min(1).optional(),
});

function summaryOf(record: ShotGatherRecord): StoredGatherSummary {
  return JSON.parse(record.summaryJson) as StoredGatherSummary;
}

/** The current pick set, or none when the survey has no pick set yet. */
function currentPickSet(store: SurveyStore, id: string): PickSet | null {
  return store.picksState(id) === null ? null : currentPicks(store, id).pickSet;
}

const pickKey = (shot: string, receiver: string | null, receiverX: number) => `${shot}\u0000${receiver ?? ''}\u0000${receiverX}`;

function gatherSummaryJson(record: ShotGatherRecord, summary: StoredGatherSummary, picks: ReadonlyMap<string, number>) {
  return {
    id: record.id, shot: summary.shot, fileName: summary.fileName, format: summary.format,
    traceCount: summary.traces.length, sampleCount: summary.sampleCount, sampleInterval: summary.sampleInterval,
    sourceX: summary.sourceX,
    pickCount: summary.traces.filter((trace) => picks.has(pickKey(summary.shot, trace.receiver, trace.receiverX))).length,
  };
}

function pickIndexes(pickSet: PickSet | null): Map<string, number> {
  const indexes = new Map<string, number>();
  pickSet?.picks.forEach((pick, index) => indexes.set(pickKey(pick.shot, pick.receiver, pick.receiverX), index));
  return indexes;
}

/** Most samples one display response carries over all traces (keeps it to a few MB of JSON). */
export const MAX_DISPLAY_POINTS = 2_000_000;

/**
 * One trace on the display's time axis: bin b covers [start + b·Δ, start + (b+1)·Δ); each bin
 * keeps the trace's sample of largest magnitude whose time falls in it (so an onset is never
 * thinned away), a bin outside the trace's record is 0, and the trace is scaled to at most 1 in
 * magnitude. The trace keeps its own first-sample time and interval.
 */
export function displaySamples(samples: ArrayLike<number>, delay: number, interval: number, start: number, step: number, bins: number): number[] {
  const shown = new Float64Array(bins);
  let peak = 0;
  for (let index = 0; index < samples.length; index += 1) {
    const bin = Math.floor((delay + index * interval - start) / step + 1e-9);
    if (bin < 0 || bin >= bins) continue;
    const value = samples[index]!;
    if (Math.abs(value) > Math.abs(shown[bin]!)) shown[bin] = value;
    peak = Math.max(peak, Math.abs(value));
  }
  return Array.from(shown, (value) => (peak > 0 ? Math.round((value / peak) * 1e4) / 1e4 : 0));
}

export function gatherRoutes(context: RouteContext): Router {
  const { store } = context;
  const router = Router();

  router.get('/api/surveys/:id/gathers', (request, response) => {
    const id = surveyId(request);
    const survey = store.getSurvey(id);
    const indexes = pickIndexes(currentPickSet(store, id));
    const gathers = store.listGathers(id).map((record) => gatherSummaryJson(record, summaryOf(record), indexes));
    response.set('ETag', versionTag(survey.version)).json({ gathers });
  });

  router.get('/api/surveys/:id/gathers/:gatherId', (request, response) => {
    const params = parseRequest(GatherParams, request.params, 'params');
    const query = parseRequest(DisplayQuery, request.query, 'query');
    const survey = store.getSurvey(params.id);
    const record = store.getGather(params.id, params.gatherId);
    const summary = summaryOf(record);
    const pickSet = currentPickSet(store, params.id);
    const indexes = pickIndexes(pickSet);
    const shot = storedShot(store.getUpload(params.id, record.uploadId).bytes, summary);

    const picks = summary.traces.map((trace, traceIndex) => {
      const pickIndex = indexes.get(pickKey(summary.shot, trace.receiver, trace.receiverX)) ?? null;
      const current: Pick | null = pickIndex === null ? null : pickSet!.picks[pickIndex]!;
      const automatic = trace.automatic;
      if (current !== null) {
        const untouched = !automatic.rejected && automatic.time !== null && Math.abs(current.time - automatic.time) < 1e-9;
        return {
          traceIndex, pickIndex, time: current.time, sigma: current.sigma,
          confidence: untouched ? automatic.confidence : null, lowConfidence: untouched && automatic.lowConfidence,
          status: untouched ? 'automatic' as const : 'user' as const, note: untouched ? automatic.note : null,
        };
      }
      const status = automatic.time === null ? 'none' as const : automatic.rejected ? 'rejected' as const : 'removed' as const;
      return { traceIndex, pickIndex: null, time: automatic.time, sigma: automatic.sigma, confidence: automatic.confidence, lowConfidence: automatic.lowConfidence, status, note: automatic.note };
    });

    // One time axis for the display: the finest sample interval, from the earliest first sample
    // to the latest last one, cut after the latest pick where the record runs much longer, thinned
    // to the samples asked for and to MAX_DISPLAY_POINTS over the gather.
    let interval = Number.POSITIVE_INFINITY;
    let start = Number.POSITIVE_INFINITY;
    let recordEnd = Number.NEGATIVE_INFINITY;
    for (const { trace } of shot.traces) {
      interval = Math.min(interval, trace.sampleInterval);
      start = Math.min(start, trace.delay);
      recordEnd = Math.max(recordEnd, trace.delay + trace.samples.length * trace.sampleInterval);
    }
    let latestPick = 0;
    for (const pick of picks) latestPick = Math.max(latestPick, pick.time ?? 0);
    const end = latestPick > start ? Math.min(recordEnd, Math.max(latestPick * 2 - start, latestPick + 100 * interval)) : recordEnd;
    const recorded = Math.max(1, Math.round((end - start) / interval));
    const most = Math.max(10, Math.min(query.samples ?? DISPLAY_SAMPLES, Math.floor(MAX_DISPLAY_POINTS / shot.traces.length)));
    const stepCount = Math.max(1, Math.ceil(recorded / most));
    const step = interval * stepCount;
    const bins = Math.max(1, Math.ceil(recorded / stepCount));
    const traces = shot.traces.map((placed, traceIndex) => {
      const conditioned = conditionTrace({ samples: placed.trace.samples, sampleInterval: placed.trace.sampleInterval, delay: placed.trace.delay, offset: placed.offset }, summary.picking);
      return { traceIndex, receiver: placed.receiver, receiverX: placed.receiverX, offset: placed.offset, samples: displaySamples(conditioned, placed.trace.delay, placed.trace.sampleInterval, start, step, bins) };
    });
    response.set('ETag', versionTag(survey.version)).json({
      gather: gatherSummaryJson(record, summary, indexes),
      version: survey.version,
      picksState: store.picksState(params.id),
      startTime: start,
      sampleInterval: step,
      traces,
      picks,
    });
  });

  router.post('/api/surveys/:id/pick-edits', (request, response) => {
    const id = surveyId(request);
    const body = parseRequest(PickEditsBody, request.body ?? {}, 'body');
    const version = expectedVersion(request, body.version);
    const records = new Map<string, StoredGatherSummary>();
    const handPicks: HandPick[] = body.edits.map((edit, index) => {
      let summary = records.get(edit.gatherId);
      if (summary === undefined) {
        summary = summaryOf(store.getGather(id, edit.gatherId));
        records.set(edit.gatherId, summary);
      }
      const trace = summary.traces[edit.traceIndex];
      if (trace === undefined) {
        throw new ApiError({
          code: 'pick-edit-trace-unknown', status: 422,
          message: `edit ${index + 1}: gather ${edit.gatherId} has ${summary.traces.length} traces (0 to ${summary.traces.length - 1}), not trace ${edit.traceIndex}; nothing was stored`,
          fix: 'take the trace index from the gather view', details: { editIndex: index },
        });
      }
      const first = Math.max(0, trace.delay);
      const last = trace.delay + (trace.sampleCount - 1) * trace.sampleInterval;
      if ('time' in edit && (edit.time < first - 1e-9 || edit.time > last + 1e-9)) {
        throw new ApiError({
          code: 'pick-edit-time-outside', status: 422,
          message: `edit ${index + 1}: ${edit.time} s is outside trace ${edit.traceIndex}'s record (${first} to ${last} s after the shot); nothing was stored`,
          fix: `give the time in seconds after the shot (not milliseconds), within the record: ${first} to ${last} s`, details: { editIndex: index },
        });
      }
      const edited = {
        shot: summary.shot, receiver: trace.receiver, sourceX: summary.sourceX, receiverX: trace.receiverX,
        sourceElevation: null, receiverElevation: trace.receiverElevation, sourceDepth: null,
      };
      return 'remove' in edit ? { trace: edited, remove: true } : { trace: edited, time: edit.time, sigma: handPickSigma(trace.sampleInterval) };
    });
    const current = currentPicks(store, id).pickSet;
    if (current.coordinateSystem !== 'line') {
      throw new ApiError({
        code: 'pick-edits-not-on-line', status: 409,
        message: 'the survey\'s current picks are placed by latitude and longitude (a pick table uploaded after the gathers), and gather picks lie along the line; nothing was stored',
        fix: 'upload the gathers again to make their picks current, or edit the pick table',
      });
    }
    // Each edited shot's current picks must be this gather's: a later pick table may hold a shot
    // of the same name recorded elsewhere.
    for (const [gatherId, summary] of records) {
      const traces = new Set(summary.traces.map((trace) => `${trace.receiver}\u0000${trace.receiverX}`));
      const ofShot = current.picks.filter((pick) => pick.shot === summary.shot);
      if (ofShot.some((pick) => !traces.has(`${pick.receiver ?? ''}\u0000${pick.receiverX}`))) {
        throw new ApiError({
          code: 'pick-edits-gather-not-current', status: 409,
          message: `the survey's current picks of shot ${JSON.stringify(summary.shot)} do not all come from gather ${gatherId} (a later upload replaced them); nothing was stored`,
          fix: 'upload that gather again to make its picks current, or edit the picks where they came from',
        });
      }
    }
    // A placed pick takes its shot's source elevation and depth from the shot's other picks.
    const shotTemplate = new Map(current.picks.map((pick) => [pick.shot, pick] as const));
    const filled = handPicks.map((edit) => {
      const template = shotTemplate.get(edit.trace.shot);
      return template === undefined ? edit : { ...edit, trace: { ...edit.trace, sourceElevation: template.sourceElevation, sourceDepth: template.sourceDepth } };
    });
    const { pickSet, warnings } = pickSetOf(applyHandPicks(current.picks, filled), { base: current });
    if (pickSet.picks.length === 0) throw problemsError('pick-edits-refused', 'the pick edits', warnings.map((warning) => ({ ...warning, severity: 'error' as const })));
    const stored = store.addPickSet(id, JSON.stringify(pickSet), version);
    response.status(201).set('ETag', versionTag(stored.version)).json({
      version: stored.version, pickCount: pickSet.picks.length, picksState: store.picksState(id), warnings,
    });
  });

  return router;
}
