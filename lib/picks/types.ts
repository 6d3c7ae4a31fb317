/**
 * The pick set: first-arrival times of one survey, every value in SI units.
 * Produced by the pick-table reader (`readPickTable`) and, later, by the first-break picker.
 */
import type { DisplayScale } from '../units.js';

/** One first-arrival pick: the time a wave from `shot` first reached one receiver. */
export interface Pick {
  /** Shot identifier as written in the table. */
  readonly shot: string;
  /** Receiver identifier, when the table has a `receiver` column. */
  readonly receiver: string | null;
  /** Source position along the line, metres. */
  readonly sourceX: number;
  /** Receiver position along the line, metres. */
  readonly receiverX: number;
  /** First-arrival time after the shot instant, seconds (≥ 0). */
  readonly time: number;
  /** Pick uncertainty (one standard deviation), seconds, when given (> 0). */
  readonly sigma: number | null;
  /** User-assigned branch: 1 = direct wave, 2 = first refractor, … ; null = let slopebreak decide. */
  readonly branch: number | null;
  /**
   * True when the user excluded this pick from the interpretation (a `branch` cell of `x`, or a
   * later edit). Excluded picks are kept, shown and forward-modelled, but never fitted.
   */
  readonly excluded: boolean;
  /** Ground elevation at the source, metres, when given. */
  readonly sourceElevation: number | null;
  /** Ground elevation at the receiver, metres, when given. */
  readonly receiverElevation: number | null;
  /** Shot depth below ground, metres (shot holes), when given (≥ 0). */
  readonly sourceDepth: number | null;
  /** Uphole time of a buried shot, seconds, when given (≥ 0). */
  readonly uphole: number | null;
  /** Geographic source position, decimal degrees WGS84, when the table uses lat/lon. */
  readonly sourceLat: number | null;
  readonly sourceLon: number | null;
  readonly receiverLat: number | null;
  readonly receiverLon: number | null;
  /** 1-based line of the pick table this pick came from. */
  readonly line: number;
}

/** How positions are given in the table. */
export type CoordinateSystem = 'line' | 'geographic';

/** The optional columns the table carried (so output can say what was and was not given). */
export interface PickColumns {
  readonly receiver: boolean;
  readonly sigma: boolean;
  readonly branch: boolean;
  readonly sourceElevation: boolean;
  readonly receiverElevation: boolean;
  readonly sourceDepth: boolean;
  readonly uphole: boolean;
}

export interface PickSet {
  /** Every pick, in file order. */
  readonly picks: readonly Pick[];
  /** Shot identifiers in order of first appearance. */
  readonly shotIds: readonly string[];
  readonly coordinateSystem: CoordinateSystem;
  readonly columns: PickColumns;
  /**
   * Display scale the table suggests: `crustal` when positions were given in km or as lat/lon,
   * `engineering` otherwise. The user may override it.
   */
  readonly suggestedScale: DisplayScale;
}
