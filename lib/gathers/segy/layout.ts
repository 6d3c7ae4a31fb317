/**
 * The SEG-Y byte layout as data: the file's fixed blocks, the 400-byte binary file header and the
 * 240-byte standard trace header, each field as `{ offset, bytes, type, name, title }`.
 *
 * Sources: SEG-Y rev 1 (Norris & Faichney 2002) and rev 2.0 (Hagelund & Levin 2017), by way of
 * `../shared/reference/seg-formats.md` §4, which checked the positions and integer types against
 * segyio 1.8.3 (`TraceField`, `BinField`, `lib/src/segy.c`). `tests/gathers/segy/` reads every
 * field of this table back from files written by segyio and compares it with segyio's own
 * reading, so a wrong offset or type here fails a test.
 *
 * - `offset` is 0-based from the start of its header. The standard numbers bytes from 1: a trace
 *   header field at `offset` is the standard's byte `offset + 1`; a binary header field is the
 *   standard's byte `3201 + offset` (the file offset is `3200 + offset`).
 * - `name` is the standard's field description shortened to an identifier; `title` is the
 *   description in words (as recalled from the standard; the positions, not the wording, are
 *   what the tests check).
 * - Integers are two's complement unless the type says unsigned, in the file's byte order.
 */

/** The integer and float types a header field can have. */
export type HeaderFieldType = 'int8' | 'uint8' | 'int16' | 'uint16' | 'int32' | 'uint32' | 'uint64' | 'float64';

export interface HeaderField {
  /** 0-based offset from the start of the header. */
  readonly offset: number;
  /** Width in bytes. */
  readonly bytes: number;
  readonly type: HeaderFieldType;
  /** Identifier for the field, from the standard's description. */
  readonly name: string;
  /** The standard's description in words. */
  readonly title: string;
}

const WIDTH: Readonly<Record<HeaderFieldType, number>> = {
  int8: 1, uint8: 1, int16: 2, uint16: 2, int32: 4, uint32: 4, uint64: 8, float64: 8,
};

function field(standardByte: number, base: number, type: HeaderFieldType, name: string, title: string): HeaderField {
  return { offset: standardByte - base, bytes: WIDTH[type], type, name, title };
}

/** Bytes in the textual file header (and in each extended textual header). */
export const TEXTUAL_HEADER_BYTES = 3200;
/** Bytes in the binary file header. */
export const BINARY_HEADER_BYTES = 400;
/** File offset of the binary file header. */
export const BINARY_HEADER_OFFSET = 3200;
/** File offset of the first extended textual header, or of the first trace when there is none. */
export const FIXED_HEADERS_BYTES = TEXTUAL_HEADER_BYTES + BINARY_HEADER_BYTES;
/** Bytes in a standard trace header. */
export const TRACE_HEADER_BYTES = 240;
/** The rev 2 byte-order constant (bytes 3297–3300) as the file's own byte order reads it. */
export const BYTE_ORDER_CONSTANT = 0x01020304;
/** Lines of 80 characters in a textual header. */
export const TEXTUAL_LINE_LENGTH = 80;
/**
 * The stanza that ends a variable number of extended textual headers (binary header bytes
 * 3505–3506 = −1), as recalled from rev 1 §4 [M]: the last extended header holds this text.
 */
export const END_TEXT_STANZA = '((SEG: EndText))';

const B = 3201;
/** The binary file header, bytes 3201–3600. */
export const BINARY_HEADER_FIELDS = {
  jobIdentificationNumber: field(3201, B, 'int32', 'jobIdentificationNumber', 'Job identification number'),
  lineNumber: field(3205, B, 'int32', 'lineNumber', 'Line number'),
  reelNumber: field(3209, B, 'int32', 'reelNumber', 'Reel number'),
  dataTracesPerEnsemble: field(3213, B, 'int16', 'dataTracesPerEnsemble', 'Number of data traces per ensemble'),
  auxiliaryTracesPerEnsemble: field(3215, B, 'int16', 'auxiliaryTracesPerEnsemble', 'Number of auxiliary traces per ensemble'),
  sampleInterval: field(3217, B, 'int16', 'sampleInterval', 'Sample interval in microseconds'),
  originalSampleInterval: field(3219, B, 'int16', 'originalSampleInterval', 'Sample interval of original field recording, microseconds'),
  samplesPerDataTrace: field(3221, B, 'uint16', 'samplesPerDataTrace', 'Number of samples per data trace'),
  originalSamplesPerDataTrace: field(3223, B, 'uint16', 'originalSamplesPerDataTrace', 'Number of samples per data trace for original field recording'),
  dataSampleFormatCode: field(3225, B, 'int16', 'dataSampleFormatCode', 'Data sample format code'),
  ensembleFold: field(3227, B, 'int16', 'ensembleFold', 'Ensemble fold'),
  traceSortingCode: field(3229, B, 'int16', 'traceSortingCode', 'Trace sorting code'),
  verticalSumCode: field(3231, B, 'int16', 'verticalSumCode', 'Vertical sum code'),
  sweepFrequencyAtStart: field(3233, B, 'int16', 'sweepFrequencyAtStart', 'Sweep frequency at start, Hz'),
  sweepFrequencyAtEnd: field(3235, B, 'int16', 'sweepFrequencyAtEnd', 'Sweep frequency at end, Hz'),
  sweepLength: field(3237, B, 'int16', 'sweepLength', 'Sweep length, ms'),
  sweepTypeCode: field(3239, B, 'int16', 'sweepTypeCode', 'Sweep type code'),
  traceNumberOfSweepChannel: field(3241, B, 'int16', 'traceNumberOfSweepChannel', 'Trace number of sweep channel'),
  sweepTraceTaperLengthAtStart: field(3243, B, 'int16', 'sweepTraceTaperLengthAtStart', 'Sweep trace taper length at start, ms'),
  sweepTraceTaperLengthAtEnd: field(3245, B, 'int16', 'sweepTraceTaperLengthAtEnd', 'Sweep trace taper length at end, ms'),
  taperType: field(3247, B, 'int16', 'taperType', 'Taper type'),
  correlatedDataTraces: field(3249, B, 'int16', 'correlatedDataTraces', 'Correlated data traces'),
  binaryGainRecovered: field(3251, B, 'int16', 'binaryGainRecovered', 'Binary gain recovered'),
  amplitudeRecoveryMethod: field(3253, B, 'int16', 'amplitudeRecoveryMethod', 'Amplitude recovery method'),
  measurementSystem: field(3255, B, 'int16', 'measurementSystem', 'Measurement system (1 = metres, 2 = feet)'),
  impulseSignalPolarity: field(3257, B, 'int16', 'impulseSignalPolarity', 'Impulse signal polarity'),
  vibratoryPolarityCode: field(3259, B, 'int16', 'vibratoryPolarityCode', 'Vibratory polarity code'),
  extendedDataTracesPerEnsemble: field(3261, B, 'int32', 'extendedDataTracesPerEnsemble', 'Extended number of data traces per ensemble (rev 2)'),
  extendedAuxiliaryTracesPerEnsemble: field(3265, B, 'int32', 'extendedAuxiliaryTracesPerEnsemble', 'Extended number of auxiliary traces per ensemble (rev 2)'),
  extendedSamplesPerDataTrace: field(3269, B, 'int32', 'extendedSamplesPerDataTrace', 'Extended number of samples per data trace (rev 2)'),
  extendedSampleInterval: field(3273, B, 'float64', 'extendedSampleInterval', 'Extended sample interval, IEEE double (rev 2)'),
  extendedOriginalSampleInterval: field(3281, B, 'float64', 'extendedOriginalSampleInterval', 'Extended sample interval of original field recording (rev 2)'),
  extendedOriginalSamplesPerDataTrace: field(3289, B, 'int32', 'extendedOriginalSamplesPerDataTrace', 'Extended number of samples per data trace in original recording (rev 2)'),
  extendedEnsembleFold: field(3293, B, 'int32', 'extendedEnsembleFold', 'Extended ensemble fold (rev 2)'),
  byteOrderConstant: field(3297, B, 'int32', 'byteOrderConstant', 'The integer constant 16909060 (0x01020304) for byte-order detection (rev 2)'),
  segyFormatRevisionMajor: field(3501, B, 'uint8', 'segyFormatRevisionMajor', 'Major SEG-Y format revision number'),
  segyFormatRevisionMinor: field(3502, B, 'uint8', 'segyFormatRevisionMinor', 'Minor SEG-Y format revision number'),
  fixedLengthTraceFlag: field(3503, B, 'int16', 'fixedLengthTraceFlag', 'Fixed length trace flag'),
  extendedTextualHeaders: field(3505, B, 'int16', 'extendedTextualHeaders', 'Number of 3200-byte extended textual file header records'),
  maximumAdditionalTraceHeaders: field(3507, B, 'int16', 'maximumAdditionalTraceHeaders', 'Maximum number of additional 240-byte trace headers (rev 2)'),
  timeBasisCode: field(3511, B, 'int16', 'timeBasisCode', 'Time basis code (rev 2)'),
  numberOfTracesInFile: field(3513, B, 'uint64', 'numberOfTracesInFile', 'Number of traces in this file or stream (rev 2)'),
  byteOffsetOfFirstTrace: field(3521, B, 'uint64', 'byteOffsetOfFirstTrace', 'Byte offset of first trace relative to start of file (rev 2)'),
  dataTrailerStanzas: field(3529, B, 'int32', 'dataTrailerStanzas', 'Number of 3200-byte data trailer stanza records (rev 2)'),
} as const satisfies Record<string, HeaderField>;

export type BinaryHeaderFieldName = keyof typeof BINARY_HEADER_FIELDS;

const T = 1;
/** The 240-byte standard trace header. */
export const TRACE_HEADER_FIELDS = {
  traceSequenceNumberWithinLine: field(1, T, 'int32', 'traceSequenceNumberWithinLine', 'Trace sequence number within line'),
  traceSequenceNumberWithinFile: field(5, T, 'int32', 'traceSequenceNumberWithinFile', 'Trace sequence number within SEG-Y file'),
  originalFieldRecordNumber: field(9, T, 'int32', 'originalFieldRecordNumber', 'Original field record number'),
  traceNumberWithinOriginalFieldRecord: field(13, T, 'int32', 'traceNumberWithinOriginalFieldRecord', 'Trace number within the original field record (channel)'),
  energySourcePointNumber: field(17, T, 'int32', 'energySourcePointNumber', 'Energy source point number'),
  ensembleNumber: field(21, T, 'int32', 'ensembleNumber', 'Ensemble number (CDP, CMP, CRP, ...)'),
  traceNumberWithinEnsemble: field(25, T, 'int32', 'traceNumberWithinEnsemble', 'Trace number within the ensemble'),
  traceIdentificationCode: field(29, T, 'int16', 'traceIdentificationCode', 'Trace identification code'),
  verticallySummedTraces: field(31, T, 'int16', 'verticallySummedTraces', 'Number of vertically summed traces yielding this trace'),
  horizontallyStackedTraces: field(33, T, 'int16', 'horizontallyStackedTraces', 'Number of horizontally stacked traces yielding this trace'),
  dataUse: field(35, T, 'int16', 'dataUse', 'Data use (1 = production, 2 = test)'),
  distanceFromSourceToReceiverGroup: field(37, T, 'int32', 'distanceFromSourceToReceiverGroup', 'Distance from centre of the source point to the centre of the receiver group (offset)'),
  receiverGroupElevation: field(41, T, 'int32', 'receiverGroupElevation', 'Receiver group elevation'),
  surfaceElevationAtSource: field(45, T, 'int32', 'surfaceElevationAtSource', 'Surface elevation at source'),
  sourceDepthBelowSurface: field(49, T, 'int32', 'sourceDepthBelowSurface', 'Source depth below surface (a positive number)'),
  datumElevationAtReceiverGroup: field(53, T, 'int32', 'datumElevationAtReceiverGroup', 'Datum elevation at receiver group'),
  datumElevationAtSource: field(57, T, 'int32', 'datumElevationAtSource', 'Datum elevation at source'),
  waterDepthAtSource: field(61, T, 'int32', 'waterDepthAtSource', 'Water depth at source'),
  waterDepthAtGroup: field(65, T, 'int32', 'waterDepthAtGroup', 'Water depth at group'),
  elevationScalar: field(69, T, 'int16', 'elevationScalar', 'Scalar to be applied to all elevations and depths in bytes 41–68'),
  coordinateScalar: field(71, T, 'int16', 'coordinateScalar', 'Scalar to be applied to all coordinates in bytes 73–88 and 181–188'),
  sourceCoordinateX: field(73, T, 'int32', 'sourceCoordinateX', 'Source coordinate X'),
  sourceCoordinateY: field(77, T, 'int32', 'sourceCoordinateY', 'Source coordinate Y'),
  groupCoordinateX: field(81, T, 'int32', 'groupCoordinateX', 'Group coordinate X'),
  groupCoordinateY: field(85, T, 'int32', 'groupCoordinateY', 'Group coordinate Y'),
  coordinateUnits: field(89, T, 'int16', 'coordinateUnits', 'Coordinate units (1 = length, 2 = seconds of arc, 3 = decimal degrees, 4 = DMS)'),
  weatheringVelocity: field(91, T, 'int16', 'weatheringVelocity', 'Weathering velocity'),
  subweatheringVelocity: field(93, T, 'int16', 'subweatheringVelocity', 'Subweathering velocity'),
  upholeTimeAtSource: field(95, T, 'int16', 'upholeTimeAtSource', 'Uphole time at source, ms'),
  upholeTimeAtGroup: field(97, T, 'int16', 'upholeTimeAtGroup', 'Uphole time at group, ms'),
  sourceStaticCorrection: field(99, T, 'int16', 'sourceStaticCorrection', 'Source static correction, ms'),
  groupStaticCorrection: field(101, T, 'int16', 'groupStaticCorrection', 'Group static correction, ms'),
  totalStaticApplied: field(103, T, 'int16', 'totalStaticApplied', 'Total static applied, ms'),
  lagTimeA: field(105, T, 'int16', 'lagTimeA', 'Lag time A, ms'),
  lagTimeB: field(107, T, 'int16', 'lagTimeB', 'Lag time B, ms'),
  delayRecordingTime: field(109, T, 'int16', 'delayRecordingTime', 'Delay recording time, ms: time between the time break and the first sample'),
  muteTimeStart: field(111, T, 'int16', 'muteTimeStart', 'Mute time start, ms'),
  muteTimeEnd: field(113, T, 'int16', 'muteTimeEnd', 'Mute time end, ms'),
  samplesInThisTrace: field(115, T, 'uint16', 'samplesInThisTrace', 'Number of samples in this trace'),
  sampleIntervalForThisTrace: field(117, T, 'int16', 'sampleIntervalForThisTrace', 'Sample interval for this trace, microseconds'),
  gainTypeOfFieldInstruments: field(119, T, 'int16', 'gainTypeOfFieldInstruments', 'Gain type of field instruments'),
  instrumentGainConstant: field(121, T, 'int16', 'instrumentGainConstant', 'Instrument gain constant, dB'),
  instrumentEarlyOrInitialGain: field(123, T, 'int16', 'instrumentEarlyOrInitialGain', 'Instrument early or initial gain, dB'),
  correlated: field(125, T, 'int16', 'correlated', 'Correlated (1 = no, 2 = yes)'),
  sweepFrequencyAtStart: field(127, T, 'int16', 'sweepFrequencyAtStart', 'Sweep frequency at start, Hz'),
  sweepFrequencyAtEnd: field(129, T, 'int16', 'sweepFrequencyAtEnd', 'Sweep frequency at end, Hz'),
  sweepLength: field(131, T, 'int16', 'sweepLength', 'Sweep length, ms'),
  sweepType: field(133, T, 'int16', 'sweepType', 'Sweep type'),
  sweepTraceTaperLengthAtStart: field(135, T, 'int16', 'sweepTraceTaperLengthAtStart', 'Sweep trace taper length at start, ms'),
  sweepTraceTaperLengthAtEnd: field(137, T, 'int16', 'sweepTraceTaperLengthAtEnd', 'Sweep trace taper length at end, ms'),
  taperType: field(139, T, 'int16', 'taperType', 'Taper type'),
  aliasFilterFrequency: field(141, T, 'int16', 'aliasFilterFrequency', 'Alias filter frequency, Hz'),
  aliasFilterSlope: field(143, T, 'int16', 'aliasFilterSlope', 'Alias filter slope, dB/octave'),
  notchFilterFrequency: field(145, T, 'int16', 'notchFilterFrequency', 'Notch filter frequency, Hz'),
  notchFilterSlope: field(147, T, 'int16', 'notchFilterSlope', 'Notch filter slope, dB/octave'),
  lowCutFrequency: field(149, T, 'int16', 'lowCutFrequency', 'Low-cut frequency, Hz'),
  highCutFrequency: field(151, T, 'int16', 'highCutFrequency', 'High-cut frequency, Hz'),
  lowCutSlope: field(153, T, 'int16', 'lowCutSlope', 'Low-cut slope, dB/octave'),
  highCutSlope: field(155, T, 'int16', 'highCutSlope', 'High-cut slope, dB/octave'),
  yearDataRecorded: field(157, T, 'int16', 'yearDataRecorded', 'Year data recorded'),
  dayOfYear: field(159, T, 'int16', 'dayOfYear', 'Day of year'),
  hourOfDay: field(161, T, 'int16', 'hourOfDay', 'Hour of day (24-hour clock)'),
  minuteOfHour: field(163, T, 'int16', 'minuteOfHour', 'Minute of hour'),
  secondOfMinute: field(165, T, 'int16', 'secondOfMinute', 'Second of minute'),
  timeBasisCode: field(167, T, 'int16', 'timeBasisCode', 'Time basis code'),
  traceWeightingFactor: field(169, T, 'int16', 'traceWeightingFactor', 'Trace weighting factor'),
  geophoneGroupNumberOfRollSwitchPositionOne: field(171, T, 'int16', 'geophoneGroupNumberOfRollSwitchPositionOne', 'Geophone group number of roll switch position one'),
  geophoneGroupNumberOfFirstTrace: field(173, T, 'int16', 'geophoneGroupNumberOfFirstTrace', 'Geophone group number of trace number one within original field record'),
  geophoneGroupNumberOfLastTrace: field(175, T, 'int16', 'geophoneGroupNumberOfLastTrace', 'Geophone group number of last trace within original field record'),
  gapSize: field(177, T, 'int16', 'gapSize', 'Gap size (total number of groups dropped)'),
  overTravel: field(179, T, 'int16', 'overTravel', 'Over travel associated with taper'),
  ensembleCoordinateX: field(181, T, 'int32', 'ensembleCoordinateX', 'X coordinate of ensemble (CDP) position'),
  ensembleCoordinateY: field(185, T, 'int32', 'ensembleCoordinateY', 'Y coordinate of ensemble (CDP) position'),
  inlineNumber: field(189, T, 'int32', 'inlineNumber', 'In-line number (3-D)'),
  crosslineNumber: field(193, T, 'int32', 'crosslineNumber', 'Cross-line number (3-D)'),
  shotpointNumber: field(197, T, 'int32', 'shotpointNumber', 'Shotpoint number'),
  shotpointScalar: field(201, T, 'int16', 'shotpointScalar', 'Scalar to be applied to the shotpoint number'),
  traceValueMeasurementUnit: field(203, T, 'int16', 'traceValueMeasurementUnit', 'Trace value measurement unit'),
  transductionConstantMantissa: field(205, T, 'int32', 'transductionConstantMantissa', 'Transduction constant, mantissa'),
  transductionConstantExponent: field(209, T, 'int16', 'transductionConstantExponent', 'Transduction constant, power of ten'),
  transductionUnits: field(211, T, 'int16', 'transductionUnits', 'Transduction units'),
  deviceTraceIdentifier: field(213, T, 'int16', 'deviceTraceIdentifier', 'Device/trace identifier'),
  timeScalar: field(215, T, 'int16', 'timeScalar', 'Scalar to be applied to times in bytes 95–114'),
  sourceTypeOrientation: field(217, T, 'int16', 'sourceTypeOrientation', 'Source type/orientation'),
  sourceEnergyDirectionMantissa: field(219, T, 'int32', 'sourceEnergyDirectionMantissa', 'Source energy direction, first four bytes'),
  sourceEnergyDirectionExponent: field(223, T, 'int16', 'sourceEnergyDirectionExponent', 'Source energy direction, last two bytes'),
  sourceMeasurementMantissa: field(225, T, 'int32', 'sourceMeasurementMantissa', 'Source measurement, mantissa'),
  sourceMeasurementExponent: field(229, T, 'int16', 'sourceMeasurementExponent', 'Source measurement, power of ten'),
  sourceMeasurementUnit: field(231, T, 'int16', 'sourceMeasurementUnit', 'Source measurement unit'),
} as const satisfies Record<string, HeaderField>;

export type TraceHeaderFieldName = keyof typeof TRACE_HEADER_FIELDS;

/** Read one header field from `view` (the header's bytes), in the file's byte order. */
export function readHeaderField(view: DataView, headerField: HeaderField, littleEndian: boolean): number {
  const at = headerField.offset;
  switch (headerField.type) {
    case 'int8': return view.getInt8(at);
    case 'uint8': return view.getUint8(at);
    case 'int16': return view.getInt16(at, littleEndian);
    case 'uint16': return view.getUint16(at, littleEndian);
    case 'int32': return view.getInt32(at, littleEndian);
    case 'uint32': return view.getUint32(at, littleEndian);
    // Above 2^53 the nearest double: no real file has that many traces or bytes before them.
    case 'uint64': return Number(view.getBigUint64(at, littleEndian));
    case 'float64': return view.getFloat64(at, littleEndian);
  }
}

/** The standard's 1-based byte range of a binary header field, e.g. "3221–3222". */
export function binaryBytes(headerField: HeaderField): string {
  const first = 3201 + headerField.offset;
  return headerField.bytes === 1 ? `${first}` : `${first}–${first + headerField.bytes - 1}`;
}

/** The standard's 1-based byte range of a trace header field, e.g. "115–116". */
export function traceBytes(headerField: HeaderField): string {
  const first = 1 + headerField.offset;
  return `${first}–${first + headerField.bytes - 1}`;
}
