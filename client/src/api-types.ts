/**
 * The parts of the service's JSON that the client reads, as the client sees them. The server's
 * schema (lib/interpretation/shape.ts) is the contract; tests/client/api-contract.ts checks at
 * compile time that every interpretation the server can produce fits these types, so the two
 * cannot drift apart silently.
 */

export type Side = 'forward' | 'reverse';
export type Scale = 'engineering' | 'crustal';

export interface Units {
  readonly scale: Scale;
  readonly distance: 'm' | 'km';
  readonly time: 'ms' | 's';
  readonly velocity: 'm/s' | 'km/s';
}

export interface Provenance {
  readonly method: string;
  readonly references: readonly string[];
}

export interface LayerResult {
  readonly index: number;
  readonly velocity: number;
  readonly velocitySE: number;
  readonly thickness: number | null;
  readonly thicknessSE: number | null;
  readonly depthToTop: number | null;
  readonly depthToTopSE: number | null;
  readonly shotSides: number;
  readonly velocityFrom: Provenance;
  readonly depthFrom: Provenance;
}

export interface PickResult {
  readonly line: number;
  readonly receiver: string | null;
  readonly receiverX: number;
  readonly offset: number;
  readonly time: number;
  readonly fitResidual: number;
  readonly robustWeight: number | null;
}

export interface BranchResult {
  readonly index: number;
  readonly assignedBy: 'automatic' | 'user';
  readonly pickCount: number;
  readonly firstOffset: number;
  readonly lastOffset: number;
  readonly apparentVelocity: number | null;
  readonly apparentVelocitySE: number | null;
  readonly interceptTime: number;
  readonly interceptTimeSE: number;
  readonly residualSD: number;
  readonly fitMethod: string;
  readonly picks: readonly PickResult[];
}

export interface CrossoverResult {
  readonly lowerBranch: number;
  readonly upperBranch: number;
  readonly fitted: number | null;
  readonly fittedSE: number | null;
  readonly observedBracket: readonly [number, number];
}

export interface InterfaceDepth {
  readonly interface: number;
  readonly thickness: number;
  readonly thicknessSE: number;
  readonly depth: number;
  readonly depthSE: number;
}

export interface ShotSideResult {
  readonly side: Side;
  readonly pickCount: number;
  readonly excludedPickCount: number;
  readonly assignedBy: 'automatic' | 'user';
  readonly branches: readonly BranchResult[];
  readonly crossovers: readonly CrossoverResult[];
  readonly depths: {
    readonly interceptTime: readonly InterfaceDepth[];
    readonly crossoverDistance: readonly InterfaceDepth[];
  };
}

export interface ShotResult {
  readonly id: string;
  readonly sourceX: number;
  readonly sourceElevation: number | null;
  readonly sourceDepth: number | null;
  readonly sides: readonly ShotSideResult[];
}

export interface RefractorPoint {
  readonly x: number;
  readonly depth: number;
  readonly depthSE: number;
  readonly elevation: number | null;
  readonly shot: string | null;
  readonly side: Side | null;
}

export interface RefractorResult {
  readonly interface: number;
  readonly method: string;
  readonly references: readonly string[];
  readonly points: readonly RefractorPoint[];
}

export interface WarningResult {
  readonly code: string;
  readonly level: 'caution' | 'warning' | 'info';
  readonly message: string;
  readonly shot?: string | undefined;
  readonly side?: Side | undefined;
  readonly branch?: number | undefined;
  readonly layer?: number | undefined;
}

export interface Interpretation {
  readonly software: { readonly name: string; readonly version: string };
  readonly source: string | null;
  readonly units: Units;
  readonly options: { readonly fitMethod: string; readonly bootstrapReplicates: number };
  readonly summary: {
    readonly shotCount: number;
    readonly pickCount: number;
    readonly excludedPickCount: number;
    readonly shotSideCount: number;
    readonly layerCount: number;
  };
  readonly layers: readonly LayerResult[];
  readonly shots: readonly ShotResult[];
  readonly refractors: readonly RefractorResult[];
  readonly residuals: {
    readonly model: string;
    readonly overallRms: number | null;
    readonly perShot: readonly { readonly shot: string; readonly pickCount: number; readonly rms: number | null }[];
  };
  readonly warnings: readonly WarningResult[];
  readonly cautions: readonly string[];
  readonly references: readonly { readonly key: string; readonly citation: string }[];
}

export interface Survey {
  /** Stable identifier given by the server (a UUID). */
  readonly id: string;
  readonly name: string;
  readonly description: string;
  readonly scale: Scale;
  readonly createdAt: string;
  readonly updatedAt: string;
  readonly version: number;
}

export interface RevisionSummary {
  readonly number: number;
  readonly surveyVersion: number;
  /** The picks it was computed from (null for revisions stored before the server recorded it). */
  readonly picksState: string | null;
  readonly createdAt: string;
  /** The options it was run with, sent again when an edit re-interprets. */
  readonly options: Readonly<Record<string, unknown>>;
}

export interface Revision extends RevisionSummary {
  readonly result: Interpretation;
}

/** A pick of the stored pick set, in SI units (metres, seconds) as the server keeps it. */
export interface StoredPick {
  readonly line: number;
  readonly shot: string;
  readonly sourceX: number;
  readonly receiverX: number;
  readonly time: number;
  readonly branch: number | null;
  readonly excluded: boolean;
  readonly receiverElevation: number | null;
  readonly sourceElevation: number | null;
}

export interface CurrentPicks {
  readonly version: number;
  /** Changes with every upload and branch edit only (compare with a revision's `picksState`). */
  readonly picksState: string | null;
  readonly pickSet: { readonly picks: readonly StoredPick[]; readonly shotIds: readonly string[] };
}

/** One branch edit as the service takes it (POST /api/surveys/:id/branch-edits). */
export interface BranchEdit {
  readonly pickIndex: number;
  readonly assign: number | 'exclude' | 'automatic';
}

/** A problem the pick-table reader found (422 details). */
export interface TableProblem {
  readonly code: string;
  readonly severity: 'error' | 'warning';
  readonly line: number;
  readonly column: number | null;
  readonly field?: string | undefined;
  readonly message: string;
  readonly fix: string;
}

export interface UploadReply {
  readonly version: number;
  readonly pickCount: number;
  readonly shotIds: readonly string[];
  readonly suggestedScale: Scale;
  readonly warnings: readonly TableProblem[];
}
