/**
 * The layout tables: fields inside their header, no two overlapping; the EBCDIC table against
 * Python's cp037 codec.
 */
import { afterAll, describe, expect, it } from 'vitest';
import { BINARY_HEADER_FIELDS, TRACE_HEADER_FIELDS, type HeaderField } from '../../../lib/gathers/segy/layout.js';
import { EBCDIC_TO_CHARACTER, sniffTextualEncoding, decodeTextualHeader, textualLines } from '../../../lib/gathers/segy/text.js';
import { lazySegyioFiles } from './segyio-files.js';

const segyioFiles = lazySegyioFiles(afterAll);

function checkTable(fields: Readonly<Record<string, HeaderField>>, length: number): void {
  const sorted = Object.entries(fields).sort(([, a], [, b]) => a.offset - b.offset);
  let end = 0;
  for (const [key, headerField] of sorted) {
    expect(headerField.name, 'key and name agree').toBe(key);
    expect(headerField.offset, `${key} starts after the previous field ends`).toBeGreaterThanOrEqual(end);
    end = headerField.offset + headerField.bytes;
    expect(end, `${key} ends inside the header`).toBeLessThanOrEqual(length);
  }
}

describe('SEG-Y layout tables', () => {
  it('BINARY_HEADER_FIELDS lie inside the 400-byte binary header without overlapping', () => checkTable(BINARY_HEADER_FIELDS, 400));
  it('TRACE_HEADER_FIELDS lie inside the 240-byte trace header without overlapping', () => checkTable(TRACE_HEADER_FIELDS, 240));
  it('the fields the brief names sit at the standard bytes (seg-formats.md §4.2–4.3)', () => {
    expect(TRACE_HEADER_FIELDS.coordinateScalar.offset + 1).toBe(71);
    expect(TRACE_HEADER_FIELDS.elevationScalar.offset + 1).toBe(69);
    expect(TRACE_HEADER_FIELDS.samplesInThisTrace.offset + 1).toBe(115);
    expect(TRACE_HEADER_FIELDS.delayRecordingTime.offset + 1).toBe(109);
    expect(BINARY_HEADER_FIELDS.byteOrderConstant.offset + 3201).toBe(3297);
    expect(BINARY_HEADER_FIELDS.extendedTextualHeaders.offset + 3201).toBe(3505);
  });
});

describe('EBCDIC textual headers', () => {
  it("EBCDIC_TO_CHARACTER agrees with Python's cp037 codec on every byte it maps (make-segyio-files.py)", () => {
    let mapped = 0;
    EBCDIC_TO_CHARACTER.forEach((character, byte) => {
      if (character === undefined) return;
      mapped += 1;
      expect(character.codePointAt(0), `EBCDIC byte 0x${byte.toString(16)}, Python cp037`).toBe(segyioFiles().cp037[byte]);
    });
    expect(mapped, 'space, 52 letters, 10 digits and 35 marks').toBe(98);
  });

  it('sniffTextualEncoding tells ASCII from EBCDIC and reads a zero-filled header as EBCDIC', () => {
    const ascii = new TextEncoder().encode('C 1 CLIENT 0123456789'.padEnd(3200, ' '));
    expect(sniffTextualEncoding(ascii)).toBe('ascii');
    expect(decodeTextualHeader(ascii, 'ascii').startsWith('C 1 CLIENT 0123456789')).toBe(true);
    expect(sniffTextualEncoding(new Uint8Array(3200))).toBe('ebcdic');
    expect(sniffTextualEncoding(new Uint8Array(3200).fill(0x40))).toBe('ebcdic');
    expect(textualLines(decodeTextualHeader(ascii, 'ascii'))).toHaveLength(40);
  });
});
