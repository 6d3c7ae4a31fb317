/**
 * readPickTable: one test per problem code, the edges its doc comment names, and unit
 * conversion against outside definitions.
 *
 * Sources: METHODS.md check case 1.1 (computed from the stated model) for the fixture picks;
 * NIST SP 811 (2008) appendix B, 1 ft = 0.3048 m exactly (recalled from memory); SI prefixes
 * (km = 1000 m, ms = 0.001 s). Everything else is the pick-table contract itself.
 */
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { formatProblem, type Problem } from '../../lib/problems.js';
import {
  LARGEST_LENGTH_METRES,
  LATEST_TIME_SECONDS,
  PICK_TABLE_PROBLEM_CODES,
  readPickTable,
  type PickSet,
  type ReadPickTableOptions,
} from '../../lib/picks/index.js';

const FIXTURES = new URL('../fixtures/picks/', import.meta.url);
const fixture = (name: string): Buffer => readFileSync(new URL(name, FIXTURES));

const HEADER = 'shot,source_x_m,receiver_x_m,time_ms';
/** Three valid picks of one shot (METHODS.md check case 1.1, computed from the stated model). */
const SHOT_S1 = ['S1,0,10,25', 'S1,0,30,38.1149', 'S1,0,60,48.1292'];
const table = (...lines: string[]): string => `${lines.join('\n')}\n`;
const VALID = table(HEADER, ...SHOT_S1);

function loaded(input: string | Uint8Array, options?: ReadPickTableOptions): PickSet {
  const outcome = readPickTable(input, options);
  if (!outcome.ok) throw new Error(`expected the table to load, got:\n${outcome.problems.map((problem) => `${problem.code} line ${problem.line}: ${problem.message}`).join('\n')}`);
  return outcome.value;
}

function refused(input: string | Uint8Array, options?: ReadPickTableOptions): readonly Problem[] {
  const outcome = readPickTable(input, options);
  if (outcome.ok) throw new Error('expected the table to be refused, but it loaded');
  expect(outcome).not.toHaveProperty('value');
  return outcome.problems;
}

/** The problems of one code (the test then checks there is exactly what it expects). */
function withCode(problems: readonly Problem[], code: string): Problem[] {
  return problems.filter((problem) => problem.code === code);
}

interface CodeCase {
  readonly code: string;
  readonly title: string;
  readonly input: string | Uint8Array;
  readonly options?: ReadPickTableOptions;
  /** Expected place of the first problem of this code. */
  readonly line: number;
  readonly column: number | null;
  readonly field?: string;
  /** Words the message must contain (the thing and the cause). */
  readonly mentions: readonly string[];
  /** Expected count of problems with this code; 1 when not given. */
  readonly count?: number;
}

/** A count of one with a plural noun ("1 columns", "1 more errors"), which no message may hold. */
const ONE_WITH_PLURAL = /(^|[^\d.,])1 (more )?(fields|columns|bytes|errors|warnings|problems|picks|lines|rows)\b/;

const CODE_CASES: readonly CodeCase[] = [
  {
    code: 'input-too-large', title: 'a text over maxBytes, on the line where the limit falls',
    input: VALID, options: { maxBytes: 40 }, line: 2, column: null, mentions: ['over the limit of 40 bytes', 'line 2'],
  },
  {
    code: 'encoding-invalid', title: 'a Latin-1 byte in a UTF-8 table (fixture latin1-shot-name.csv)',
    input: fixture('latin1-shot-name.csv'), line: 3, column: null, mentions: ['0xFC', 'not valid UTF-8'],
  },
  {
    code: 'encoding-invalid', title: 'a lone UTF-16 surrogate in a text',
    input: table(HEADER, 'S\uD800,0,10,25', ...SHOT_S1), line: 2, column: null, mentions: ['U+D800'],
  },
  { code: 'table-empty', title: 'an empty input', input: '', line: 1, column: null, mentions: ['empty'] },
  { code: 'table-empty', title: 'blank lines only', input: '\n  \r\n\t\n', line: 1, column: null, mentions: ['empty'] },
  { code: 'table-only-comments', title: 'comments only', input: '# line A\n# spread 1\n', line: 1, column: null, mentions: ['only comment lines'] },
  { code: 'table-no-data', title: 'a header with blank lines below', input: table('# survey', HEADER, '', '  '), line: 2, column: null, mentions: ['no data rows'] },
  {
    code: 'problems-truncated', title: 'more problems than maxProblems',
    input: table(HEADER, 'S1,0,10,-1', 'S1,0,20,-2', 'S1,0,30,-3', 'S1,0,40,-4', 'S1,0,50,-5'), options: { maxProblems: 2 },
    line: 4, column: null, mentions: ['3 more errors', 'stops at 2'],
  },
  {
    code: 'quote-spans-lines', title: 'a quoted shot id holding a line break',
    input: table(HEADER, '"S1', 'north",0,10,25', ...SHOT_S1), line: 2, column: 1, mentions: ['closes on line 3', 'line break'],
  },
  { code: 'quote-unclosed', title: 'a quote never closed', input: table(HEADER, ...SHOT_S1, 'S1,0,"70,52'), line: 5, column: 3, mentions: ['never closed'] },
  { code: 'quote-stray', title: 'a quote inside an unquoted cell', input: table(HEADER, ...SHOT_S1, 'S1,0,7"0,52'), line: 5, column: 3, mentions: ['double quote'] },
  {
    code: 'separator-not-comma', title: 'a table saved with semicolons and decimal commas (fixture semicolon-decimal-comma.csv)',
    input: fixture('semicolon-decimal-comma.csv'), line: 2, column: null, mentions: ['separated by semicolons', 'comma-separated values'],
  },
  {
    code: 'separator-not-comma', title: 'a table separated by tabs',
    input: table(HEADER.replaceAll(',', '\t'), ...SHOT_S1.map((row) => row.replaceAll(',', '\t'))), line: 1, column: null, mentions: ['separated by tabs'],
  },
  { code: 'header-name-empty', title: 'an empty header cell', input: table('shot,,source_x_m,receiver_x_m,time_ms', 'S1,,0,10,25'), line: 1, column: 2, mentions: ['column 2 has no name'] },
  {
    code: 'column-unit-unknown', title: 'time in microseconds',
    input: table('shot,source_x_m,receiver_x_m,time_us', 'S1,0,10,25000'), line: 1, column: 4, field: 'time_us', mentions: ['"us" is not accepted'],
  },
  {
    code: 'column-unit-unknown', title: 'positions in yards',
    input: table('shot,source_x_yd,receiver_x_m,time_ms', 'S1,0,10,25'), line: 1, column: 2, field: 'source_x_yd', mentions: ['"yd"'],
  },
  {
    code: 'column-unit-unknown', title: 'a unit suffix on latitude',
    input: table('shot,source_lat_deg,source_lon,receiver_lat,receiver_lon,time_ms', 'S1,1,2,3,4,5'), line: 1, column: 2, mentions: ['takes no unit suffix'],
  },
  { code: 'column-unit-missing', title: 'time without a unit', input: table('shot,source_x_m,receiver_x_m,time', 'S1,0,10,25'), line: 1, column: 4, field: 'time', mentions: ['does not say its unit'] },
  {
    code: 'column-duplicate', title: 'the same quantity in two units',
    input: table('shot,source_x_m,receiver_x_m,time_ms,source_x_km', 'S1,0,10,25,0'), line: 1, column: 5, field: 'source_x_km',
    mentions: ['columns 2 ("source_x_m") and 5 ("source_x_km")'],
  },
  { code: 'column-missing', title: 'no time column', input: table('shot,source_x_m,receiver_x_m', 'S1,0,10'), line: 1, column: null, mentions: ['no time column'] },
  {
    code: 'coordinates-mixed', title: 'source along the line, receiver in latitude/longitude',
    input: table('shot,source_x_m,receiver_lat,receiver_lon,time_ms', 'S1,0,50.1,7.2,25'), line: 1, column: null, mentions: ['"source_x_m"', '"receiver_lat", "receiver_lon"'],
  },
  {
    code: 'coordinates-incomplete', title: 'latitude without longitude',
    input: table('shot,source_lat,receiver_lat,receiver_lon,time_ms', 'S1,50,50.1,7.2,25'), line: 1, column: 2, field: 'source_lat', mentions: ['no partner source_lon'],
  },
  { code: 'comment-after-header', title: 'a # line among the rows', input: table(HEADER, ...SHOT_S1, '# S1,0,70,52'), line: 5, column: null, mentions: ['starting with #'] },
  { code: 'row-field-count', title: 'a row with a missing cell', input: table(HEADER, ...SHOT_S1, 'S1,0,52'), line: 5, column: null, mentions: ['3 fields', 'has 4 columns'] },
  { code: 'row-field-count', title: 'a row with two trailing commas', input: table(HEADER, ...SHOT_S1, 'S1,0,70,52,,'), line: 5, column: null, mentions: ['6 fields'] },
  { code: 'cell-empty', title: 'an empty time', input: table(HEADER, ...SHOT_S1, 'S1,0,70,'), line: 5, column: 4, field: 'time_ms', mentions: ['is empty'] },
  { code: 'cell-empty', title: 'an empty shot id', input: table(HEADER, ...SHOT_S1, ' ,0,70,52'), line: 5, column: 1, field: 'shot', mentions: ['shot identifier'] },
  { code: 'number-invalid', title: 'a hexadecimal time', input: table(HEADER, ...SHOT_S1, 'S1,0,70,0x10'), line: 5, column: 4, field: 'time_ms', mentions: ['"0x10" is not a number'] },
  { code: 'number-invalid', title: 'a time with its unit in the cell', input: table(HEADER, ...SHOT_S1, 'S1,0,70,52ms'), line: 5, column: 4, mentions: ['"52ms"'] },
  { code: 'number-not-finite', title: 'NaN as a time', input: table(HEADER, ...SHOT_S1, 'S1,0,70,NaN'), line: 5, column: 4, mentions: ['"NaN" is not a finite number'] },
  { code: 'number-not-finite', title: 'Infinity as a position', input: table(HEADER, ...SHOT_S1, 'S1,0,-Infinity,52'), line: 5, column: 3, mentions: ['"-Infinity"'] },
  { code: 'number-too-large', title: '1e999 as a position', input: table(HEADER, ...SHOT_S1, 'S1,0,1e999,52'), line: 5, column: 3, mentions: ['too large'] },
  {
    code: 'time-implausible', title: 'a time of 1e300 ms',
    input: table(HEADER, ...SHOT_S1, 'S1,0,70,1e300'), line: 5, column: 4, field: 'time_ms', mentions: ['"1e300"', 'at most 100000000 ms (1e5 s)', 'more than a day'],
  },
  {
    code: 'length-implausible', title: 'a receiver position of 5e7 m',
    input: table(HEADER, ...SHOT_S1, 'S1,0,5e7,52'), line: 5, column: 3, field: 'receiver_x_m', mentions: ['"5e7"', 'within ±4.1e7 m', "Earth's circumference"],
  },
  { code: 'time-negative', title: 'a negative time', input: table(HEADER, ...SHOT_S1, 'S1,0,70,-0.5'), line: 5, column: 4, field: 'time_ms', mentions: ['"-0.5"', 'must be 0 or more'] },
  {
    code: 'sigma-not-positive', title: 'a zero uncertainty',
    input: table(`${HEADER},sigma_ms`, 'S1,0,10,25,0.3', 'S1,0,30,38.1149,0', 'S1,0,60,48.1292,0.3'), line: 3, column: 5, field: 'sigma_ms', mentions: ['the pick uncertainty as one standard deviation must be more than 0'],
  },
  {
    code: 'source-depth-negative', title: 'a negative shot depth',
    input: table(`${HEADER},source_depth_m`, 'S1,0,10,25,-1', 'S1,0,30,38.1149,-1', 'S1,0,60,48.1292,-1'), line: 2, column: 5, mentions: ['shot depth'], count: 3,
  },
  {
    code: 'uphole-negative', title: 'a negative uphole time',
    input: table(`${HEADER},uphole_ms`, 'S1,0,10,25,-2', 'S1,0,30,38.1149,-2', 'S1,0,60,48.1292,-2'), line: 2, column: 5, mentions: ['uphole time'], count: 3,
  },
  {
    code: 'latitude-out-of-range', title: 'latitude 91',
    input: table('shot,source_lat,source_lon,receiver_lat,receiver_lon,time_ms', 'S1,50,7,50.001,7,25', 'S1,50,7,91,7,30', 'S1,50,7,50.003,7,35'),
    line: 3, column: 4, field: 'receiver_lat', mentions: ['"91"', 'the receiver latitude in decimal degrees WGS84 must lie between -90 and 90'],
  },
  {
    code: 'longitude-out-of-range', title: 'longitude 360',
    input: table('shot,source_lat,source_lon,receiver_lat,receiver_lon,time_ms', 'S1,50,7,50.001,7,25', 'S1,50,7,50.002,360,30', 'S1,50,7,50.003,7,35'),
    line: 3, column: 5, field: 'receiver_lon', mentions: ['"360"', 'not including) 360'],
  },
  { code: 'branch-invalid', title: 'branch 1.5', input: table(`${HEADER},branch`, 'S1,0,10,25,1', 'S1,0,30,38.1149,1.5', 'S1,0,60,48.1292,2'), line: 3, column: 5, mentions: ['"1.5"'] },
  {
    code: 'pick-duplicate', title: 'one receiver id picked twice for a shot',
    input: table(`${HEADER},receiver`, 'S1,0,10,25,G1', 'S1,0,30,38.1149,G3', 'S1,0,60,48.1292,G1'), line: 4, column: 5, field: 'receiver', mentions: ['receiver "G1"', 'lines 2 and 4'],
  },
  {
    code: 'pick-duplicate', title: 'one receiver position picked twice (no receiver column)',
    input: table(HEADER, ...SHOT_S1, 'S1,0,10.0,25.2'), line: 5, column: null, mentions: ['receiver_x_m 10', 'lines 2 and 5'],
  },
  {
    code: 'shot-too-few-picks', title: 'a shot with two picks',
    input: table(HEADER, ...SHOT_S1, 'S2,100,90,25', 'S2,100,70,38.1149'), line: 5, column: null, mentions: ['shot "S2" has only 2 picks', 'lines 5, 6'],
  },
  {
    code: 'shot-source-inconsistent', title: 'one shot id at two source positions',
    input: table(HEADER, 'S1,0,10,25', 'S1,0,30,38.1149', 'S1,5,60,48.1292'), line: 4, column: 2, field: 'source_x_m', mentions: ['source_x_m 0 on line 2 but 5 on line 4'],
  },
  {
    code: 'shot-source-inconsistent', title: 'a source elevation given on one row only',
    input: table(`${HEADER},source_elev_m`, 'S1,0,10,25,101.5', 'S1,0,30,38.1149,', 'S1,0,60,48.1292,101.5'), line: 3, column: 5, mentions: ['101.5 on line 2 but empty on line 3'],
  },
];

describe('readPickTable problem codes', () => {
  it.each(CODE_CASES.map((entry) => [entry.code, entry.title, entry] as const))('readPickTable reports %s for %s', (code, _title, entry) => {
    const problems = refused(entry.input, entry.options);
    const found = withCode(problems, code);
    expect(found, JSON.stringify(problems, null, 1)).toHaveLength(entry.count ?? 1);
    const [first] = found;
    expect(first?.severity).toBe('error');
    expect(first?.line).toBe(entry.line);
    expect(first?.column).toBe(entry.column);
    if (entry.field !== undefined) expect(first?.field).toBe(entry.field);
    for (const words of entry.mentions) expect(first?.message).toContain(words);
    expect(first?.fix.length).toBeGreaterThan(10);
    for (const problem of problems) expect(`${problem.message}; ${problem.fix}`).not.toMatch(ONE_WITH_PLURAL);
  });

  it('readPickTable has a test case for every problem code it may report', () => {
    const tested = new Set([...CODE_CASES.map((entry) => entry.code), 'column-unknown']);
    expect(Object.keys(PICK_TABLE_PROBLEM_CODES).filter((code) => !tested.has(code))).toEqual([]);
  });

  it('readPickTable loads a table with an unknown column and warns about it (column-unknown)', () => {
    const outcome = readPickTable(table(`${HEADER},geophone_type`, 'S1,0,10,25,4.5Hz', 'S1,0,30,38.1149,4.5Hz', 'S1,0,60,48.1292,4.5Hz'));
    expect(outcome.ok).toBe(true);
    if (!outcome.ok) return;
    expect(outcome.warnings).toEqual([
      expect.objectContaining({ code: 'column-unknown', severity: 'warning', line: 1, column: 5, field: 'geophone_type' }),
    ]);
    expect(outcome.warnings[0]?.message).toContain('"geophone_type" is not a pick-table column');
  });

  it('readPickTable refuses the whole table when one row of many is bad (never a partial load)', () => {
    const problems = refused(table(HEADER, ...SHOT_S1, 'S2,100,90,25', 'S2,100,70,-38', 'S2,100,40,48.1292'));
    expect(problems.map((problem) => problem.code)).toEqual(['time-negative']);
  });

  it('readPickTable reports each bad row of the same kind, up to the cap', () => {
    const rows = Array.from({ length: 30 }, (_, index) => `S1,0,${index + 1},oops`);
    expect(withCode(refused(table(HEADER, ...rows)), 'number-invalid').map((problem) => problem.line)).toEqual(rows.map((_, index) => index + 2));
    const capped = refused(table(HEADER, ...rows), { maxProblems: 10 });
    expect(capped).toHaveLength(11);
    expect(capped.at(-1)).toMatchObject({ code: 'problems-truncated', line: 12, message: expect.stringContaining('20 more errors') });
  });

  it('readPickTable names the accepted spellings when a required column is missing', () => {
    const problems = refused(table('shot,time_ms', 'S1,25'));
    expect(withCode(problems, 'column-missing').map((problem) => problem.fix)).toEqual([
      expect.stringContaining('source_x_m, source_x_km or source_x_ft'),
      expect.stringContaining('receiver_x_m, receiver_x_km or receiver_x_ft'),
    ]);
    expect(withCode(refused(table('shot,source_x_m,receiver_x_m', 'S1,0,1')), 'column-missing')[0]?.fix).toContain('time_ms or time_s');
  });

  it('readPickTable reports a column with a bad unit once, not again as missing', () => {
    const problems = refused(table('shot,source_x_m,receiver_x_m,time_us', 'S1,0,10,25000'));
    expect(problems.map((problem) => problem.code)).toEqual(['column-unit-unknown']);
    expect(problems[0]?.fix).toContain('time_ms or time_s');
  });

  it('readPickTable refuses a quoted field that closes more than ten lines below as unclosed, and reads the lines after it', () => {
    const rows = Array.from({ length: 12 }, (_, index) => `S1,0,${index + 10},30`);
    const problems = refused(table(HEADER, 'S1,"0,1,25', ...rows, 'S1,0,5",3,4'));
    expect(problems.map((problem) => `${problem.code}@${problem.line}`)).toEqual(['quote-unclosed@2', 'quote-stray@15']);
  });

  it('readPickTable still counts a row with a wrong field count toward its shot (no follow-on too-few error)', () => {
    expect(refused(table(HEADER, 'S1,0,10,25', 'S1,0,30', 'S1,0,60,48.1292')).map((problem) => problem.code)).toEqual(['row-field-count']);
  });

  it('readPickTable checks cells even when the header has errors, but runs no checks across rows', () => {
    const problems = refused(table('shot,,source_x_m,receiver_x_m,time_ms', 'S1,,0,10,-25', 'S1,,0,10,30'));
    expect(problems.map((problem) => problem.code)).toEqual(['header-name-empty', 'time-negative']);
  });
});

describe('readPickTable reading', () => {
  it('readPickTable reads the check-case fixture into SI units (METHODS.md check case 1.1)', () => {
    const picks = loaded(fixture('check-case-1-1.csv'));
    expect(picks.shotIds).toEqual(['S1', 'S2']);
    expect(picks.picks.map((pick) => pick.time)).toEqual([0.025, 0.0381149, 0.0481292, 0.0595578, 0.025, 0.0381149, 0.0481292, 0.0595578]);
    expect(picks.picks.map((pick) => pick.receiverX)).toEqual([10, 30, 60, 100, 90, 70, 40, 0]);
    expect(picks.picks.map((pick) => pick.line)).toEqual([4, 5, 6, 7, 8, 9, 10, 11]);
    expect(picks).toMatchObject({ coordinateSystem: 'line', suggestedScale: 'engineering' });
  });

  it('readPickTable reads the km/s fixture (BOM, CRLF) into the identical doubles as the m/ms one', () => {
    const engineering = loaded(fixture('check-case-1-1.csv'));
    const crustal = loaded(fixture('check-case-1-1-crustal.csv'));
    expect(crustal.suggestedScale).toBe('crustal');
    const withoutLines = (set: PickSet): unknown[] => set.picks.map(({ line: _line, ...rest }) => rest);
    expect(withoutLines(crustal)).toEqual(withoutLines(engineering));
    expect(crustal.picks.map((pick) => pick.line)).toEqual([3, 4, 5, 6, 7, 8, 9, 10]);
  });

  it('readPickTable converts feet with 1 ft = 0.3048 m exactly (NIST SP 811)', () => {
    const picks = loaded(table('shot,source_x_ft,receiver_x_ft,time_s,source_elev_ft,source_depth_ft', 'S1,0,100,0.025,1000,10', 'S1,0,5280,0.5,1000,10', 'S1,0,-3,0.01,1000,10'));
    // NIST SP 811 (2008) appendix B: the international foot is 0.3048 m exactly (recalled from memory).
    expect(picks.picks.map((pick) => pick.receiverX)).toEqual([30.48, 1609.344, -0.9144]);
    expect(picks.picks[0]).toMatchObject({ sourceElevation: 304.8, sourceDepth: 3.048, time: 0.025 });
    expect(picks.suggestedScale).toBe('engineering');
  });

  it('readPickTable converts km, ms and s by SI prefixes, uncertainty and uphole included', () => {
    const picks = loaded(table('shot,source_x_km,receiver_x_km,time_ms,sigma_ms,uphole_s', 'S1,1.5,1.51,25,0.3,0.002', 'S1,1.5,1.53,38.1149,0.3,0.002', 'S1,1.5,1.56,48.1292,0.3,0.002'));
    expect(picks.picks.map((pick) => [pick.sourceX, pick.receiverX, pick.time, pick.sigma, pick.uphole])).toEqual([
      [1500, 1510, 0.025, 0.0003, 0.002],
      [1500, 1530, 0.0381149, 0.0003, 0.002],
      [1500, 1560, 0.0481292, 0.0003, 0.002],
    ]);
    expect(picks.suggestedScale).toBe('crustal');
  });

  it('readPickTable matches header names case-insensitively and ignores whitespace around names and cells', () => {
    const picks = loaded(table(' Shot , SOURCE_X_M ,Receiver_X_m,\tTime_Ms ', '  S1 , 0 , 10 , 25 ', 'S1,0,30,38.1149', 'S1,0,60,48.1292'));
    expect(picks.picks[0]).toMatchObject({ shot: 'S1', receiverX: 10, time: 0.025 });
  });

  it('readPickTable tolerates one trailing comma on every row, the header included', () => {
    const picks = loaded(table(`${HEADER},`, ...SHOT_S1.map((row) => `${row},`)));
    expect(picks.picks).toHaveLength(3);
  });

  it('readPickTable skips comments and blank lines above the header and blank lines below it', () => {
    const picks = loaded(`\n# site: line A\n   \n  # geophones 4.5 Hz\n${HEADER}\n${SHOT_S1[0]}\n\n${SHOT_S1[1]}\n  \n${SHOT_S1[2]}`);
    expect(picks.picks.map((pick) => pick.line)).toEqual([6, 8, 10]);
  });

  it('readPickTable counts lines across LF, CRLF and lone CR endings alike', () => {
    const problems = refused(`${HEADER}\r${SHOT_S1[0]}\r\n${SHOT_S1[1]}\nS1,0,60,-1\r`);
    expect(problems).toEqual([expect.objectContaining({ code: 'time-negative', line: 4 })]);
  });

  it('readPickTable strips one byte-order mark from bytes and from text', () => {
    const bytes = Buffer.concat([Buffer.from([0xef, 0xbb, 0xbf]), Buffer.from(VALID)]);
    expect(loaded(bytes).picks).toHaveLength(3);
    expect(loaded(`\uFEFF${VALID}`).picks).toHaveLength(3);
    expect(withCode(refused(`\uFEFF\uFEFFx${VALID}`), 'column-unknown')).toHaveLength(1);
  });

  it('readPickTable reads the branch column: numbers, x (excluded) and empty (automatic)', () => {
    const picks = loaded(table(`${HEADER},branch`, 'S1,0,10,25,1', 'S1,0,30,38.1149,X', 'S1,0,60,48.1292,', 'S1,0,100,59.5578,x'));
    expect(picks.picks.map((pick) => [pick.branch, pick.excluded])).toEqual([[1, false], [null, true], [null, false], [null, true]]);
    expect(picks.columns.branch).toBe(true);
  });

  it.each(['0', '-1', '2.0', 'y', '1e1', '+2', '99999999999999999'])('readPickTable refuses branch %j', (branch) => {
    expect(withCode(refused(table(`${HEADER},branch`, ...SHOT_S1.map((row) => `${row},${branch}`))), 'branch-invalid')).toHaveLength(3);
  });

  it('readPickTable reads geographic tables with x set to 0 and the crustal scale', () => {
    const picks = loaded(table('shot,source_lat,source_lon,receiver_lat,receiver_lon,time_s', 'S1,-90,-180,-89.9,359.9,1', 'S1,-90,-180,-89.8,0,2', 'S1,-90,-180,90,180,3'));
    expect(picks).toMatchObject({ coordinateSystem: 'geographic', suggestedScale: 'crustal' });
    expect(picks.picks.map((pick) => [pick.sourceX, pick.receiverX, pick.receiverLat, pick.receiverLon])).toEqual([[0, 0, -89.9, 359.9], [0, 0, -89.8, 0], [0, 0, 90, 180]]);
    expect(picks.picks[0]).toMatchObject({ sourceLat: -90, sourceLon: -180 });
  });

  it('readPickTable refuses longitude below -180 and latitude below -90', () => {
    const problems = refused(table('shot,source_lat,source_lon,receiver_lat,receiver_lon,time_s', 'S1,-90.5,-180,1,2,1', 'S1,-90,-180.1,1,3,2', 'S1,-90,-180,1,4,3'));
    expect(problems.map((problem) => problem.code)).toEqual(['latitude-out-of-range', 'longitude-out-of-range']);
  });

  it('readPickTable sets the column flags and leaves empty optional cells null', () => {
    const picks = loaded(table(`${HEADER},receiver,receiver_elev_m,sigma_ms`, 'S1,0,10,25,G10,99.5,', 'S1,0,30,38.1149,,98,0.5', 'S1,0,60,48.1292,G60,,0.5'));
    expect(picks.columns).toEqual({ receiver: true, sigma: true, branch: false, sourceElevation: false, receiverElevation: true, sourceDepth: false, uphole: false });
    expect(picks.picks.map((pick) => [pick.receiver, pick.receiverElevation, pick.sigma])).toEqual([['G10', 99.5, null], [null, 98, 0.0005], ['G60', null, 0.0005]]);
  });

  it('readPickTable keeps shot ids as text in order of first appearance, quoted commas included', () => {
    const picks = loaded(table(HEADER, 'B,0,10,25', '"A, west",5,10,25', 'B,0,30,38', '"A, west",5,30,38', 'B,0,60,48', '"A, west",5,60,48'));
    expect(picks.shotIds).toEqual(['B', 'A, west']);
  });

  it('readPickTable accepts two receiver ids at one position for a shot (duplicates go by id when ids are given)', () => {
    expect(loaded(table(`${HEADER},receiver`, 'S1,0,10,25,G1', 'S1,0,10,25.1,G1b', 'S1,0,60,48.1292,G6')).picks).toHaveLength(3);
  });

  it('readPickTable accepts a later arrival at the same receiver under its own branch number, but not twice for one branch', () => {
    // A masked layer's head wave picked as a later phase (branch 2) beside the first arrival (branch 3).
    const later = loaded(table(`${HEADER},branch`, 'S1,0,10,25,1', 'S1,0,60,48.1292,3', 'S1,0,60,52.4,2', 'S1,0,80,55.0,3'));
    expect(later.picks.map((pick) => pick.branch)).toEqual([1, 3, 2, 3]);
    const outcome = readPickTable(table(`${HEADER},branch`, 'S1,0,10,25,1', 'S1,0,60,48.1292,2', 'S1,0,60,52.4,2', 'S1,0,80,55.0,2'));
    expect(outcome.ok).toBe(false);
    if (!outcome.ok) expect(outcome.problems.map((problem) => [problem.code, problem.line])).toEqual([['pick-duplicate', 4]]);
  });

  it('readPickTable counts excluded picks toward the three picks a shot needs', () => {
    expect(loaded(table(`${HEADER},branch`, 'S1,0,10,25,x', 'S1,0,30,38.1149,x', 'S1,0,60,48.1292,')).picks).toHaveLength(3);
  });

  it('readPickTable throws on misuse: an input of the wrong type or options that are not whole numbers >= 1', () => {
    expect(() => readPickTable(42 as unknown as string)).toThrow(TypeError);
    expect(() => readPickTable(VALID, { maxProblems: 0 })).toThrow(/maxProblems must be a whole number/);
    expect(() => readPickTable(VALID, { maxBytes: 1.5 })).toThrow(/maxBytes must be a whole number/);
  });
});

describe('readPickTable magnitude limits', () => {
  /** Three picks of one shot with one extra column whose cell on the middle row is `value`. */
  const withCell = (name: string, value: string, others = value): string =>
    table(`${HEADER},${name}`, `${SHOT_S1[0]},${others}`, `${SHOT_S1[1]},${value}`, `${SHOT_S1[2]},${others}`);

  it('readPickTable keeps its limits above a day and above the Earth\'s circumference', () => {
    // A day is 86,400 s; the equatorial circumference is 2π × 6,378,137 m (WGS84 semi-major axis).
    expect(LATEST_TIME_SECONDS).toBeGreaterThan(86_400);
    expect(LARGEST_LENGTH_METRES).toBeGreaterThan(2 * Math.PI * 6_378_137);
  });

  it.each([
    ['time at the limit in s', table('shot,source_x_m,receiver_x_m,time_s', 'S1,0,10,100000', 'S1,0,30,0.03', 'S1,0,60,0.05')],
    ['time at the limit in ms', table(HEADER, 'S1,0,10,100000000', 'S1,0,30,38', 'S1,0,60,48')],
    ['sigma at the limit', withCell('sigma_ms', '1e8', '0.3')],
    ['uphole at the limit', withCell('uphole_s', '1e5')],
    ['a negative position at the limit in km', table('shot,source_x_km,receiver_x_km,time_ms', 'S1,-41000,-40999.99,25', 'S1,-41000,-40999.97,38', 'S1,-41000,-40999.94,48')],
    ['an elevation at the limit', withCell('receiver_elev_m', '4.1e7', '100')],
    ['a shot depth at the limit', withCell('source_depth_m', '41000000')],
    ['an elevation in ft under the limit (1.345e8 ft = 40,995,600 m)', withCell('source_elev_ft', '1.345e8')],
  ])('readPickTable accepts %s (the limits are included)', (_title, input) => {
    expect(loaded(input).picks).toHaveLength(3);
  });

  it.each([
    ['a time just over 1e8 ms', table(HEADER, ...SHOT_S1, 'S1,0,70,100000000.001'), 'time-implausible', 5, 'time_ms'],
    ['a time just over 1e5 s', table('shot,source_x_m,receiver_x_m,time_s', 'S1,0,10,0.025', 'S1,0,30,1.00000000001e5', 'S1,0,60,0.05'), 'time-implausible', 3, 'time_s'],
    ['a pick uncertainty of 2e5 s', withCell('sigma_s', '2e5', '0.0003'), 'time-implausible', 3, 'sigma_s'],
    ['an uphole time of 1e9 ms', withCell('uphole_ms', '1e9', '1e9'), 'time-implausible', 2, 'uphole_ms'],
    ['a position just beyond -41000 km', table('shot,source_x_km,receiver_x_km,time_ms', 'S1,0,0.01,25', 'S1,0,-41000.001,38', 'S1,0,0.06,48'), 'length-implausible', 3, 'receiver_x_km'],
    ['an elevation of 1.4e8 ft (42,672 km)', withCell('source_elev_ft', '1.4e8', '1.4e8'), 'length-implausible', 2, 'source_elev_ft'],
    ['a shot depth of 5e7 m', withCell('source_depth_m', '5e7', '5e7'), 'length-implausible', 2, 'source_depth_m'],
  ])('readPickTable refuses %s', (_title, input, code, line, field) => {
    const problems = refused(input);
    expect(problems[0]).toMatchObject({ code, line, field });
    expect(problems[0]?.fix).toContain('mistyped exponent');
  });

  it('readPickTable states the limit in the column\'s unit and in SI, approximately for feet', () => {
    expect(refused(withCell('source_elev_ft', '1.4e8', '1.4e8'))[0]?.message).toContain('within about ±134500000 ft (4.1e7 m)');
    expect(refused(withCell('uphole_s', '2e5', '2e5'))[0]?.message).toContain('at most 1e5 s, a limit');
  });

  it('readPickTable reports a huge negative time as negative, not as implausible', () => {
    expect(refused(table(HEADER, ...SHOT_S1, 'S1,0,70,-1e300')).map((problem) => problem.code)).toEqual(['time-negative']);
  });
});

describe('readPickTable separators', () => {
  it('readPickTable reports a semicolon table with one problem in the project grammar (fixture semicolon-decimal-comma.csv)', () => {
    expect(refused(fixture('semicolon-decimal-comma.csv')).map(formatProblem)).toEqual([
      'line 2: the table is separated by semicolons; slopebreak reads comma-separated values; save it as CSV with commas (decimal points, not commas)',
    ]);
  });

  it('readPickTable reports a tab-separated table with quoted names as one separator-not-comma problem', () => {
    const tabbed = table('"shot"\t"source_x_m"\t"receiver_x_m"\t"time_ms"', 'S1\t0\t10\t25', 'S1\t0\t30\t38.1149');
    expect(refused(tabbed)).toEqual([expect.objectContaining({ code: 'separator-not-comma', line: 1, column: null, message: expect.stringContaining('by tabs') })]);
  });

  it('readPickTable reads a header with a comma as comma-separated, semicolons in a name notwithstanding', () => {
    const outcome = readPickTable(table(`${HEADER},notes;remarks`, ...SHOT_S1.map((row) => `${row},a;b`)));
    expect(outcome.ok && outcome.warnings.map((problem) => problem.code)).toEqual(['column-unknown']);
  });
});

describe('readPickTable problem order', () => {
  const MIXED = table(
    'shot,source_x_m,receiver_x_m,time_ms,remark',
    'S2,100,90,-5,a',
    'S1,0,10,25,b',
    'S1,0,30,oops,c',
    'S1,0,60,48.1292,d',
    'S1,0,100,59.5578',
    'S1,0,10,25.5,e',
  );

  it('readPickTable returns problems sorted by line, then column, a whole-line problem after the cells of its line', () => {
    // Found in the order column-unknown, time-negative, number-invalid, row-field-count, then the
    // checks across rows: pick-duplicate (line 7) before shot-too-few-picks (line 2).
    expect(refused(MIXED).map((problem) => `${problem.line}:${problem.column ?? '-'} ${problem.code}`)).toEqual([
      '1:5 column-unknown',
      '2:4 time-negative',
      '2:- shot-too-few-picks',
      '4:4 number-invalid',
      '6:- row-field-count',
      '7:- pick-duplicate',
    ]);
  });

  it('readPickTable keeps problems at one place in the order found', () => {
    const problems = refused(table('source_x_m,receiver_x_m,notes', '0,10,a'));
    expect(problems.map((problem) => [problem.column, problem.message])).toEqual([
      [3, expect.stringContaining('"notes"')],
      [null, expect.stringContaining('no shot column')],
      [null, expect.stringContaining('no time column')],
    ]);
  });

  it('readPickTable lists the problems that sort first when the cap cuts the list, wherever they were found', () => {
    const problems = refused(MIXED, { maxProblems: 3 });
    expect(problems.map((problem) => `${problem.line} ${problem.code}`)).toEqual(['1 column-unknown', '2 time-negative', '2 shot-too-few-picks', '4 problems-truncated']);
    expect(problems.at(-1)?.message).toContain('3 more errors were found from this line on');
  });
});

describe('readPickTable wording', () => {
  it('readPickTable counts one column and one field in the singular', () => {
    expect(withCode(refused(table('shot', 'S1,0')), 'row-field-count')[0]?.message).toContain('the row has 2 fields but the header (line 1) has 1 column');
    expect(withCode(refused(table(HEADER, ...SHOT_S1, 'S1')), 'row-field-count')[0]?.message).toContain('the row has 1 field but the header (line 1) has 4 columns');
  });

  it('readPickTable words the truncation entry for one problem left off, and for a mix of errors and warnings', () => {
    const one = refused(table(HEADER, 'S1,0,10,-1', 'S1,0,20,-2', 'S1,0,30,-3'), { maxProblems: 2 });
    expect(one.at(-1)?.message).toBe('1 more error was found from this line on and is not listed (the list stops at 2)');
    const mixed = refused(table(`${HEADER},notes,remarks`, 'S1,0,10,-1,a,b', 'S1,0,30,38.1149,a,b', 'S1,0,60,48.1292,a,b'), { maxProblems: 1 });
    expect(mixed.at(-1)?.message).toContain('2 more problems (one of them an error) were found');
  });

  it('readPickTable says "1 byte" for a size limit of one byte', () => {
    expect(withCode(refused(VALID, { maxBytes: 1 }), 'input-too-large')[0]?.message).toContain('over the limit of 1 byte (');
  });

  it('readPickTable lists an unknown-column warning in a refusal with a fix that reads right there (no "silence this warning")', () => {
    // A misspelt required column: the warning is the clue to the error, so the refusal keeps it.
    const problems = refused(table('shot,source_x_m,receiver_x_m,tme_ms', 'S1,0,10,25'));
    expect(problems.map((problem) => `${problem.severity} ${problem.code}`)).toEqual(['warning column-unknown', 'error column-missing']);
    expect(problems[0]?.fix).toContain('rename it');
    expect(problems[0]?.fix).not.toMatch(/silence|this warning/);
  });
});
