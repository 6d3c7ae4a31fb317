/**
 * sniffSegy: yes for SEG-Y files (segyio-written and built), no with a reason otherwise.
 */
import { afterAll, describe, expect, it } from 'vitest';
import { sniffSegy } from '../../../lib/gathers/segy/sniff.js';
import { buildSegy } from './build-segy.js';
import { lazySegyioFiles, SEGYIO_SOURCE } from './segyio-files.js';

const segyioFiles = lazySegyioFiles(afterAll);

function reason(bytes: Uint8Array): string {
  const sniff = sniffSegy(bytes);
  if (sniff.segy) throw new Error('sniffSegy said yes');
  return sniff.reason;
}

describe('sniffSegy', () => {
  it(`sniffSegy says yes to every segyio-written file, with its byte order (${SEGYIO_SOURCE})`, () => {
    for (const name of Object.keys(segyioFiles().files)) {
      expect(sniffSegy(segyioFiles().bytes(name)), name).toEqual({ segy: true, littleEndian: name.includes('-le'), textualEncoding: 'ebcdic' });
    }
  });

  it('sniffSegy says yes to an ASCII textual header and to a little-endian rev 2 file', () => {
    expect(sniffSegy(buildSegy({ textual: 'ascii' }))).toEqual({ segy: true, littleEndian: false, textualEncoding: 'ascii' });
    const little = buildSegy({ littleEndian: true, binary: { byteOrderConstant: 0x01020304, segyFormatRevisionMajor: 2 } });
    expect(sniffSegy(little)).toMatchObject({ segy: true, littleEndian: true });
  });

  it('sniffSegy says no to a file shorter than 3600 bytes, naming its length', () => {
    expect(reason(new Uint8Array(3599))).toMatch(/3599 bytes long.*3600/);
  });

  it('sniffSegy says no to bytes that are not text, naming how few are printable', () => {
    const noise = buildSegy();
    for (let index = 0; index < 3200; index += 1) noise[index] = (index * 7919) % 256 | 0x01;
    expect(reason(noise)).toMatch(/not a textual header: only \d+ of 3200/);
  });

  it('sniffSegy says no to an unknown data sample format code, naming bytes 3225–3226', () => {
    expect(reason(buildSegy({ binary: { dataSampleFormatCode: 13 } }))).toMatch(/3225–3226.*read 13/);
  });

  it('sniffSegy says no to pairwise-swapped bytes and to a rev 2 file with a broken byte-order constant', () => {
    expect(reason(buildSegy({ binary: { byteOrderConstant: 0x02010403 } }))).toMatch(/swapped in pairs/);
    expect(reason(buildSegy({ binary: { byteOrderConstant: 0x12345678, segyFormatRevisionMajor: 2 } }))).toMatch(/3297–3300.*rev 2 requires 16909060/);
  });

  it('sniffSegy reads little-endian a file without the constant whose format code only makes sense little-endian', () => {
    expect(sniffSegy(buildSegy({ littleEndian: true }))).toMatchObject({ segy: true, littleEndian: true });
  });
});
