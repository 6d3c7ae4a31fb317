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
  /** The trade's name of the branch in this layer: "direct wave", "refractor 1"…, or Pg, P*, Pn on crustal surveys. */
  readonly phase: string;
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

/*
 * Fields marked optional below arrived with the reversed-profile methods: revisions stored before
 * them lack these fields, and the client shows such a revision without the parts they feed.
 */

export interface RefractorPoint {
  readonly x: number;
  /** Depth below the ground at x. */
  readonly depth: number;
  readonly depthSE: number;
  /** Refractor elevation (ground or datum elevation minus depth), when the table gave elevations. */
  readonly elevation: number | null;
  /** Depth below the datum, when a datum was given. */
  readonly depthBelowDatum?: number | null;
  readonly shot: string | null;
  readonly side: Side | null;
  /** The reversed pair ("A → B") a point under a receiver comes from; null for per-shot methods. */
  readonly pair?: string | null;
}

/** Where a merged section passes from one reversed pair's result to another's. */
export interface SeamResult {
  readonly x: number;
  readonly fromPair: string;
  readonly toPair: string;
  /** Mean depth of the new pair minus the old one's at the receivers both cover; null when none. */
  readonly step: number | null;
  readonly stepSE: number | null;
  readonly commonReceivers: number;
}

export interface RefractorResult {
  readonly interface: number;
  readonly method: string;
  readonly references: readonly string[];
  /** Refractor velocity of a delay-time method along the line; null for per-shot methods. */
  readonly velocity?: number | null;
  readonly velocitySE?: number | null;
  readonly points: readonly RefractorPoint[];
  /** Empty for per-shot methods. */
  readonly seams?: readonly SeamResult[];
}

/** A reversed pair: shot A's forward side with shot B's reverse side, on one refractor. */
export interface ReversedPairResult {
  /** "A → B". */
  readonly id: string;
  readonly forwardShot: string;
  readonly reverseShot: string;
  /** The head-wave branch along the top of layer `refractor` (branch number, 2 and up). */
  readonly refractor: number;
  readonly chosenBy: 'automatic' | 'user';
  readonly spreadLength: number;
  readonly commonReceivers: number;
  readonly overlap: readonly [number, number];
  readonly reciprocalTime: {
    readonly forwardAtReverseShot: number | null;
    readonly reverseAtForwardShot: number | null;
    readonly from: readonly string[];
    readonly value: number;
    readonly valueSE: number;
    /** t_AB − t_BA and the limit; null when only one of the two was read. */
    readonly misfit: number | null;
    readonly limit: number | null;
    readonly exceeds: boolean | null;
  };
  readonly plusMinus: {
    readonly velocity: number | null;
    readonly velocitySE: number | null;
    readonly receiverCount: number;
    readonly coverage: readonly [number, number] | null;
  };
  readonly generalizedReciprocal: {
    readonly velocity: number | null;
    readonly velocitySE: number | null;
    readonly receiverCount: number;
    readonly coverage: readonly [number, number] | null;
    readonly optimumXY: number | null;
    /** Why that XY, in one sentence. */
    readonly reason: string | null;
    readonly planeLayerXY: number | null;
    readonly resolved: boolean | null;
    readonly mismatch: boolean | null;
  };
}

/** Plane dipping layers under one pair of shots. */
export interface DippingLayersResult {
  readonly forwardShot: string;
  readonly reverseShot: string;
  readonly spreadLength: number;
  readonly interfaces: readonly {
    readonly interface: number;
    readonly trueVelocity: number;
    readonly trueVelocitySE: number;
    /** Degrees, positive when the interface deepens from the forward shot towards the reverse shot. */
    readonly dipDegrees: number;
    readonly dipDegreesSE: number;
    readonly depthUnderForwardShot: number;
    readonly depthUnderForwardShotSE: number;
    readonly depthUnderReverseShot: number;
    readonly depthUnderReverseShotSE: number;
  }[];
  readonly notes: readonly string[];
}

/** RMS and mean of observed minus computed times over a group of picks. */
export interface ResidualSummary {
  readonly pickCount: number;
  readonly rms: number | null;
  readonly mean: number | null;
}

/** One layer of the sphere-fitted model (lib/interpretation/shape.ts SphericalLayerSchema). */
export interface SphericalLayerResult {
  readonly index: number;
  readonly phase: string;
  readonly velocity: number;
  readonly velocitySE: number | null;
  readonly thickness: number | null;
  readonly thicknessSE: number | null;
  readonly depthToTop: number;
  readonly depthToTopSE: number | null;
}

/** Flat or spherical earth for the layers (lib EarthCurvatureSchema). */
export interface EarthCurvatureResult {
  readonly choice: 'auto' | 'flat' | 'spherical';
  readonly applied: boolean;
  readonly reason: string;
  readonly radius: number;
  readonly maxOffset: number;
  readonly pickSigma: number;
  readonly flatErrorOffset: number | null;
  readonly flatErrorAtMaxOffset: number | null;
  readonly sphericalLayers: readonly SphericalLayerResult[];
  readonly fit: { readonly pickCount: number; readonly rms: number; readonly iterations: number; readonly converged: boolean; readonly notes: readonly string[] } | null;
  readonly flatBias: { readonly velocity: readonly number[]; readonly depth: readonly (number | null)[] } | null;
}

/** A geographic table's profile line and where each shot and station lies on it (lib GeometrySchema). */
export interface GeometryResult {
  readonly line: { readonly origin: { readonly lat: number; readonly lon: number }; readonly end: { readonly lat: number; readonly lon: number }; readonly azimuth: number; readonly length: number };
  readonly offLineLimit: number;
  readonly shots: readonly { readonly shot: string; readonly lat: number; readonly lon: number; readonly position: number; readonly offLineDistance: number }[];
  readonly stations: readonly {
    readonly station: string;
    readonly lat: number;
    readonly lon: number;
    readonly position: number;
    readonly offLineDistance: number;
    readonly receiverXSpread: number;
    readonly recordedBy: number;
  }[];
}

interface TimeTermEntry {
  readonly id: string;
  readonly term: number;
  readonly termSE: number;
  readonly picks: number;
  readonly rejected: number;
  readonly sharedWith: string | null;
}

/** The time-term method on the deepest refractor (lib TimeTermsSchema). */
export interface TimeTermsResult {
  readonly branch: number;
  readonly phase: string;
  readonly velocity: number;
  readonly velocitySE: number;
  readonly lineVelocity: number;
  readonly velocityGradient?: number | null;
  readonly velocityGradientSE?: number | null;
  readonly constraint: string;
  readonly solver: string;
  readonly pickCount: number;
  readonly rejectedCount: number;
  readonly rms: number;
  readonly reducedChiSquare: number;
  readonly shots: readonly TimeTermEntry[];
  readonly stations: readonly (TimeTermEntry & {
    readonly position: number;
    readonly depth: number | null;
    readonly depthSE: number | null;
    readonly depthBelowSeaLevel: number | null;
    readonly depthNote: string | null;
  })[];
}

/** Travel times through the per-receiver depth section on a grid, against the picks. */
export interface ForwardCheckResult {
  readonly model: string;
  readonly method: string;
  readonly references: readonly string[];
  readonly grid: { readonly spacing: number; readonly radius: number; readonly columns: number; readonly rows: number };
  readonly overallRms: number | null;
  readonly perShot: readonly (ResidualSummary & { readonly shot: string })[];
  readonly perReceiver: readonly (ResidualSummary & { readonly receiverX: number })[];
  readonly notes: readonly string[];
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
  readonly reversedPairs?: readonly ReversedPairResult[];
  readonly dippingLayers?: readonly DippingLayersResult[];
  /** null when there is no per-receiver section to check. */
  readonly forwardCheck?: ForwardCheckResult | null;
  /** Geographic tables only (absent from revisions stored before it existed). */
  readonly geometry?: GeometryResult | null;
  readonly earthCurvature?: EarthCurvatureResult | null;
  readonly timeTerms?: TimeTermsResult | null;
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

/** One shot gather stored with a survey, as listed by GET /api/surveys/:id/gathers. */
export interface GatherSummary {
  /** Identifier within the survey: `<upload id>.<shot number in the file, from 1>`. */
  readonly id: string;
  readonly shot: string;
  readonly fileName: string;
  readonly format: 'SEG-2' | 'SEG-Y';
  readonly traceCount: number;
  /** Samples per trace as recorded (the longest trace). */
  readonly sampleCount: number;
  /** As recorded, seconds. */
  readonly sampleInterval: number;
  /** Source position along the line, metres. */
  readonly sourceX: number;
  /** Traces of this gather with a pick in the current pick set. */
  readonly pickCount: number;
}

/** A trace prepared for display: decimated, filtered as for picking, scaled to at most 1 in magnitude. */
export interface DisplayTrace {
  readonly traceIndex: number;
  /** The receiver identifier the trace's pick carries (`receiver` of the pick). */
  readonly receiver: string;
  readonly receiverX: number;
  /** receiverX − sourceX, metres. */
  readonly offset: number;
  /** Samples from `GatherDisplay.startTime` every `GatherDisplay.sampleInterval`, each in [−1, 1]. */
  readonly samples: readonly number[];
}

/** What the automatic picker made of one trace (whether or not the pick is in the pick set now). */
export interface DisplayPick {
  readonly traceIndex: number;
  /** Index of this trace's pick in the current pick set, or null when the pick set has none for it. */
  readonly pickIndex: number | null;
  /** The current pick's time (s after the shot), or the picker's rejected candidate when pickIndex is null. */
  readonly time: number | null;
  readonly sigma: number | null;
  /** The automatic picker's confidence in [0, 1] (null for a pick the user placed). */
  readonly confidence: number | null;
  readonly lowConfidence: boolean;
  /** 'automatic', 'user' (moved or added by hand), 'rejected' (candidate kept out of the pick set) or 'removed'. */
  readonly status: 'automatic' | 'user' | 'rejected' | 'removed' | 'none';
  /** Why the picker doubted or rejected it, in words (null when it did not). */
  readonly note: string | null;
}

/** GET /api/surveys/:id/gathers/:gatherId */
export interface GatherDisplay {
  readonly gather: GatherSummary;
  readonly version: number;
  readonly picksState: string | null;
  /** Time of the first displayed sample after the shot, seconds. */
  readonly startTime: number;
  /** Interval of the displayed samples, seconds (the recorded one or a multiple of it). */
  readonly sampleInterval: number;
  readonly traces: readonly DisplayTrace[];
  readonly picks: readonly DisplayPick[];
}

/** One hand edit of a pick (POST /api/surveys/:id/pick-edits). Times are seconds after the shot. */
export type PickEdit =
  | { readonly gatherId: string; readonly traceIndex: number; readonly time: number }
  | { readonly gatherId: string; readonly traceIndex: number; readonly remove: true };
