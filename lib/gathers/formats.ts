/**
 * The gather formats slopebreak reads, as one registry: recognise a file by its content (never
 * its name) and read it with the matching reader. Adding a format means adding one entry to
 * `GATHER_FORMATS`; the service's upload sniffing and the command line both go through here.
 */
import type { GatherOutcome } from './gather.js';
import { readSeg2, sniffSeg2 } from './seg2/index.js';
import { readSegy, sniffSegy, type ByteSource } from './segy/index.js';

export type GatherFormatName = 'SEG-2' | 'SEG-Y';

/** What a format's sniffer made of the leading bytes. */
export type FormatSniff = { readonly ok: true } | { readonly ok: false; readonly reason: string };

export interface GatherReadLimits {
  /** Largest file read, bytes. */
  readonly maxBytes?: number;
}

export interface GatherFormat {
  readonly name: GatherFormatName;
  /** Media type a stored copy is served with. */
  readonly mediaType: string;
  /** Looks at the leading bytes only (at least the first 3,600 when the file has them). */
  sniff(head: Uint8Array): FormatSniff;
  /** Reads a whole file into a gather; never throws on bad bytes. */
  read(source: Uint8Array | ByteSource, limits: GatherReadLimits): GatherOutcome;
}

/** How many leading bytes a sniffer needs: SEG-Y's textual and binary headers. */
export const GATHER_SNIFF_BYTES = 3600;

function wholeBytes(source: Uint8Array | ByteSource): Uint8Array {
  return source instanceof Uint8Array ? source : source.read(0, source.size);
}

export const GATHER_FORMATS: readonly GatherFormat[] = [
  {
    name: 'SEG-2',
    mediaType: 'application/octet-stream',
    sniff(head) {
      const sniffed = sniffSeg2(head);
      return sniffed.seg2 ? { ok: true } : { ok: false, reason: `not SEG-2: ${sniffed.reason}` };
    },
    // SEG-2 files are one shot of an engineering seismograph (a few MB at most): read whole.
    read: (source, limits) => readSeg2(wholeBytes(source), limits.maxBytes === undefined ? {} : { maxBytes: limits.maxBytes }),
  },
  {
    name: 'SEG-Y',
    mediaType: 'application/octet-stream',
    sniff(head) {
      const sniffed = sniffSegy(head);
      return sniffed.segy ? { ok: true } : { ok: false, reason: `not SEG-Y: ${sniffed.reason}` };
    },
    read: (source) => readSegy(source),
  },
];

export type GatherIdentity = { readonly ok: true; readonly format: GatherFormat } | { readonly ok: false; readonly reasons: readonly string[] };

/** The format whose sniffer accepts the leading bytes, or every sniffer's reason for refusing them. */
export function identifyGather(head: Uint8Array): GatherIdentity {
  const reasons: string[] = [];
  for (const format of GATHER_FORMATS) {
    const sniffed = format.sniff(head);
    if (sniffed.ok) return { ok: true, format };
    reasons.push(sniffed.reason);
  }
  return { ok: false, reasons };
}

/** Recognise and read a gather file; a file no format recognises is refused with every reason. */
export function readGather(source: Uint8Array | ByteSource, limits: GatherReadLimits = {}): GatherOutcome {
  const head = source instanceof Uint8Array ? source.subarray(0, GATHER_SNIFF_BYTES) : source.read(0, Math.min(source.size, GATHER_SNIFF_BYTES));
  const identity = identifyGather(head);
  if (!identity.ok) {
    return {
      ok: false,
      problems: [{
        code: 'gather-format-unknown', severity: 'error', line: 0, column: null, byteOffset: 0,
        message: `the file is neither SEG-2 nor SEG-Y (${identity.reasons.join('; ')})`,
        fix: 'give a SEG-2 or SEG-Y shot gather as the recorder wrote it, or a CSV pick table',
      }],
    };
  }
  return identity.format.read(source, limits);
}
