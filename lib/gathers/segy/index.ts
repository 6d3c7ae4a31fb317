/**
 * The SEG-Y reader (rev 0, rev 1 2002, rev 2.0 2017): layout as data, a sniffer, a reader.
 */

// Reading: open for trace-by-trace access, or read a whole file into a gather.
export { openSegy, readSegy, applyScalar, decodeTraceHeader } from './read.js';
export type { SegyFile, SegyFileOutcome, SegyTrace, SegyTraceOutcome, SegyTraceHeader, SegyBinaryHeader, SegyReadOptions } from './read.js';
export { DEFAULT_MAX_SAMPLES_PER_TRACE, DEFAULT_MAX_TRACES, DEFAULT_MAX_TOTAL_SAMPLES, DEFAULT_MAX_EXTENDED_TEXTUAL_HEADERS } from './read.js';

// Bytes in: a random-access source, or bytes already in memory.
export { byteSourceOf } from './byte-source.js';
export type { ByteSource } from './byte-source.js';

// Recognising a file by content.
export { sniffSegy, detectByteOrder } from './sniff.js';
export type { SegySniff, ByteOrder } from './sniff.js';

// The layout, sample formats and textual headers, as data.
export { BINARY_HEADER_FIELDS, TRACE_HEADER_FIELDS, type HeaderField, type BinaryHeaderFieldName, type TraceHeaderFieldName } from './layout.js';
export { SAMPLE_FORMATS, REFUSED_FORMATS, ibmToNumber, type SampleFormat } from './formats.js';
export { decodeTextualHeader, sniffTextualEncoding, textualLines, type TextualEncoding } from './text.js';
