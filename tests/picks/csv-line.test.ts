/**
 * CSV field splitting (lib/picks/csv-line.ts).
 *
 * Outside references: RFC 4180 §2 (Shafranovich 2005) rules 5–7 and its example
 * `"aaa","b""bb","ccc"` (recalled from memory); Python's `csv` module (standard library, strict
 * mode) as an independent RFC 4180 reader for generated lines.
 */
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { countQuotes, quoteCsvField, splitCsvLine } from '../../lib/picks/csv-line.js';
import { runPythonJson } from '../helpers/python.js';

const SEED = 4180;

describe('splitCsvLine', () => {
  it('splitCsvLine reads the RFC 4180 rule-7 example with a doubled quote', () => {
    expect(splitCsvLine('"aaa","b""bb","ccc"')).toEqual({ fields: ['aaa', 'b"bb', 'ccc'], fault: null });
  });

  it('splitCsvLine keeps commas inside quotes and trims whitespace outside them only', () => {
    expect(splitCsvLine(' S1 , "a, b" ,  " c "  ,3')).toEqual({ fields: ['S1', 'a, b', ' c ', '3'], fault: null });
  });

  it('splitCsvLine gives one empty field for an empty line and a final empty field for a trailing comma', () => {
    expect(splitCsvLine('').fields).toEqual(['']);
    expect(splitCsvLine('a,b,').fields).toEqual(['a', 'b', '']);
    expect(splitCsvLine('"a",').fields).toEqual(['a', '']);
  });

  it('splitCsvLine reports a quoted field that runs to the end of the line as quote-unclosed', () => {
    expect(splitCsvLine('S1,"abc,3')).toEqual({ fields: ['S1'], fault: { kind: 'quote-unclosed', column: 2 } });
    expect(splitCsvLine('"a""')).toEqual({ fields: [], fault: { kind: 'quote-unclosed', column: 1 } });
  });

  it('splitCsvLine reports a quote inside unquoted text, or text after a closing quote, as quote-stray', () => {
    expect(splitCsvLine('S1,ab"c,3').fault).toEqual({ kind: 'quote-stray', column: 2 });
    expect(splitCsvLine('S1,"ab"c,3').fault).toEqual({ kind: 'quote-stray', column: 2 });
  });

  it('splitCsvLine agrees with Python csv (strict) on generated well-formed lines', () => {
    const field = fc.oneof(
      fc.string({ unit: fc.constantFrom('a', 'b', '1', '.', ' ', '-', 'é', '#'), maxLength: 6 }).map((text) => text.trim()),
      fc.string({ unit: fc.constantFrom('a', ',', '"', ' ', 'x', '€'), maxLength: 6 }).map((text) => `"${text.split('"').join('""')}"`),
    );
    const lines = fc.sample(fc.array(field, { minLength: 1, maxLength: 6 }).map((fields) => fields.join(',')), { seed: SEED, numRuns: 500 });
    const python = runPythonJson<string[][]>(
      'import csv, json, sys\nprint(json.dumps([next(csv.reader([line], strict=True)) if line else [""] for line in json.load(sys.stdin)]))',
      lines,
      ['csv', 'json'],
    );
    lines.forEach((line, index) => {
      expect(splitCsvLine(line), `Python csv.reader on ${JSON.stringify(line)}`).toEqual({ fields: python[index], fault: null });
    });
  });
});

describe('quoteCsvField', () => {
  it.each(['S1', 'a, b', 'say "hi"', ' padded ', '#12', '', 'x'])('quoteCsvField(%j) reads back unchanged through splitCsvLine', (text) => {
    expect(splitCsvLine(`${quoteCsvField(text)},end`).fields).toEqual([text, 'end']);
  });

  it('quoteCsvField leaves plain text unquoted and refuses a line break', () => {
    expect(quoteCsvField('S1')).toBe('S1');
    expect(() => quoteCsvField('a\nb')).toThrow(/line break/);
    expect(() => quoteCsvField('a\rb')).toThrow(/line break/);
  });
});

describe('countQuotes', () => {
  it('countQuotes counts every double quote', () => {
    expect(countQuotes('"a""b",c"')).toBe(5);
    expect(countQuotes('none')).toBe(0);
  });
});
