/**
 * The reversed-profile results as table data: the reversed pairs (reciprocal times and their
 * check, plus-minus and GRM refractor velocities, the GRM's optimum XY and why), the plane dipping
 * layers under each pair of shots, and the forward check of the depth section (overall RMS, each
 * shot's RMS and mean, the receivers it fits worst). Pure: builds rows of text that
 * results-view.ts draws, for the workspace and the printable report alike.
 *
 * Meaning is carried by words, never by colour alone: a reciprocal-time misfit beyond its limit
 * and a shot the forward check flags are marked "exceeds" in the text of the row.
 */
import type { Interpretation, ResidualSummary, ReversedPairResult } from './api-types.js';
import { plain, withError } from './format.js';

/** One cell: its text, an optional tooltip, optional lines under it in small type. */
export interface Cell {
  readonly text: string;
  readonly details?: readonly string[];
  readonly title?: string;
  /** A branch chip drawn before the text (branch number). */
  readonly chip?: number;
  /** A number column (tabular figures). */
  readonly numeric?: boolean;
  /** Lines under the value that read badly when squeezed: the column keeps a minimum width. */
  readonly wide?: boolean;
  /** A word mark that the row needs attention ("exceeds"), drawn emphasised after the text. */
  readonly mark?: string;
}

export interface Row {
  /** Names the row for the page (a pair id, a shot id, a position). */
  readonly key: string;
  readonly cells: readonly Cell[];
  /** Sentences about this row, printed under it. */
  readonly notes: readonly string[];
  /** The row carries a mark (see `Cell.mark`). */
  readonly flagged: boolean;
}

export interface Table {
  readonly caption: string;
  readonly columns: readonly string[];
  readonly rows: readonly Row[];
  /** Lines printed under the table. */
  readonly footnotes: readonly string[];
}

/** The word that marks a check beyond its limit. */
export const EXCEEDS_MARK = 'exceeds';
/** How many receivers the forward-check block lists, worst first. */
export const WORST_RECEIVER_COUNT = 5;
/** Warning code of a shot the forward check misses by more than its picks allow (lib/checks/warning.ts). */
export const FORWARD_CHECK_MISFIT_CODE = 'forward-check-misfit';

/** A time to the resolution picks are read to: 0.01 ms, or 0.1 ms expressed in s. */
function time(value: number | null, result: Interpretation): string {
  if (value === null || !Number.isFinite(value)) return '—';
  return value.toFixed(result.units.time === 'ms' ? 2 : 4);
}

/** A signed time (mean residuals): "+0.66", "−0.38". */
function signedTime(value: number | null, result: Interpretation): string {
  if (value === null || !Number.isFinite(value)) return '—';
  const text = time(Math.abs(value), result);
  return Number(text) === 0 ? text : `${value > 0 ? '+' : '\u2212'}${text}`;
}

/** A position along the line. */
function position(value: number): string {
  return plain(value, 3);
}

/** "22.5–100 m" */
function span(range: readonly [number, number] | null, unit: string): string {
  return range === null ? 'none' : `${position(range[0])}\u2013${position(range[1])}\u202f${unit}`;
}

/** The layer a refractor (head-wave branch n, the top of layer n) is named by. */
export function refractorWords(layer: number): string {
  return `top of layer ${layer}`;
}

/**
 * A table without its refractor column when every row names the same refractor (the usual case
 * of one refractor), which the caption then names: fewer, wider columns on a printed page.
 */
export function withRefractorInCaption(table: Table, column: number, caption: (refractor: string) => string): Table {
  const first = table.rows[0]?.cells[column];
  if (first === undefined || !table.rows.every((row) => row.cells[column]?.text === first.text)) return table;
  return {
    ...table,
    caption: caption(first.text),
    columns: table.columns.filter((_, k) => k !== column),
    rows: table.rows.map((row) => ({ ...row, cells: row.cells.filter((_, k) => k !== column) })),
  };
}

// ---------------------------------------------------------------- reversed pairs

/** How a pair's reciprocal-time check came out: beyond its limit, within it, or not made (one time read). */
export type ReciprocalState = 'exceeds' | 'within' | 'not checked';

export function reciprocalState(pair: ReversedPairResult): ReciprocalState {
  const { misfit, exceeds } = pair.reciprocalTime;
  if (misfit === null || exceeds === null) return 'not checked';
  return exceeds ? 'exceeds' : 'within';
}

/** The two reciprocal times as read: ["S1-W at S1-E: 59.43", "S1-E at S1-W: 58.80"] (with how each was read when not a pick). */
export function reciprocalReadings(pair: ReversedPairResult, result: Interpretation): string[] {
  const { forwardAtReverseShot, reverseAtForwardShot, from } = pair.reciprocalTime;
  let next = 0;
  const reading = (value: number | null, at: string, of: string) => {
    if (value === null) return `${of} at ${at}: not recorded`;
    // `from` lists how each time that was read was read, in this order.
    const how = from[next] ?? 'pick';
    next += 1;
    return `${of} at ${at}: ${time(value, result)}${how === 'pick' ? '' : ` (from ${how})`}`;
  };
  return [reading(forwardAtReverseShot, pair.reverseShot, pair.forwardShot), reading(reverseAtForwardShot, pair.forwardShot, pair.reverseShot)];
}

function misfitCell(pair: ReversedPairResult, result: Interpretation): Cell {
  const { misfit, limit } = pair.reciprocalTime;
  const state = reciprocalState(pair);
  if (state === 'not checked') return { text: '—', details: ['not checked: one time only'], numeric: true };
  return {
    text: signedTime(misfit, result),
    details: [`limit ${time(limit, result)}`],
    numeric: true,
    ...(state === 'exceeds' ? { mark: EXCEEDS_MARK } : {}),
  };
}

function xyCell(pair: ReversedPairResult): Cell {
  const grm = pair.generalizedReciprocal;
  if (grm.optimumXY === null) return { text: '—', details: ['no optimum found'], numeric: true, ...(grm.reason ? { title: grm.reason } : {}) };
  const details = [
    grm.resolved === false ? 'not resolved by the data' : null,
    grm.planeLayerXY !== null ? `plane layers: ${plain(grm.planeLayerXY, 2)}` : null,
    grm.mismatch === true ? 'differs from the plane-layer value' : null,
  ].filter((text): text is string => text !== null);
  return {
    text: plain(grm.optimumXY, 3),
    numeric: true,
    ...(details.length > 0 ? { details } : {}),
    ...(grm.reason ? { title: grm.reason } : {}),
  };
}

/** How many receivers a velocity rests on, said only when it is not the pair's common receivers. */
function receiverDetails(count: number, common: number): Pick<Cell, 'details'> {
  return count === common ? {} : { details: [`from ${count} receiver${count === 1 ? '' : 's'}`] };
}

/**
 * The reversed pairs in the interpretation's order: pair and its common receivers, refractor,
 * reciprocal times as read and the value used ± SE, the misfit t_AB − t_BA against its limit
 * (marked when beyond), the plus-minus and GRM refractor velocities ± SE with their receiver
 * counts, and the GRM's optimum XY (its reason as the tooltip and as a footnote).
 */
export function reversedPairTable(result: Interpretation): Table {
  const { units } = result;
  const pairs = result.reversedPairs ?? [];
  const rows: Row[] = pairs.map((pair) => {
    const misfit = misfitCell(pair, result);
    return {
      key: pair.id,
      flagged: misfit.mark !== undefined,
      notes: [],
      cells: [
        {
          text: pair.id,
          details: [`${pair.commonReceivers} common receivers, ${span(pair.overlap, units.distance)}`, ...(pair.chosenBy === 'user' ? ['paired by hand'] : [])],
        },
        { text: refractorWords(pair.refractor), chip: pair.refractor },
        {
          text: withError(pair.reciprocalTime.value, pair.reciprocalTime.valueSE),
          details: reciprocalReadings(pair, result),
          numeric: true,
          wide: true,
        },
        misfit,
        {
          text: withError(pair.plusMinus.velocity, pair.plusMinus.velocitySE),
          ...receiverDetails(pair.plusMinus.receiverCount, pair.commonReceivers),
          numeric: true,
        },
        {
          text: withError(pair.generalizedReciprocal.velocity, pair.generalizedReciprocal.velocitySE),
          ...receiverDetails(pair.generalizedReciprocal.receiverCount, pair.commonReceivers),
          numeric: true,
        },
        xyCell(pair),
      ],
    };
  });
  const footnotes = pairs.length === 0 ? [] : [
    `Misfit: the forward shot's time at the reverse shot minus the reverse shot's time at the forward shot; "${EXCEEDS_MARK}" marks a pair whose two times differ by more than their picks allow, whose delay-time depths are unreliable until the cause is found.`,
    ...pairs
      .filter((pair) => pair.generalizedReciprocal.reason !== null)
      .map((pair) => `Optimum XY of ${pair.id}: ${pair.generalizedReciprocal.reason}.`),
  ];
  return withRefractorInCaption({
    caption: 'Reversed pairs (± one standard error)',
    columns: [
      'Pair (forward → reverse shot)',
      'Refractor',
      `Reciprocal time (${units.time})`,
      `Reciprocal-time misfit (${units.time})`,
      `Plus-minus velocity (${units.velocity})`,
      `GRM velocity (${units.velocity})`,
      `Optimum XY (${units.distance})`,
    ],
    rows,
    footnotes,
  }, 1, (refractor) => `Reversed pairs, refractor: ${refractor} (± one standard error)`);
}

// ---------------------------------------------------------------- seams

/**
 * The seams of `method`'s sections (every refractor it gives, by position): where the section
 * passes from one reversed pair to the next, and the depth step there (new pair minus old, mean
 * over the receivers both cover) ± SE, or why there is none.
 */
export function seamTable(result: Interpretation, method: string | null): Table {
  const { units } = result;
  const rows: Row[] = result.refractors
    .filter((refractor) => refractor.method === method)
    .flatMap((refractor) => (refractor.seams ?? []).map((seam) => ({ layer: refractor.interface + 1, seam })))
    .sort((left, right) => left.seam.x - right.seam.x || left.layer - right.layer)
    .map(({ layer, seam }) => ({
      key: `${layer}@${seam.x}`,
      flagged: false,
      notes: [],
      cells: [
        { text: position(seam.x), numeric: true },
        { text: refractorWords(layer), chip: layer },
        { text: seam.fromPair },
        { text: seam.toPair },
        seam.step === null
          ? { text: '—', details: ['no receiver in common'], numeric: true }
          : { text: `${seam.step >= 0 ? '+' : '\u2212'}${withError(Math.abs(seam.step), seam.stepSE)}`, details: [`over ${seam.commonReceivers} common receiver${seam.commonReceivers === 1 ? '' : 's'}`], numeric: true },
      ],
    }));
  return withRefractorInCaption({
    caption: 'Seams of the depth section',
    columns: [`Position (${units.distance})`, 'Refractor', 'From pair', 'To pair', `Depth step, new pair minus old (${units.distance})`],
    rows,
    footnotes: [],
  }, 1, (refractor) => `Seams of the depth section, refractor: ${refractor}`);
}

// ---------------------------------------------------------------- dipping layers

/** Dip in words: which way the interface goes down. */
function dipWords(dipDegrees: number, forwardShot: string, reverseShot: string): string {
  if (dipDegrees === 0) return 'level';
  return `down towards ${dipDegrees > 0 ? reverseShot : forwardShot}`;
}

/**
 * The plane dipping layers under each pair of shots, one row per pair and interface: true
 * velocity, dip (with which way it goes down), vertical depth under each shot, each ± SE; the
 * pair's notes under its last row.
 */
export function dippingLayerTable(result: Interpretation): Table {
  const { units } = result;
  const rows: Row[] = (result.dippingLayers ?? []).flatMap((entry) => {
    const id = `${entry.forwardShot} → ${entry.reverseShot}`;
    return entry.interfaces.map((layer, k): Row => ({
      key: `${id} #${layer.interface}`,
      flagged: false,
      notes: k === entry.interfaces.length - 1 ? entry.notes : [],
      cells: [
        { text: id, details: [`shots ${position(entry.spreadLength)}\u202f${units.distance} apart`] },
        { text: refractorWords(layer.interface + 1), chip: layer.interface + 1 },
        { text: withError(layer.trueVelocity, layer.trueVelocitySE), numeric: true },
        { text: withError(Math.abs(layer.dipDegrees), layer.dipDegreesSE), details: [dipWords(layer.dipDegrees, entry.forwardShot, entry.reverseShot)], numeric: true },
        { text: withError(layer.depthUnderForwardShot, layer.depthUnderForwardShotSE), details: [`under ${entry.forwardShot}`], numeric: true },
        { text: withError(layer.depthUnderReverseShot, layer.depthUnderReverseShotSE), details: [`under ${entry.reverseShot}`], numeric: true },
      ],
    }));
  });
  return withRefractorInCaption({
    caption: 'Dipping layers under each pair of shots (plane interfaces, ± one standard error)',
    columns: [
      'Pair (forward → reverse shot)',
      'Refractor',
      `True velocity (${units.velocity})`,
      'Dip (°)',
      `Depth under the forward shot (${units.distance})`,
      `Depth under the reverse shot (${units.distance})`,
    ],
    rows,
    footnotes: [],
  }, 1, (refractor) => `Dipping layers under each pair of shots, refractor: ${refractor} (plane interfaces, ± one standard error)`);
}

// ---------------------------------------------------------------- forward check

export interface ForwardCheckSummary {
  /** "1.85 ms over 570 picks", or null when no pick was compared. */
  readonly overall: string | null;
  readonly pickCount: number;
  /** What was computed through which section, and how. */
  readonly model: string;
  readonly grid: string;
  readonly perShot: Table;
  readonly worstReceivers: Table;
  readonly notes: readonly string[];
}

const residualCells = (entry: ResidualSummary, result: Interpretation): Cell[] => [
  { text: String(entry.pickCount), numeric: true },
  { text: time(entry.rms, result), numeric: true },
  { text: signedTime(entry.mean, result), numeric: true },
];

/**
 * The receivers the forward check fits worst: the `count` largest RMS (receivers without one left
 * out), ties broken by position along the line.
 */
export function worstReceivers<T extends ResidualSummary & { readonly receiverX: number }>(perReceiver: readonly T[], count = WORST_RECEIVER_COUNT): T[] {
  return perReceiver
    .filter((entry) => entry.rms !== null && Number.isFinite(entry.rms))
    .sort((left, right) => right.rms! - left.rms! || left.receiverX - right.receiverX)
    .slice(0, Math.max(0, count));
}

/**
 * The forward check in words and two tables (each shot; the worst receivers), or null when the
 * interpretation has none. A shot the engine warns about (code `forward-check-misfit`) is marked.
 */
export function forwardCheckSummary(result: Interpretation, count = WORST_RECEIVER_COUNT): ForwardCheckSummary | null {
  const check = result.forwardCheck;
  if (!check) return null;
  const { units } = result;
  const flaggedShots = new Set(result.warnings.filter((warning) => warning.code === FORWARD_CHECK_MISFIT_CODE && warning.shot !== undefined).map((warning) => warning.shot!));
  const pickCount = check.perShot.reduce((sum, entry) => sum + entry.pickCount, 0);
  const meanColumn = `Mean, observed \u2212 computed (${units.time})`;
  const worst = worstReceivers(check.perReceiver, count);
  return {
    overall: check.overallRms === null ? null : `${time(check.overallRms, result)}\u202f${units.time} over ${pickCount} picks`,
    pickCount,
    model: `Computed: ${check.model}.`,
    grid: `Solver: ${check.method}, nodes every ${plain(check.grid.spacing, 3)}\u202f${units.distance} (${check.grid.columns} × ${check.grid.rows}), forward star of radius ${check.grid.radius}.`,
    perShot: {
      caption: 'Each shot',
      columns: ['Shot', 'Picks', `RMS (${units.time})`, meanColumn],
      rows: check.perShot.map((entry) => {
        const flagged = flaggedShots.has(entry.shot);
        const [picks, rms, mean] = residualCells(entry, result);
        return {
          key: entry.shot,
          flagged,
          notes: [],
          cells: [{ text: entry.shot }, picks!, flagged ? { ...rms!, mark: EXCEEDS_MARK, title: 'more than the picks allow (see the warning about this shot)' } : rms!, mean!],
        };
      }),
      footnotes: [],
    },
    worstReceivers: {
      caption: `The ${worst.length === 1 ? 'receiver' : `${worst.length} receivers`} fitted worst`,
      columns: [`Receiver position (${units.distance})`, 'Picks', `RMS (${units.time})`, meanColumn],
      rows: worst.map((entry) => ({
        key: String(entry.receiverX),
        flagged: false,
        notes: [],
        cells: [{ text: position(entry.receiverX), numeric: true }, ...residualCells(entry, result)],
      })),
      footnotes: [],
    },
    notes: check.notes,
  };
}
