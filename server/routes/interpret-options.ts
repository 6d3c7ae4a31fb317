/**
 * The interpretation options a request may set: one schema for a JSON body, and the same fields
 * read from a query string (numbers written as text) for the stateless endpoint, whose body is the CSV.
 */
import * as z from 'zod';

/**
 * Most bootstrap replicates one request may ask for: 2,000 replicates give standard errors to
 * about 2 % (common practice: the SE of a bootstrap SE is about 1/√(2B)), and keep one request to
 * seconds, so a request cannot hold the server for minutes.
 */
export const MAX_BOOTSTRAP_REPLICATES = 2000;
/** Most branches per shot side a request may ask for (the segmentation search grows with it). */
export const MAX_BRANCHES = 8;

/** Reads a query-string number: digits become a number, anything else is left for the schema to refuse. */
function fromText(value: unknown): unknown {
  return typeof value === 'string' && /^-?[0-9]+$/.test(value.trim()) ? Number(value) : value;
}

/** Most reversed pairs one request may name. */
export const MAX_REVERSED_PAIRS = 200;

const PairChoice = z.strictObject({ forwardShot: z.string().min(1).max(200), reverseShot: z.string().min(1).max(200) });

/** Query text for pairs: "A:B,C:D" (forward shot, colon, reverse shot; pairs joined by commas). */
function pairsFromText(value: unknown): unknown {
  if (typeof value !== 'string') return value;
  return value.split(',').map((text) => {
    const [forwardShot, reverseShot, ...rest] = text.split(':');
    return rest.length > 0 ? text : { forwardShot: forwardShot?.trim(), reverseShot: reverseShot?.trim() };
  });
}

function decimalFromText(value: unknown): unknown {
  return typeof value === 'string' && /^-?[0-9]+(\.[0-9]+)?$/.test(value.trim()) ? Number(value) : value;
}

function booleanFromText(value: unknown): unknown {
  return value === 'true' ? true : value === 'false' ? false : value;
}

function optionFields(number: (schema: z.ZodNumber) => z.ZodType<number>, text: boolean) {
  const fromQuery = <T extends z.ZodType>(reader: (value: unknown) => unknown, schema: T) => (text ? z.preprocess(reader, schema) : schema);
  return {
    /** Line-fit method for every branch. */
    fitMethod: z.enum(['least-squares', 'theil-sen', 'huber']).optional(),
    /** Residual-bootstrap replicates per shot side, 0 to skip. */
    bootstrapReplicates: number(z.number().int().min(0).max(MAX_BOOTSTRAP_REPLICATES)).optional(),
    /** Seed of every random procedure (32-bit unsigned). */
    seed: number(z.number().int().min(0).max(2 ** 32 - 1)).optional(),
    /** Display units of the result. */
    scale: z.enum(['engineering', 'crustal']).optional(),
    /** Most branches per shot side. */
    maxBranches: number(z.number().int().min(1).max(MAX_BRANCHES)).optional(),
    /** Fewest picks per automatic branch (a line needs two, a scatter estimate three). */
    minPicksPerBranch: number(z.number().int().min(2).max(1000)).optional(),
    /** Reversed pairs for the depths under the receivers (forward shot, reverse shot); null or absent: automatic. */
    reversedPairs: fromQuery(pairsFromText, z.array(PairChoice).max(MAX_REVERSED_PAIRS).nullable()).optional(),
    /** Datum elevation, m, for the depths under the receivers; null or absent: the ground. */
    datumElevation: fromQuery(decimalFromText, z.number().min(-12_000).max(10_000).nullable()).optional(),
    /** Run the grid forward check of the depth section (default true). */
    forwardCheck: fromQuery(booleanFromText, z.boolean()).optional(),
    /** Earth model of the layer depths: auto (a sphere where offsets make curvature matter), flat or spherical. */
    earthModel: z.enum(['auto', 'flat', 'spherical']).optional(),
    /** Solve the time-term method on the deepest refractor (default true). */
    timeTerms: fromQuery(booleanFromText, z.boolean()).optional(),
    /** Add the velocity-gradient term to the time-term model (default false). */
    timeTermGradient: fromQuery(booleanFromText, z.boolean()).optional(),
  };
}

export const InterpretOptionsBody = z.strictObject(optionFields((schema) => schema, false));
export const InterpretOptionsQuery = z.strictObject(optionFields((schema) => z.preprocess(fromText, schema), true));

export type InterpretOptionsInput = z.infer<typeof InterpretOptionsBody>;
