/**
 * The browser client's number formatting (client/src/format.ts) and URLs (client/src/routes.ts).
 *
 * Formatting follows common practice for reporting a measurement: the standard error to two
 * significant figures and the value rounded to the same decimal place (as metrology guides
 * recommend; expected strings below are worked out by hand from that rule). Unit factors are
 * checked against the engine's own conversions (lib/units.ts) as the oracle.
 */
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { DISPLAY_UNITS, distanceFromSI, timeFromSI, velocityFromSI } from '../../lib/units.js';
import { branchLabel, decimalsFor, displayFactors, plain, plotlyText, quantity, reductionFactor, shortDateTime, withError } from '../../client/src/format.js';
import { parseRoute, paths } from '../../client/src/routes.js';

/** The client multiplies by 1e-3 where lib divides by 1000: the two differ by at most an ulp or so. */
const CONVERSION_RELATIVE_TOLERANCE = 4 * Number.EPSILON;

describe('decimalsFor', () => {
  it('decimalsFor gives the decimal places that show the standard error to two significant figures', () => {
    // By hand: 21 → "21" (0 places); 2.5 → "2.5" (1); 1 → "1.0" (1); 0.15 → "0.15" (2);
    // 0.1 → "0.10" (2); 0.0379 → "0.038" (3); 0.0797 → "0.080" (3); 0.00042 → "0.00042" (5).
    const cases: [number, number][] = [[21, 0], [20.69, 0], [2.5, 1], [1, 1], [0.15, 2], [0.1, 2], [0.0379, 3], [0.0797, 3], [0.00042, 5]];
    for (const [se, places] of cases) expect(decimalsFor(se, 1000), `SE ${se}`).toBe(places);
  });

  it('decimalsFor stays within 0 to 6 places for very large and very small errors', () => {
    expect(decimalsFor(150, 1000)).toBe(0);
    expect(decimalsFor(25_000, 1000)).toBe(0);
    expect(decimalsFor(1e-9, 1)).toBe(6);
  });

  it('decimalsFor without a usable error falls back to the value (a thousandth of it), and to 2 places for zero', () => {
    for (const se of [null, undefined, 0, -1, Number.NaN, Number.POSITIVE_INFINITY]) {
      // 1234.5 / 1000 = 1.2345, two significant figures: 1 place.
      expect(decimalsFor(se, 1234.5), `SE ${se}`).toBe(1);
    }
    expect(decimalsFor(null, 0)).toBe(2);
    expect(decimalsFor(null, Number.NaN)).toBe(2);
  });
});

describe('withError, quantity and plain', () => {
  it('withError writes value ± SE at the SE\'s two significant figures (sample survey layer values)', () => {
    // Values as lib reports the sample's layers (m/s and m).
    expect(withError(1381.1219584850987, 20.689719248556106)).toBe('1381 ± 21');
    expect(withError(2.5565287327007518, 0.03790872244686063)).toBe('2.557 ± 0.038');
    expect(withError(10.032559489259087, 0.07971285794978532)).toBe('10.033 ± 0.080');
    expect(withError(4263.680192877431, 25.864927427679387)).toBe('4264 ± 26');
  });

  it('withError writes an em dash for a missing or non-finite value and the value alone without an SE', () => {
    for (const value of [null, undefined, Number.NaN, Number.POSITIVE_INFINITY]) expect(withError(value, 1)).toBe('—');
    expect(withError(5, null)).not.toContain('±');
    expect(withError(5, Number.NaN)).not.toContain('±');
    expect(withError(5, null)).toBe('5'); // four significant figures, trailing zeros dropped
    expect(withError(1381.2345, null)).toBe('1381');
  });

  it('quantity puts the unit after a narrow no-break space, and nothing after an em dash', () => {
    expect(quantity(1381.12, 20.69, 'm/s')).toBe('1381 ± 21\u202fm/s');
    expect(quantity(null, 1, 'm')).toBe('—');
  });

  it('plain rounds to the places asked, drops trailing zeros, and writes an em dash for non-finite numbers', () => {
    expect(plain(3.14159)).toBe('3.14');
    expect(plain(1.1)).toBe('1.1');
    expect(plain(22.203779804579522, 0)).toBe('22');
    expect(plain(Number.NaN)).toBe('—');
    expect(plain(Number.NEGATIVE_INFINITY)).toBe('—');
  });
});

describe('displayFactors, reductionFactor and labels', () => {
  it('displayFactors converts SI as lib/units.ts does, for both scales', () => {
    for (const units of Object.values(DISPLAY_UNITS)) {
      const factors = displayFactors(units);
      for (const metres of [0.75, 1500, 123_456.7]) {
        const expected = distanceFromSI(metres, units);
        expect(Math.abs(metres * factors.distance - expected)).toBeLessThanOrEqual(CONVERSION_RELATIVE_TOLERANCE * expected);
      }
      for (const seconds of [0.00373, 0.4, 12.5]) {
        const expected = timeFromSI(seconds, units);
        expect(Math.abs(seconds * factors.time - expected)).toBeLessThanOrEqual(CONVERSION_RELATIVE_TOLERANCE * expected);
      }
    }
  });

  it('reductionFactor turns display distance over display velocity into display time (m ÷ m/s × 1000 = ms; km ÷ km/s = s)', () => {
    for (const units of Object.values(DISPLAY_UNITS)) {
      const [metres, metresPerSecond] = [72, 4000];
      const expected = timeFromSI(metres / metresPerSecond, units);
      const got = (distanceFromSI(metres, units) / velocityFromSI(metresPerSecond, units)) * reductionFactor(units);
      expect(Math.abs(got - expected), units.scale).toBeLessThanOrEqual(CONVERSION_RELATIVE_TOLERANCE * expected);
    }
    expect(reductionFactor(DISPLAY_UNITS.engineering)).toBe(1000);
    expect(reductionFactor(DISPLAY_UNITS.crustal)).toBe(1);
  });

  it('branchLabel names branch 1 the direct wave and branch n the head wave of refractor n − 1', () => {
    expect(branchLabel(1)).toBe('direct wave');
    expect(branchLabel(2)).toBe('refractor 1');
    expect(branchLabel(3)).toBe('refractor 2');
  });
});

describe('parseRoute and paths', () => {
  const id = '3f2b8c1e-0a4d-4e5f-9b6a-7c8d9e0f1a2b';

  it('parseRoute reads a survey, a revision and a report address, with or without a trailing slash', () => {
    expect(parseRoute(`/surveys/${id}`)).toEqual({ surveyId: id, revision: null, report: false });
    expect(parseRoute(`/surveys/${id}/`)).toEqual({ surveyId: id, revision: null, report: false });
    expect(parseRoute(`/surveys/${id}/revisions/12`)).toEqual({ surveyId: id, revision: 12, report: false });
    expect(parseRoute(`/surveys/${id}/revisions/12/report`)).toEqual({ surveyId: id, revision: 12, report: true });
    expect(parseRoute(`/surveys/${id}/revisions/12/report/`)).toEqual({ surveyId: id, revision: 12, report: true });
  });

  it('parseRoute refuses every other path (no survey, no revision, no report)', () => {
    const none = { surveyId: null, revision: null, report: false };
    for (const pathname of [
      '/', '', '/surveys', '/surveys/', `/api/surveys/${id}`, `surveys/${id}`, `/surveys/${id}/report`,
      `/surveys/${id}/revisions`, `/surveys/${id}/revisions/`, `/surveys/${id}/revisions/x`, `/surveys/${id}/revisions/-1`,
      `/surveys/${id}/revisions/1.5`, `/surveys/${id}/revisions/2/report/extra`, `/surveys/${id}/extra`, '/surveys/a b',
      '/surveys/../etc', '/surveys/%2e%2e', `/surveys/${'a'.repeat(65)}`, `/surveys/${id}?x=1`, `/Surveys/${id}`,
    ]) {
      expect(parseRoute(pathname), pathname).toEqual(none);
    }
    expect(parseRoute(`/surveys/${'a'.repeat(64)}`).surveyId).toBe('a'.repeat(64));
  });

  it('parseRoute reads back every address paths builds (fast-check, fixed seed, 1,000 runs)', () => {
    const idArbitrary = fc.stringMatching(/^[0-9A-Za-z_-]{1,64}$/);
    const revisionArbitrary = fc.integer({ min: 1, max: 1_000_000 }); // revisions are numbered from 1
    fc.assert(
      fc.property(idArbitrary, revisionArbitrary, (surveyId, revision) => {
        expect(parseRoute(paths.survey(surveyId))).toEqual({ surveyId, revision: null, report: false });
        expect(parseRoute(paths.revision(surveyId, revision))).toEqual({ surveyId, revision, report: false });
        expect(parseRoute(paths.report(surveyId, revision))).toEqual({ surveyId, revision, report: true });
      }),
      { seed: 90_210, numRuns: 1000 },
    );
  });
});

describe('plotlyText and shortDateTime', () => {
  it('plotlyText escapes the characters plotly reads as markup, so user text is shown as written (common practice: HTML escaping)', () => {
    expect(plotlyText("<a href='https://example.org'>F1</a> & co")).toBe("&lt;a href='https://example.org'&gt;F1&lt;/a&gt; &amp; co");
    expect(plotlyText('A-W')).toBe('A-W');
  });

  it('shortDateTime writes local date and time as YYYY-MM-DD HH:MM (ISO 8601 order) and leaves unreadable text alone', () => {
    const local = new Date(2026, 11, 2, 14, 5);
    expect(shortDateTime(local.toISOString())).toBe('2026-12-02 14:05');
    expect(shortDateTime('not a date')).toBe('not a date');
  });
});
