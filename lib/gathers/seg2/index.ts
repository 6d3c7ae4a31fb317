/**
 * The SEG-2 shot-gather reader (Pullan1990): layout as data, a content sniffer, and the reader.
 */

// The reader and its options
export { readSeg2, SEG2_DEFAULT_MAX_BYTES, type ReadSeg2Options } from './read.js';

// Recognising SEG-2 by content
export { seg2ByteOrder, sniffSeg2, type Seg2Sniff } from './sniff.js';

// Problems the reader reports
export { SEG2_DEFAULT_MAX_PROBLEMS, type Seg2ProblemCode } from './problems.js';

// The byte layout as data
export {
  DECODED_TRACE_KEYWORDS,
  FILE_DESCRIPTOR_FIELDS,
  SEG2_FORMATS,
  TRACE_DESCRIPTOR_FIELDS,
  UNIT_METRES,
  type Seg2Field,
  type Seg2Format,
} from './layout.js';
