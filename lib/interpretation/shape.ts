/**
 * The interpretation: the JSON contract shared by the CLI (`--json`) and the HTTP API.
 *
 * One schema gives both the TypeScript type and the runtime check, and `interpretationJsonSchema()`
 * turns it into a JSON Schema for users' own tools. Keys are camelCase. Every number is in the
 * survey's display units, stated once in `units` (engineering: m, ms, m/s; crustal: km, s, km/s);
 * slownesses are not exposed — velocities are. Standard errors are one standard deviation.
 * `null` means "not available" and is always explained by a warning or by the field's doc.
 *
 * Versioning: `schemaVersion` increases when a field is removed or changes meaning; new fields may
 * be added without a bump.
 */
import * as z from 'zod';

const num = z.number();
const nullableNumber = z.number().nullable();

export const UnitsSchema = z.strictObject({
  scale: z.enum(['engineering', 'crustal']),
  distance: z.enum(['m', 'km']),
  time: z.enum(['ms', 's']),
  velocity: z.enum(['m/s', 'km/s']),
});

/** How a value was obtained: the method in words and the bibliography keys behind it. */
export const ProvenanceSchema = z.strictObject({
  method: z.string(),
  references: z.array(z.string()),
});

export const LayerSchema = z.strictObject({
  /** 1 = top layer; the last layer is the half-space (no thickness). */
  index: z.number().int().min(1),
  /** The branch that travels in this layer in the trade's words: engineering "direct wave", "refractor 1"…; crustal "Pg", "P*", "Pn" (phase-names.ts). */
  phase: z.string(),
  velocity: num,
  velocitySE: num,
  /** null for the half-space. */
  thickness: nullableNumber,
  thicknessSE: nullableNumber,
  /**
   * Depth below ground to the top of this layer (0 for layer 1); null when the layer's velocity is
   * measured but its depth is not resolved (a warning says why).
   */
  depthToTop: nullableNumber,
  depthToTopSE: nullableNumber,
  /** How many shot sides saw this layer's branch. */
  shotSides: z.number().int().min(0),
  velocityFrom: ProvenanceSchema,
  depthFrom: ProvenanceSchema,
});

export const PickResultSchema = z.strictObject({
  /** Line of the pick table. */
  line: z.number().int(),
  receiver: z.string().nullable(),
  receiverX: num,
  offset: num,
  time: num,
  /** Observed minus fitted branch line. */
  fitResidual: num,
  /** Weight the robust fit gave the pick (1 = full), null for least squares. */
  robustWeight: nullableNumber,
});

export const BranchResultSchema = z.strictObject({
  /** 1 = direct wave; n ≥ 2 = head wave along the top of layer n. */
  index: z.number().int().min(1),
  assignedBy: z.enum(['automatic', 'user']),
  pickCount: z.number().int(),
  firstOffset: num,
  lastOffset: num,
  /** null when the branch's time does not grow with offset (no velocity). */
  apparentVelocity: nullableNumber,
  apparentVelocitySE: nullableNumber,
  /** 95 % interval from the Student-t slope interval; null when the velocity is unbounded. */
  apparentVelocityInterval95: z.tuple([num, num]).nullable(),
  interceptTime: num,
  interceptTimeSE: num,
  /** Correlation of slope and intercept (strongly negative for a branch far from the origin). */
  slopeInterceptCorrelation: nullableNumber,
  residualSD: num,
  /** Σ(r/σ)² when picks carry sigma, else null. */
  chiSquare: nullableNumber,
  degreesOfFreedom: z.number().int(),
  fitMethod: z.enum(['least-squares', 'theil-sen', 'huber']),
  weighted: z.boolean(),
  throughOrigin: z.boolean(),
  picks: z.array(PickResultSchema),
});

export const CrossoverSchema = z.strictObject({
  /** Branch indices either side of the crossover. */
  lowerBranch: z.number().int(),
  upperBranch: z.number().int(),
  /** Intersection of the two fitted lines. */
  fitted: nullableNumber,
  fittedSE: nullableNumber,
  /** Last pick of the lower branch and first pick of the upper: where the data say it lies. */
  observedBracket: z.tuple([num, num]),
});

export const InterfaceDepthSchema = z.strictObject({
  /** Interface k is the top of layer k+1. */
  interface: z.number().int().min(1),
  thickness: num,
  thicknessSE: num,
  depth: num,
  depthSE: num,
});

export const BootstrapDepthSchema = z.strictObject({
  interface: z.number().int().min(1),
  depthSE: num,
  low95: num,
  high95: num,
  replicates: z.number().int(),
  droppedReplicates: z.number().int(),
});

export const ShotSideSchema = z.strictObject({
  side: z.enum(['forward', 'reverse']),
  pickCount: z.number().int(),
  excludedPickCount: z.number().int(),
  assignedBy: z.enum(['automatic', 'user']),
  branches: z.array(BranchResultSchema),
  crossovers: z.array(CrossoverSchema),
  /** Depth below the source by each method (plane horizontal layers under this shot side). */
  depths: z.strictObject({
    interceptTime: z.array(InterfaceDepthSchema),
    crossoverDistance: z.array(InterfaceDepthSchema),
    bootstrap: z.array(BootstrapDepthSchema).nullable(),
  }),
  /** Model selection: every branch count tried (empty when the user assigned the branches). */
  segmentation: z.array(
    z.strictObject({
      branchCount: z.number().int(),
      bic: num,
      residualSumOfSquares: num,
      failedConstraint: z.string().nullable(),
      chosen: z.boolean(),
    }),
  ),
});

export const ShotSchema = z.strictObject({
  id: z.string(),
  sourceX: num,
  sourceElevation: nullableNumber,
  sourceDepth: nullableNumber,
  sides: z.array(ShotSideSchema),
});

export const SeamSchema = z.strictObject({
  /** Where the section passes from one reversed pair's result to another's. */
  x: num,
  fromPair: z.string(),
  toPair: z.string(),
  /** Mean depth of the new pair minus the old one's at the receivers both cover; null when none. */
  step: nullableNumber,
  stepSE: nullableNumber,
  commonReceivers: z.number().int(),
});

export const RefractorSchema = z.strictObject({
  /** Interface k is the top of layer k+1. */
  interface: z.number().int().min(1),
  method: z.string(),
  references: z.array(z.string()),
  /** Refractor velocity this method found (delay-time methods: V_n′ along the line), null for per-shot methods. */
  velocity: nullableNumber,
  velocitySE: nullableNumber,
  points: z.array(
    z.strictObject({
      x: num,
      /** Depth below the ground at x. */
      depth: num,
      depthSE: num,
      /** Refractor elevation (ground or datum elevation minus depth), when elevations were given. */
      elevation: nullableNumber,
      /** Depth below the datum, when a datum was given. */
      depthBelowDatum: nullableNumber,
      shot: z.string().nullable(),
      side: z.enum(['forward', 'reverse']).nullable(),
      /** The reversed pair ("A → B") a per-receiver point comes from; null for per-shot methods. */
      pair: z.string().nullable(),
    }),
  ),
  /** Where the merged section changes pair (several spreads or shot pairs); empty for per-shot methods. */
  seams: z.array(SeamSchema),
});

export const ReversedPairSchema = z.strictObject({
  /** "A → B": shot A's forward side with shot B's reverse side. */
  id: z.string(),
  forwardShot: z.string(),
  reverseShot: z.string(),
  /** Refractor n: the head-wave branch along the top of layer n. */
  refractor: z.number().int().min(2),
  chosenBy: z.enum(['automatic', 'user']),
  spreadLength: num,
  commonReceivers: z.number().int(),
  overlap: z.tuple([num, num]),
  reciprocalTime: z.strictObject({
    /** Shot A's time at B and shot B's time at A, when read; `from` says how. */
    forwardAtReverseShot: nullableNumber,
    reverseAtForwardShot: nullableNumber,
    from: z.array(z.string()),
    value: num,
    valueSE: num,
    /** t_AB − t_BA and the limit √2·σ + tolerance; null when only one was read. */
    misfit: nullableNumber,
    limit: nullableNumber,
    exceeds: z.boolean().nullable(),
  }),
  plusMinus: z.strictObject({
    velocity: nullableNumber,
    velocitySE: nullableNumber,
    receiverCount: z.number().int(),
    coverage: z.tuple([num, num]).nullable(),
  }),
  generalizedReciprocal: z.strictObject({
    velocity: nullableNumber,
    velocitySE: nullableNumber,
    receiverCount: z.number().int(),
    coverage: z.tuple([num, num]).nullable(),
    optimumXY: nullableNumber,
    /** Why that XY: one sentence. */
    reason: z.string().nullable(),
    /** Palmer's plane-layer optimum 2·Σh·tanθ from the resulting depths. */
    planeLayerXY: nullableNumber,
    resolved: z.boolean().nullable(),
    mismatch: z.boolean().nullable(),
    scan: z.array(z.strictObject({ xy: num, pointCount: z.number().int(), velocity: nullableNumber, roughness: nullableNumber, noiseRoughness: nullableNumber })),
  }),
});

export const DippingLayersSchema = z.strictObject({
  forwardShot: z.string(),
  reverseShot: z.string(),
  spreadLength: num,
  interfaces: z.array(
    z.strictObject({
      interface: z.number().int().min(1),
      trueVelocity: num,
      trueVelocitySE: num,
      /** Degrees, positive when the interface deepens from the forward shot towards the reverse shot. */
      dipDegrees: num,
      dipDegreesSE: num,
      /** Vertical depth under each shot. */
      depthUnderForwardShot: num,
      depthUnderForwardShotSE: num,
      depthUnderReverseShot: num,
      depthUnderReverseShotSE: num,
    }),
  ),
  notes: z.array(z.string()),
});

export const ForwardCheckSchema = z.strictObject({
  /** The depth section whose travel times were computed. */
  model: z.string(),
  method: z.string(),
  references: z.array(z.string()),
  grid: z.strictObject({ spacing: num, radius: z.number().int(), columns: z.number().int(), rows: z.number().int() }),
  overallRms: nullableNumber,
  perShot: z.array(z.strictObject({ shot: z.string(), pickCount: z.number().int(), rms: nullableNumber, mean: nullableNumber })),
  perReceiver: z.array(z.strictObject({ receiverX: num, pickCount: z.number().int(), rms: nullableNumber, mean: nullableNumber })),
  notes: z.array(z.string()),
});

export const ResidualsSchema = z.strictObject({
  /** What the picks were compared with. */
  model: z.string(),
  overallRms: nullableNumber,
  perShot: z.array(
    z.strictObject({
      shot: z.string(),
      pickCount: z.number().int(),
      rms: nullableNumber,
      /** χ²/ν against the picks' sigmas, when every pick of the shot has one. */
      reducedChiSquare: nullableNumber,
    }),
  ),
});

export const WarningSchema = z.strictObject({
  code: z.string(),
  level: z.enum(['caution', 'warning', 'info']),
  message: z.string(),
  shot: z.string().optional(),
  side: z.enum(['forward', 'reverse']).optional(),
  branch: z.number().int().optional(),
  layer: z.number().int().optional(),
  details: z.record(z.string(), z.union([z.number(), z.string(), z.boolean()])).optional(),
});

/** One layer of the sphere-fitted model (display units); SEs null when the fit gave no covariance. */
export const SphericalLayerSchema = z.strictObject({
  index: z.number().int().min(1),
  phase: z.string(),
  velocity: num,
  velocitySE: nullableNumber,
  /** null for the half-space. */
  thickness: nullableNumber,
  thicknessSE: nullableNumber,
  /** Depth below the surface to the top of this layer (0 for layer 1). */
  depthToTop: num,
  depthToTopSE: nullableNumber,
});

/** Flat or spherical earth for the layers (earth-curvature.ts); null without a layered model of two layers or more. */
export const EarthCurvatureSchema = z.strictObject({
  choice: z.enum(['auto', 'flat', 'spherical']),
  /** The layers were refit in a sphere; `sphericalLayers` are then the values to use. */
  applied: z.boolean(),
  reason: z.string(),
  /** Sphere radius (GRS80 mean radius). */
  radius: num,
  /** Longest offset on a fitted branch. */
  maxOffset: num,
  /** Pick uncertainty the flat-earth error is held against. */
  pickSigma: num,
  /** Offset at which the flat-earth error of the deepest branch passes pickSigma; null if never. */
  flatErrorOffset: nullableNumber,
  /** Flat − spherical time of the deepest branch at maxOffset. */
  flatErrorAtMaxOffset: nullableNumber,
  /** The sphere-fitted layers (empty when no fit was run). */
  sphericalLayers: z.array(SphericalLayerSchema),
  fit: z.strictObject({
    pickCount: z.number().int(),
    rms: num,
    iterations: z.number().int(),
    converged: z.boolean(),
    notes: z.array(z.string()),
  }).nullable(),
  /** What a flat reading of the sphere's own times at these offsets carries, flat − spherical, per layer. */
  flatBias: z.strictObject({
    velocity: z.array(num),
    /** Per interface (top of layer k+1); null where the flat recursion gave no value. */
    depth: z.array(nullableNumber),
  }).nullable(),
});

const GeographicPointSchema = z.strictObject({ lat: num, lon: num });

/** Where a geographic table's shots and stations lie on its best-fitting profile line (geodesy/place-on-line.ts). */
export const GeometrySchema = z.strictObject({
  /** The line: from `origin` (position 0) to `end`, its azimuth at the centre (degrees from north) and length. */
  line: z.strictObject({ origin: GeographicPointSchema, end: GeographicPointSchema, azimuth: num, length: num }),
  /** Off-line distance beyond which a station-off-line warning is given. */
  offLineLimit: num,
  shots: z.array(z.strictObject({ shot: z.string(), lat: num, lon: num, position: num, offLineDistance: num })),
  stations: z.array(
    z.strictObject({
      station: z.string(),
      lat: num,
      lon: num,
      /** Along-line position (the station's projection on the line). */
      position: num,
      /** Signed distance off the line, + to the right looking along it. */
      offLineDistance: num,
      /** Spread of the station's receiver positions over the shots (0 for a station on the line): offsets are geodesic. */
      receiverXSpread: num,
      recordedBy: z.number().int(),
    }),
  ),
});

const TermSchema = z.strictObject({ id: z.string(), term: num, termSE: num, picks: z.number().int(), rejected: z.number().int(), sharedWith: z.string().nullable() });

/** The time-term method on the deepest refractor (survey-time-terms.ts); null when not run or not solvable. */
export const TimeTermsSchema = z.strictObject({
  /** The refractor: branch n (the top of layer n) and its phase name. */
  branch: z.number().int().min(2),
  phase: z.string(),
  /** Refractor velocity (corrected to the refractor's radius when the sphere was applied). */
  velocity: num,
  velocitySE: num,
  /** The velocity the line itself gives (differs from `velocity` only in a sphere). */
  lineVelocity: num,
  /** With the gradient option: dV/dz below the refractor (velocity per distance, e.g. (km/s)/km = 1/s) ± SE; null otherwise or when not resolved. */
  velocityGradient: nullableNumber,
  velocityGradientSE: nullableNumber,
  /** How a_i + b_j is split between shot and station, in words. */
  constraint: z.string(),
  solver: z.string(),
  pickCount: z.number().int(),
  rejectedCount: z.number().int(),
  rms: num,
  reducedChiSquare: num,
  shots: z.array(TermSchema),
  stations: z.array(
    TermSchema.extend({
      /** Along-line position. */
      position: num,
      /** Depth to the refractor below the station, with SE; null with `depthNote` when the term allows none. */
      depth: nullableNumber,
      depthSE: nullableNumber,
      /** Depth below sea level (depth − elevation) when the table gives elevations. */
      depthBelowSeaLevel: nullableNumber,
      depthNote: z.string().nullable(),
    }),
  ),
});

export const InterpretationSchema = z.strictObject({
  schemaVersion: z.literal(1),
  software: z.strictObject({ name: z.literal('slopebreak'), version: z.string() }),
  source: z.string().nullable(),
  units: UnitsSchema,
  options: z.strictObject({
    fitMethod: z.enum(['least-squares', 'theil-sen', 'huber']),
    bootstrapReplicates: z.number().int().min(0),
    seed: z.number().int(),
    minPicksPerBranch: z.number().int(),
    maxBranches: z.number().int(),
    /** The user's reversed pairs, or null for automatic pairing. */
    reversedPairs: z.array(z.strictObject({ forwardShot: z.string(), reverseShot: z.string() })).nullable(),
    datumElevation: nullableNumber,
    forwardCheck: z.boolean(),
    earthModel: z.enum(['auto', 'flat', 'spherical']),
    timeTerms: z.boolean(),
    timeTermGradient: z.boolean(),
  }),
  summary: z.strictObject({
    shotCount: z.number().int(),
    pickCount: z.number().int(),
    excludedPickCount: z.number().int(),
    shotSideCount: z.number().int(),
    layerCount: z.number().int(),
  }),
  layers: z.array(LayerSchema),
  shots: z.array(ShotSchema),
  refractors: z.array(RefractorSchema),
  /** Reversed pairs of shot sides per refractor, their reciprocal times and delay-time results. */
  reversedPairs: z.array(ReversedPairSchema),
  /** Plane dipping layers under each pair of shots (true velocity, dip, depth under both shots). */
  dippingLayers: z.array(DippingLayersSchema),
  /** Travel times through the per-receiver depth section on a grid, against the picks; null when there is no such section. */
  forwardCheck: ForwardCheckSchema.nullable(),
  /** Geographic tables: the profile line and where each shot and station lies on it; null for a table along a line. */
  geometry: GeometrySchema.nullable(),
  /** Flat or spherical earth (matters on crustal profiles of more than about 150 km). */
  earthCurvature: EarthCurvatureSchema.nullable(),
  /** Shot and station delays on the deepest refractor and its depth under every station (the time-term method). */
  timeTerms: TimeTermsSchema.nullable(),
  residuals: ResidualsSchema,
  warnings: z.array(WarningSchema),
  cautions: z.array(z.string()),
  references: z.array(z.strictObject({ key: z.string(), citation: z.string() })),
});

export type Interpretation = z.infer<typeof InterpretationSchema>;
export type LayerResult = z.infer<typeof LayerSchema>;
export type ShotResult = z.infer<typeof ShotSchema>;
export type ShotSideResult = z.infer<typeof ShotSideSchema>;
export type BranchResult = z.infer<typeof BranchResultSchema>;
export type RefractorResult = z.infer<typeof RefractorSchema>;
export type ReversedPairResult = z.infer<typeof ReversedPairSchema>;
export type DippingLayersResult = z.infer<typeof DippingLayersSchema>;
export type ForwardCheckResult = z.infer<typeof ForwardCheckSchema>;
export type EarthCurvatureResult = z.infer<typeof EarthCurvatureSchema>;
export type GeometryResult = z.infer<typeof GeometrySchema>;
export type TimeTermsResult = z.infer<typeof TimeTermsSchema>;

/** The JSON Schema (draft 2020-12) of the interpretation, for users' own validators. */
export function interpretationJsonSchema(): unknown {
  return z.toJSONSchema(InterpretationSchema);
}
