/**
 * Property tests for readPickTable and writePickTable (fast-check, fixed seeds; 12,000 runs).
 *
 * Valid tables are generated from a survey description (shots, receivers, values as decimal text
 * in random units), rendered with random but legal formatting, and must load with the values the
 * description gives (converted by the SI prefixes and 1 ft = 0.3048 m, NIST SP 811) and
 * round-trip through writePickTable. Mutated tables, random text and random bytes must never
 * make the reader throw: the outcome is either a clean pick set or a refusal with well-formed
 * problems, sorted by line and then column, and what loads stays within the magnitude limits
 * (mutations that insert `e9` or zeros can carry values past them). A value placed on either side
 * of its column's magnitude limit is refused exactly when its size in SI, computed here as
 * mantissa × 10^exponent × unit size, is beyond the limit. For random bytes, the platform's own UTF-8 decoder (`TextDecoder`, fatal mode) is
 * the outside oracle for which inputs must be refused as `encoding-invalid`.
 */
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { LENGTH_UNITS, TIME_UNITS, type LengthUnit, type TimeUnit } from '../../lib/units.js';
import type { Outcome } from '../../lib/problems.js';
import {
  LARGEST_LENGTH_METRES,
  LATEST_TIME_SECONDS,
  PICK_TABLE_PROBLEM_CODES,
  readPickTable,
  writePickTable,
  type Pick,
  type PickSet,
} from '../../lib/picks/index.js';

const SEED = 7_251_033;
/** Small caps keep every run fast; the property is about shape, not volume. */
const MAX_PROBLEMS = 20;
/**
 * The expected SI value is (n / 10^d) × unit size in doubles: two roundings, against the reader's
 * one exact rounding; together at most about 2 ulp apart, so 4 ε relative is safe.
 */
const CONVERSION_TOLERANCE = 4 * Number.EPSILON;

// ---------------------------------------------------------------- survey description

interface DecimalCell {
  /** The decimal as written in the table. */
  readonly text: string;
  /** Its value in the column's unit, computed as a double (n / 10^d). */
  readonly value: number;
}

/** A decimal n / 10^d written as plain text or with an exponent. */
function decimalCell(minimum: number, maximum: number): fc.Arbitrary<DecimalCell> {
  return fc
    .tuple(fc.integer({ min: 0, max: 3 }), fc.double({ min: 0, max: 1, noNaN: true }), fc.boolean())
    .map(([decimals, fraction, exponentForm]) => {
      const scale = 10 ** decimals;
      const low = Math.ceil(minimum * scale);
      const high = Math.floor(maximum * scale);
      const integer = low + Math.floor(fraction * (high - low));
      return integerDecimal(integer, decimals, exponentForm);
    });
}

function integerDecimal(integer: number, decimals: number, exponentForm: boolean): DecimalCell {
  const value = integer / 10 ** decimals;
  if (exponentForm) return { text: `${integer}e-${decimals}`, value };
  const digits = String(Math.abs(integer)).padStart(decimals + 1, '0');
  const point = digits.length - decimals;
  const text = `${integer < 0 ? '-' : ''}${digits.slice(0, point)}${decimals > 0 ? `.${digits.slice(point)}` : ''}`;
  return { text, value };
}

interface ReceiverDescription {
  readonly id: string | null;
  readonly position: DecimalCell;
  /** Second coordinate (longitude) for geographic tables. */
  readonly longitude: DecimalCell;
  readonly time: DecimalCell;
  readonly sigma: DecimalCell | null;
  readonly branch: string;
  readonly elevation: DecimalCell | null;
}

interface ShotDescription {
  readonly id: string;
  readonly position: DecimalCell;
  readonly longitude: DecimalCell;
  readonly elevation: DecimalCell | null;
  readonly depth: DecimalCell | null;
  readonly uphole: DecimalCell | null;
  readonly receivers: readonly ReceiverDescription[];
}

interface SurveyDescription {
  readonly geographic: boolean;
  readonly distance: LengthUnit;
  readonly time: TimeUnit;
  readonly optional: { readonly receiver: boolean; readonly sigma: boolean; readonly branch: boolean; readonly sourceElevation: boolean; readonly receiverElevation: boolean; readonly sourceDepth: boolean; readonly uphole: boolean; readonly remark: boolean };
  readonly shots: readonly ShotDescription[];
}

const ID_CHARACTERS = ['A', 'b', 'S', '0', '7', ' ', ',', '"', '#', 'é', '€', '-', '_', 'x', '𝄞'];
const shotId = fc.string({ unit: fc.constantFrom(...ID_CHARACTERS), minLength: 1, maxLength: 6 }).map((text) => text.trim()).filter((text) => text.length > 0);

function receiverArbitrary(position: DecimalCell, geographic: boolean): fc.Arbitrary<ReceiverDescription> {
  return fc.record({
    id: fc.constant(null),
    position: fc.constant(position),
    longitude: geographic ? decimalCell(-180, 359.999) : fc.constant(position),
    time: decimalCell(0, 5000),
    sigma: fc.option(decimalCell(0.001, 50), { nil: null }),
    branch: fc.constantFrom('', '1', '2', '3', 'x', 'X'),
    elevation: fc.option(decimalCell(-500, 5000), { nil: null }),
  });
}

function shotArbitrary(geographic: boolean): fc.Arbitrary<Omit<ShotDescription, 'id'>> {
  const positionRange: [number, number] = geographic ? [-90, 90] : [-10_000, 10_000];
  return fc
    .uniqueArray(fc.integer({ min: positionRange[0] * 100, max: positionRange[1] * 100 }), { minLength: 3, maxLength: 7 })
    .chain((positions) =>
      fc.record({
        position: decimalCell(...positionRange),
        longitude: decimalCell(-180, 359.999),
        elevation: fc.option(decimalCell(-500, 5000), { nil: null }),
        depth: fc.option(decimalCell(0, 100), { nil: null }),
        uphole: fc.option(decimalCell(0, 200), { nil: null }),
        receivers: fc.tuple(...positions.map((position) => receiverArbitrary(integerDecimal(position, 2, false), geographic))),
      }),
    );
}

const surveyArbitrary: fc.Arbitrary<SurveyDescription> = fc
  .record({
    geographic: fc.boolean(),
    distance: fc.constantFrom<LengthUnit>('m', 'km', 'ft'),
    time: fc.constantFrom<TimeUnit>('ms', 's'),
    optional: fc.record({
      receiver: fc.boolean(), sigma: fc.boolean(), branch: fc.boolean(), sourceElevation: fc.boolean(),
      receiverElevation: fc.boolean(), sourceDepth: fc.boolean(), uphole: fc.boolean(), remark: fc.boolean(),
    }),
    ids: fc.uniqueArray(shotId, { minLength: 1, maxLength: 3 }),
  })
  .chain(({ ids, ...rest }) =>
    fc.tuple(...ids.map(() => shotArbitrary(rest.geographic))).map((shots) => ({
      ...rest,
      shots: shots.map((shot, index) => ({
        ...shot,
        id: ids[index] ?? 'S',
        receivers: shot.receivers.map((receiver, position) => ({ ...receiver, id: rest.optional.receiver && position % 3 !== 2 ? `G${position}` : null })),
      })),
    })),
  );

// ---------------------------------------------------------------- rendering

interface Formatting {
  readonly lineEnd: '\n' | '\r\n' | '\r';
  readonly finalLineEnd: boolean;
  readonly byteOrderMark: boolean;
  readonly preamble: readonly string[];
  readonly trailingCommas: boolean;
  readonly padding: readonly string[];
  readonly quoteNumbers: boolean;
  readonly interleave: boolean;
  readonly blankRows: boolean;
  readonly headerCase: readonly boolean[];
}

const formattingArbitrary: fc.Arbitrary<Formatting> = fc.record({
  lineEnd: fc.constantFrom<Formatting['lineEnd']>('\n', '\r\n', '\r'),
  finalLineEnd: fc.boolean(),
  byteOrderMark: fc.boolean(),
  preamble: fc.array(fc.constantFrom('# survey line A', '', '   ', '  # remark, with "quotes"', '#'), { maxLength: 3 }),
  trailingCommas: fc.boolean(),
  padding: fc.array(fc.constantFrom('', '', ' ', '\t', '  '), { minLength: 7, maxLength: 7 }),
  quoteNumbers: fc.boolean(),
  interleave: fc.boolean(),
  blankRows: fc.boolean(),
  headerCase: fc.array(fc.boolean(), { minLength: 16, maxLength: 16 }),
});

function quoteField(text: string, always: boolean): string {
  const needed = text.includes(',') || text.includes('"') || text.startsWith('#') || text.trim() !== text;
  return needed || always ? `"${text.replaceAll('"', '""')}"` : text;
}

interface Column {
  readonly name: string;
  readonly cell: (shot: ShotDescription, receiver: ReceiverDescription) => string;
}

function columnsOf(survey: SurveyDescription): Column[] {
  const { distance, time, optional, geographic } = survey;
  const text = (cell: DecimalCell | null): string => cell?.text ?? '';
  const columns: Column[] = [{ name: 'shot', cell: (shot) => shot.id }];
  if (optional.receiver) columns.push({ name: 'receiver', cell: (_shot, receiver) => receiver.id ?? '' });
  if (geographic) {
    columns.push(
      { name: 'source_lat', cell: (shot) => shot.position.text },
      { name: 'source_lon', cell: (shot) => shot.longitude.text },
      { name: 'receiver_lat', cell: (_shot, receiver) => receiver.position.text },
      { name: 'receiver_lon', cell: (_shot, receiver) => receiver.longitude.text },
    );
  } else {
    columns.push({ name: `source_x_${distance}`, cell: (shot) => shot.position.text }, { name: `receiver_x_${distance}`, cell: (_shot, receiver) => receiver.position.text });
  }
  columns.push({ name: `time_${time}`, cell: (_shot, receiver) => receiver.time.text });
  if (optional.sigma) columns.push({ name: `sigma_${time}`, cell: (_shot, receiver) => text(receiver.sigma) });
  if (optional.remark) columns.push({ name: 'remark', cell: () => 'ok' });
  if (optional.branch) columns.push({ name: 'branch', cell: (_shot, receiver) => receiver.branch });
  if (optional.sourceElevation) columns.push({ name: `source_elev_${distance}`, cell: (shot) => text(shot.elevation) });
  if (optional.receiverElevation) columns.push({ name: `receiver_elev_${distance}`, cell: (_shot, receiver) => text(receiver.elevation) });
  if (optional.sourceDepth) columns.push({ name: `source_depth_${distance}`, cell: (shot) => text(shot.depth) });
  if (optional.uphole) columns.push({ name: `uphole_${time}`, cell: (shot) => text(shot.uphole) });
  return columns;
}

function rowsInOrder(survey: SurveyDescription, interleave: boolean): [ShotDescription, ReceiverDescription][] {
  const rows: [ShotDescription, ReceiverDescription][] = [];
  if (!interleave) {
    for (const shot of survey.shots) for (const receiver of shot.receivers) rows.push([shot, receiver]);
    return rows;
  }
  const longest = Math.max(...survey.shots.map((shot) => shot.receivers.length));
  for (let index = 0; index < longest; index += 1) {
    for (const shot of survey.shots) {
      const receiver = shot.receivers[index];
      if (receiver !== undefined) rows.push([shot, receiver]);
    }
  }
  return rows;
}

function render(survey: SurveyDescription, format: Formatting): string {
  const columns = columnsOf(survey);
  const pad = (text: string, index: number): string => `${format.padding[index % 7] ?? ''}${text}${format.padding[(index + 3) % 7] ?? ''}`;
  const comma = format.trailingCommas ? ',' : '';
  const headerName = (name: string, index: number): string => pad(format.headerCase[index % 16] ? name.toUpperCase() : name, index);
  const lines = [...format.preamble, columns.map((column, index) => headerName(column.name, index)).join(',') + comma];
  rowsInOrder(survey, format.interleave).forEach(([shot, receiver], rowIndex) => {
    const cells = columns.map((column, index) => {
      const raw = column.cell(shot, receiver);
      const isText = index === 0 || column.name === 'receiver';
      return pad(quoteField(raw, format.quoteNumbers && !isText && raw !== ''), index + rowIndex);
    });
    lines.push(cells.join(',') + comma);
    if (format.blankRows && rowIndex % 2 === 0) lines.push('  ');
  });
  const body = lines.join(format.lineEnd) + (format.finalLineEnd ? format.lineEnd : '');
  return (format.byteOrderMark ? '\uFEFF' : '') + body;
}

// ---------------------------------------------------------------- expectations

/** A cheap assertion for the inner loops (vitest's expect costs too much per value at 10⁴ runs). */
function check(condition: boolean, message: string): void {
  if (!condition) throw new Error(message);
}

function expectClose(actual: number | null, expected: number | null, what: string): void {
  const close = expected === null || actual === null ? actual === expected : Math.abs(actual - expected) <= CONVERSION_TOLERANCE * Math.abs(expected);
  check(close, `${what}: got ${actual}, expected ${expected} (converted by the SI prefixes and 1 ft = 0.3048 m, NIST SP 811)`);
}

function expectSurvey(set: PickSet, survey: SurveyDescription, format: Formatting): void {
  const length = LENGTH_UNITS[survey.distance];
  const duration = TIME_UNITS[survey.time];
  const inSI = (cell: DecimalCell | null, size: number): number | null => (cell === null ? null : cell.value * size);
  const rows = rowsInOrder(survey, format.interleave);
  expect(set.picks).toHaveLength(rows.length);
  expect(set.shotIds).toEqual(survey.shots.map((shot) => shot.id));
  expect(set.coordinateSystem).toBe(survey.geographic ? 'geographic' : 'line');
  expect(set.suggestedScale).toBe(survey.geographic || survey.distance === 'km' ? 'crustal' : 'engineering');
  const { remark: _remark, ...flags } = survey.optional;
  expect(set.columns).toEqual(flags);
  rows.forEach(([shot, receiver], index) => {
    const pick = set.picks[index] as Pick;
    check(pick.shot === shot.id, `shot ${pick.shot} instead of ${shot.id}`);
    check(pick.receiver === (survey.optional.receiver ? receiver.id : null), `receiver ${pick.receiver}`);
    expectClose(pick.time, inSI(receiver.time, duration), 'time');
    if (survey.optional.sigma) expectClose(pick.sigma, inSI(receiver.sigma, duration), 'sigma');
    if (survey.geographic) {
      check(pick.sourceX === 0 && pick.receiverX === 0, 'geographic x must be 0');
      expectClose(pick.sourceLat, shot.position.value, 'source latitude');
      expectClose(pick.receiverLon, receiver.longitude.value, 'receiver longitude');
    } else {
      expectClose(pick.sourceX, inSI(shot.position, length), 'source x');
      expectClose(pick.receiverX, inSI(receiver.position, length), 'receiver x');
    }
    if (survey.optional.sourceDepth) expectClose(pick.sourceDepth, inSI(shot.depth, length), 'source depth');
    if (survey.optional.uphole) expectClose(pick.uphole, inSI(shot.uphole, duration), 'uphole');
    if (survey.optional.receiverElevation) expectClose(pick.receiverElevation, inSI(receiver.elevation, length), 'receiver elevation');
    if (survey.optional.branch) {
      const excluded = receiver.branch.toLowerCase() === 'x';
      const branch = excluded || receiver.branch === '' ? null : Number(receiver.branch);
      check(pick.branch === branch && pick.excluded === excluded, `branch ${pick.branch}/${pick.excluded} for ${receiver.branch}`);
    }
  });
}

/** What must hold for any input: a clean pick set, or a refusal with well-formed, sorted problems. */
function expectWellFormed(outcome: Outcome<PickSet>): void {
  const codes = new Set(Object.keys(PICK_TABLE_PROBLEM_CODES));
  const problems = outcome.ok ? outcome.warnings : outcome.problems;
  problems.forEach((problem, index) => {
    const previous = problems[index - 1];
    const sorted =
      previous === undefined ||
      previous.line < problem.line ||
      (previous.line === problem.line && (problem.column === null || (previous.column !== null && previous.column <= problem.column)));
    check(sorted, `problems out of order: ${previous?.line}:${previous?.column} before ${problem.line}:${problem.column}`);
  });
  for (const problem of problems) {
    check(Number.isInteger(problem.line) && problem.line >= 1, `line ${problem.line}`);
    check(problem.column === null || (Number.isInteger(problem.column) && problem.column >= 1), `column ${problem.column}`);
    check(problem.message.length > 0 && problem.fix.length > 0, `${problem.code}: message and fix must not be empty`);
    check(codes.has(problem.code), `unregistered code ${problem.code}`);
  }
  expect(problems.length).toBeLessThanOrEqual(MAX_PROBLEMS + 1);
  if (!outcome.ok) {
    expect(outcome.problems.some((problem) => problem.severity === 'error')).toBe(true);
    return;
  }
  expect(outcome.warnings.every((problem) => problem.severity === 'warning')).toBe(true);
  expect(outcome.value.picks.length).toBeGreaterThanOrEqual(3);
  for (const pick of outcome.value.picks) {
    check(Number.isFinite(pick.time) && pick.time >= 0, `time ${pick.time}`);
    check(Number.isFinite(pick.sourceX) && Number.isFinite(pick.receiverX), `positions ${pick.sourceX}, ${pick.receiverX}`);
    for (const value of [pick.sigma, pick.sourceElevation, pick.receiverElevation, pick.sourceDepth, pick.uphole, pick.sourceLat, pick.sourceLon, pick.receiverLat, pick.receiverLon]) {
      check(value === null || Number.isFinite(value), `value ${value} on line ${pick.line}`);
    }
    check(pick.sigma === null || pick.sigma > 0, `sigma ${pick.sigma}`);
    for (const time of [pick.time, pick.sigma, pick.uphole]) check(time === null || time <= LATEST_TIME_SECONDS, `time ${time} on line ${pick.line}`);
    for (const length of [pick.sourceX, pick.receiverX, pick.sourceElevation, pick.receiverElevation, pick.sourceDepth]) {
      check(length === null || Math.abs(length) <= LARGEST_LENGTH_METRES, `length ${length} on line ${pick.line}`);
    }
    check(pick.shot.length > 0, 'empty shot id');
  }
}

/** Everything but line numbers (a written table has no comments or blank lines). */
function content(set: PickSet): unknown {
  return { ...set, picks: set.picks.map(({ line: _line, ...rest }) => rest) };
}

function expectRoundTrip(set: PickSet): void {
  const again = readPickTable(writePickTable(set), { maxProblems: MAX_PROBLEMS });
  expect(again.ok ? content(again.value) : again.problems).toEqual(content({ ...set, suggestedScale: set.coordinateSystem === 'geographic' ? 'crustal' : 'engineering' }));
}

// ---------------------------------------------------------------- mutations

type Mutation =
  | { readonly kind: 'delete' | 'duplicate' | 'swap' | 'truncate'; readonly at: number }
  | { readonly kind: 'insert'; readonly at: number; readonly text: string };

const INSERTIONS = [',', '"', '\0', '\uFEFF', '\r', '\n', '#', ' ', '-', 'e', '.', '1e400', '-1e400', 'NaN', '9'.repeat(400), '\uD800', 'x', 'e9', '000000'];
const mutationArbitrary: fc.Arbitrary<Mutation> = fc.oneof(
  fc.record({ kind: fc.constantFrom('delete' as const, 'duplicate' as const, 'swap' as const, 'truncate' as const), at: fc.nat() }),
  fc.record({ kind: fc.constant('insert' as const), at: fc.nat(), text: fc.oneof(fc.constantFrom(...INSERTIONS), fc.string({ unit: 'binary', minLength: 1, maxLength: 3 })) }),
);

function mutate(text: string, mutation: Mutation): string {
  const at = mutation.at % (text.length + 1);
  switch (mutation.kind) {
    case 'delete': return text.slice(0, at) + text.slice(at + 1);
    case 'duplicate': return text.slice(0, at + 1) + text.slice(at);
    case 'swap': return text.slice(0, at) + text.slice(at + 1, at + 2) + text.slice(at, at + 1) + text.slice(at + 2);
    case 'truncate': return text.slice(0, at);
    case 'insert': return text.slice(0, at) + mutation.text + text.slice(at);
  }
}

// ---------------------------------------------------------------- properties

describe('readPickTable properties', () => {
  it('readPickTable loads every generated valid table with its values, and the result round-trips through writePickTable (2,500 runs)', () => {
    fc.assert(
      fc.property(surveyArbitrary, formattingArbitrary, fc.boolean(), (survey, format, asBytes) => {
        const text = render(survey, format);
        const outcome = readPickTable(asBytes ? new TextEncoder().encode(text) : text, { maxProblems: MAX_PROBLEMS });
        if (!outcome.ok) throw new Error(`refused:\n${text}\n${JSON.stringify(outcome.problems, null, 1)}`);
        expectWellFormed(outcome);
        expect(outcome.warnings.map((problem) => problem.code)).toEqual(survey.optional.remark ? ['column-unknown'] : []);
        expectSurvey(outcome.value, survey, format);
        expectRoundTrip(outcome.value);
      }),
      { seed: SEED, numRuns: 2500 },
    );
  });

  it('readPickTable never throws on mutated valid tables, and what loads is clean and round-trips (4,000 runs)', () => {
    fc.assert(
      fc.property(surveyArbitrary, formattingArbitrary, fc.array(mutationArbitrary, { minLength: 1, maxLength: 4 }), (survey, format, mutations) => {
        const text = mutations.reduce(mutate, render(survey, format));
        const outcome = readPickTable(text, { maxProblems: MAX_PROBLEMS });
        expectWellFormed(outcome);
        if (outcome.ok) expectRoundTrip(outcome.value);
      }),
      { seed: SEED + 1, numRuns: 4000 },
    );
  });

  it('readPickTable refuses a time or length exactly when its SI magnitude is beyond the column\'s limit, in every unit (1,000 runs)', () => {
    const columnArbitrary = fc.record({
      stem: fc.constantFrom('source_x', 'receiver_x', 'source_elev', 'receiver_elev', 'source_depth', 'time', 'sigma', 'uphole'),
      length: fc.constantFrom<LengthUnit>('m', 'km', 'ft'),
      time: fc.constantFrom<TimeUnit>('ms', 's'),
      mantissa: fc.integer({ min: 100, max: 999 }),
      /** Decades around the limit: the value spans about 10⁻² to 10² times it. */
      decade: fc.integer({ min: -2, max: 2 }),
      negative: fc.boolean(),
    });
    fc.assert(
      fc.property(columnArbitrary, ({ stem, length, time, mantissa, decade, negative }) => {
        const isTime = stem === 'time' || stem === 'sigma' || stem === 'uphole';
        const unitSize = isTime ? TIME_UNITS[time] : LENGTH_UNITS[length];
        const limit = isTime ? LATEST_TIME_SECONDS : LARGEST_LENGTH_METRES;
        // Write mantissa × 10^exponent with the exponent that puts the value within a few decades of the limit.
        const exponent = Math.floor(Math.log10(limit / unitSize)) - 2 + decade;
        const sign = negative && !isTime && stem !== 'source_depth' ? '-' : '';
        const text = `${sign}${mantissa}e${exponent}`;
        const magnitude = mantissa * 10 ** exponent * unitSize;
        // Leave out values within a part in 10⁹ of the limit, where the oracle's double arithmetic could round across it.
        fc.pre(Math.abs(magnitude - limit) > 1e-9 * limit);
        const name = `${stem}_${isTime ? time : length}`;
        const perShot = stem.startsWith('source') || stem === 'uphole';
        const base = ['S1,0,10,25', 'S1,0,30,38', 'S1,0,60,48'];
        const columns = ['shot', 'source_x_m', 'receiver_x_m', 'time_ms'];
        const at = columns.findIndex((column) => column.startsWith(`${stem}_`));
        const position = at === -1 ? columns.length : at;
        const rows = base.map((row, index) => {
          const cells = row.split(',');
          if (perShot || index === 1) cells[position] = text;
          else if (at === -1) cells[position] = '';
          return cells.join(',');
        });
        if (at === -1) columns.push(name);
        else columns[at] = name;
        const outcome = readPickTable(`${[columns.join(','), ...rows].join('\n')}\n`, { maxProblems: MAX_PROBLEMS });
        expectWellFormed(outcome);
        const beyond = magnitude > limit;
        const code = isTime ? 'time-implausible' : 'length-implausible';
        if (!beyond) {
          check(outcome.ok, `${name} ${text} (${magnitude} SI, limit ${limit}) was refused: ${JSON.stringify(outcome.ok ? [] : outcome.problems)}`);
          return;
        }
        check(!outcome.ok, `${name} ${text} (${magnitude} SI, limit ${limit}) was accepted`);
        const problems = outcome.ok ? [] : outcome.problems;
        const expected = perShot ? [2, 3, 4] : [3];
        expect(problems.map((problem) => [problem.code, problem.line, problem.column])).toEqual(expected.map((line) => [code, line, position + 1]));
      }),
      { seed: SEED + 4, numRuns: 1000 },
    );
  });

  it('readPickTable never throws on random text, arbitrary or CSV-like (3,500 runs)', () => {
    const csvLike = fc.string({ unit: fc.constantFrom('a', 'S', '1', '0', ',', '"', '\n', '\r', '#', ' ', '.', '-', 'e', 'x', ';', '\t', 'shot', 'time_ms', 'source_x_m', 'receiver_x_m'), maxLength: 200 });
    const withHeader = csvLike.map((rest) => `shot,source_x_m,receiver_x_m,time_ms\n${rest}`);
    fc.assert(
      fc.property(fc.oneof(fc.string({ unit: 'binary', maxLength: 200 }), csvLike, withHeader), (text) => {
        expectWellFormed(readPickTable(text, { maxProblems: MAX_PROBLEMS }));
      }),
      { seed: SEED + 2, numRuns: 3500 },
    );
  });

  it('readPickTable refuses random bytes as encoding-invalid exactly when TextDecoder (fatal) refuses them (1,000 runs)', () => {
    const header = new TextEncoder().encode('shot,source_x_m,receiver_x_m,time_ms\nS1,0,10,25\nS1,0,20,30\nS1,0,');
    fc.assert(
      fc.property(fc.uint8Array({ maxLength: 64 }), fc.boolean(), (tail, prefixed) => {
        const bytes = prefixed ? new Uint8Array([...header, ...tail]) : tail;
        const outcome = readPickTable(bytes, { maxProblems: MAX_PROBLEMS });
        expectWellFormed(outcome);
        let decodable = true;
        try {
          new TextDecoder('utf-8', { fatal: true }).decode(bytes);
        } catch {
          decodable = false;
        }
        const encodingProblems = outcome.ok ? [] : outcome.problems.filter((problem) => problem.code === 'encoding-invalid');
        expect(encodingProblems.length > 0, 'TextDecoder (fatal) as the UTF-8 oracle').toBe(!decodable);
      }),
      { seed: SEED + 3, numRuns: 1000 },
    );
  });
});
