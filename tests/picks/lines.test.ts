/**
 * Line scanning (lib/picks/lines.ts). Line numbers follow what editors show (common practice):
 * a line ends at CRLF, LF or a lone CR, and a final line break starts no new line. The expected
 * lines below are counted by hand.
 */
import { describe, expect, it } from 'vitest';
import { countLineBreaks, LineScanner } from '../../lib/picks/lines.js';

function allLines(text: string): [number, string][] {
  const scanner = new LineScanner(text);
  const lines: [number, string][] = [];
  for (let line = scanner.next(); line !== null; line = scanner.next()) lines.push([scanner.lineNumber, line]);
  return lines;
}

describe('LineScanner', () => {
  it('LineScanner splits at LF, CRLF and lone CR alike', () => {
    expect(allLines('a\nb\r\nc\rd')).toEqual([[1, 'a'], [2, 'b'], [3, 'c'], [4, 'd']]);
  });

  it('LineScanner starts no line after a final line break, and keeps empty lines between', () => {
    expect(allLines('a\n\nb\n')).toEqual([[1, 'a'], [2, ''], [3, 'b']]);
    expect(allLines('a\r\r\n')).toEqual([[1, 'a'], [2, '']]);
    expect(allLines('')).toEqual([]);
  });

  it('LineScanner.fork reads ahead without moving the original', () => {
    const scanner = new LineScanner('a\nb\nc');
    scanner.next();
    const ahead = scanner.fork();
    expect([ahead.next(), ahead.next(), ahead.lineNumber]).toEqual(['b', 'c', 3]);
    expect([scanner.next(), scanner.lineNumber]).toEqual(['b', 2]);
  });
});

describe('countLineBreaks', () => {
  it('countLineBreaks counts CRLF once and lone CR and LF once each, in text and in bytes', () => {
    const text = 'a\r\nb\rc\nd';
    expect(countLineBreaks(text, text.length)).toBe(3);
    expect(countLineBreaks(Buffer.from(text), text.length)).toBe(3);
  });

  it('countLineBreaks counts only before the end position', () => {
    expect(countLineBreaks('a\nb\nc', 2)).toBe(1);
    expect(countLineBreaks(Buffer.from('a\nb\nc'), 1)).toBe(0);
    expect(countLineBreaks('a\n', 99)).toBe(1);
  });
});
