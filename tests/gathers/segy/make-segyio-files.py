#!/usr/bin/python3
"""Write SEG-Y test files with segyio (Debian python3-segyio) and print what segyio reads back.

Usage: /usr/bin/python3 tests/gathers/segy/make-segyio-files.py OUTPUT_DIR

Writes these files into OUTPUT_DIR (all 24 traces x 500 samples at 250 us unless noted):
  ibm-be.sgy      format 1 (IBM float), big-endian, rev 1 (0x0100)
  ieee-be.sgy     format 5 (IEEE float), big-endian, rev 1
  int32-be.sgy    format 2, big-endian, rev 1
  int16-be.sgy    format 3, big-endian, rev 1
  int8-be.sgy     format 8, big-endian, rev 1
  ieee-le-rev2.sgy format 5, little-endian (segyio spec.endian = 'little'), then patched by this
                  script to rev 2.0: bytes 3297-3300 hold the byte-order constant 16909060 in the
                  file's (little-endian) byte order, byte 3501 = 2, byte 3502 = 0
  ext2-be.sgy     format 5, big-endian, rev 1, two extended textual headers (segyio spec.ext_headers)
  ibm-words.sgy   a copy of ibm-be.sgy whose first trace's first samples are replaced by the raw IBM
                  words in IBM_WORDS; segyio's reading of them is printed as "ibmWords"
  rev2-fmtF-ORDER.sgy  for the rev 2 sample formats F = 6, 7, 9, 10, 11, 12, 15, 16 and ORDER = be,
                  le: 4 traces x 64 samples, headers built here with struct (segyio 1.8.3 cannot
                  write or read these formats), samples encoded by numpy ('>f8', '>i8', '>u4',
                  '>u2', '>u8', 'u1'; the 3-byte formats as numpy '>i4'/'>u4' (or '<') words with the
                  high (or, little-endian, the last) byte dropped). Printed under "rev2": the values
                  numpy encoded, as floats (float(int) rounds to nearest, ties to even, beyond 2^53)

Also prints "cp037": Python's cp037 codec's character for each byte 0-255 (the EBCDIC check).

Prints one JSON document on stdout: for each file, segyio's reading of it, with no code of ours
involved: the textual headers as latin-1 text of segyio's bytes, the binary header as
{byte: value} (segyio BinField byte positions), each trace header as {byte: value} (segyio
TraceField byte positions), and every sample as a float (segyio returns float32; JSON holds the
exact double of each float32). The tests compare the slopebreak reader with these values.

The samples are deterministic (no random numbers): a decaying sine per trace plus a ramp, so the
values span signs and several decades, scaled to each integer format's range.
"""
import json
import os
import struct
import sys

import numpy as np
import segyio

TRACES = 24
SAMPLES = 500
INTERVAL_US = 250


def samples_for(trace, scale):
    k = np.arange(SAMPLES, dtype=np.float64)
    onset = 40 + 12 * trace
    wave = np.where(k >= onset, np.sin(2 * np.pi * 0.05 * (k - onset)) * np.exp(-(k - onset) / 60.0), 0.0)
    ramp = (k - 250.0) / 250.0 * 1e-3
    return (wave + ramp) * scale


def filler(fields, trace):
    """A distinct non-zero value for every field (the explicit values below override some), so a
    reader that takes a field from the wrong byte or with the wrong width gets a different value.
    The unassigned fields stay zero."""
    values = {}
    for name in dir(fields):
        member = getattr(fields, name)
        if name.startswith('_') or name.startswith('Unassigned') or not isinstance(member, int):
            continue
        byte = int(member)
        values[member] = (byte * 37 + trace * 11) % 30000 + 1
    return values


def write(path, fmt, endian='big', ext_headers=0):
    spec = segyio.spec()
    spec.format = fmt
    spec.samples = range(SAMPLES)
    spec.tracecount = TRACES
    spec.endian = endian
    spec.ext_headers = ext_headers
    scale = {1: 1234.5, 5: 1234.5, 2: 2.0e9, 3: 30000.0, 8: 120.0}[fmt]
    integer = fmt in (2, 3, 8)
    with segyio.create(path, spec) as f:
        f.text[0] = segyio.tools.create_text_header({
            1: 'SLOPEBREAK TEST FILE WRITTEN BY SEGYIO ' + str(segyio.__version__),
            2: 'FORMAT %d %s-ENDIAN' % (fmt, endian.upper()),
            3: 'OFF-END SHOT AT -1 M, 24 RECEIVERS AT 2 M SPACING',
        })
        for index in range(1, ext_headers + 1):
            f.text[index] = ('EXTENDED TEXTUAL HEADER %d' % index).ljust(3200).encode('ascii')
        for t in range(TRACES):
            receiver_cm = 100 + 200 * t          # 1 m, 3 m, ... 47 m
            values = samples_for(t, scale)
            if integer:
                values = np.round(values)
            f.trace[t] = values.astype(np.float32)
            f.header[t] = {**filler(segyio.TraceField, t), **{
                segyio.TraceField.TRACE_SEQUENCE_LINE: t + 1,
                segyio.TraceField.TRACE_SEQUENCE_FILE: t + 1,
                segyio.TraceField.FieldRecord: 1001,
                segyio.TraceField.TraceNumber: t + 1,
                segyio.TraceField.EnergySourcePoint: 7,
                segyio.TraceField.TraceIdentificationCode: 1,
                segyio.TraceField.offset: (receiver_cm + 100) // 100,
                segyio.TraceField.ReceiverGroupElevation: 10250 - 3 * t,   # cm, scalar -100
                segyio.TraceField.SourceSurfaceElevation: 10310,
                segyio.TraceField.SourceDepth: 50,
                segyio.TraceField.ElevationScalar: -100,
                segyio.TraceField.SourceGroupScalar: -100 if t % 2 == 0 else 10,
                segyio.TraceField.SourceX: -100 if t % 2 == 0 else -10,
                segyio.TraceField.SourceY: 250000 if t % 2 == 0 else 25,
                segyio.TraceField.GroupX: receiver_cm if t % 2 == 0 else receiver_cm // 1000,
                segyio.TraceField.GroupY: -37 if t % 2 == 0 else -3,
                segyio.TraceField.CoordinateUnits: 1,
                segyio.TraceField.DelayRecordingTime: 0 if t < 12 else -5,
                segyio.TraceField.TRACE_SAMPLE_COUNT: SAMPLES,
                segyio.TraceField.TRACE_SAMPLE_INTERVAL: INTERVAL_US,
                segyio.TraceField.ScalarTraceHeader: (0, 10, -10)[t % 3],
            }}
        f.bin.update({**filler(segyio.BinField, 0), **{
            segyio.BinField.Traces: TRACES,
            segyio.BinField.Interval: INTERVAL_US,
            segyio.BinField.Samples: SAMPLES,
            segyio.BinField.Format: fmt,
            segyio.BinField.SortingCode: 1,
            segyio.BinField.MeasurementSystem: 1,
            segyio.BinField.SEGYRevision: 0x0100,
            segyio.BinField.TraceFlag: 1,
            segyio.BinField.ExtendedHeaders: ext_headers,
        }})


def patch_rev2(path, endian):
    with open(path, 'r+b') as handle:
        handle.seek(3296)
        handle.write(struct.pack('<i' if endian == 'little' else '>i', 16909060))
        handle.seek(3500)
        handle.write(bytes([2, 0]))


def read_back(path, endian):
    with segyio.open(path, ignore_geometry=True, endian=endian) as f:
        return {
            'size': os.path.getsize(path),
            'format': int(f.format),
            'tracecount': f.tracecount,
            'samples': len(f.samples),
            'text': [f.text[i].decode('latin-1') for i in range(1 + f.ext_headers)],
            'extHeaders': f.ext_headers,
            'bin': {str(int(k)): int(v) for k, v in f.bin.items()},
            'headers': [{str(int(k)): int(v) for k, v in f.header[t].items()} for t in range(f.tracecount)],
            'traces': [[float(x) for x in f.trace[t]] for t in range(f.tracecount)],
        }


# Raw IBM words: -118.625 = 0xC276A000 (recalled from descriptions of the IBM System/360 format),
# its positive twin, 0x42769000 (= 118.5625, not 118.625), 1, 0.5, -1, zero, negative zero, an
# unnormalised fraction, and values near float32's limits (segyio returns float32, so 0x21100000
# = 2^-128, a float32 subnormal, is flushed to 0 by segyio).
IBM_WORDS = [0xC276A000, 0x4276A000, 0x42769000, 0xC2769000, 0x41100000, 0x40800000, 0xC1100000, 0x00000000, 0x80000000,
             0x42076900, 0x3F100000, 0x60FFFFFF, 0x21100000, 0x4FFFFFFF, 0xBB123456]


def write_ibm_words(out):
    source = os.path.join(out, 'ibm-be.sgy')
    target = os.path.join(out, 'ibm-words.sgy')
    data = bytearray(open(source, 'rb').read())
    for index, word in enumerate(IBM_WORDS):
        struct.pack_into('>I', data, 3600 + 240 + 4 * index, word)
    open(target, 'wb').write(bytes(data))
    with segyio.open(target, ignore_geometry=True) as f:
        trace = f.trace[0]
        return [[word, float(trace[index])] for index, word in enumerate(IBM_WORDS)]


REV2_FORMATS = (6, 7, 9, 10, 11, 12, 15, 16)
REV2_TRACES = 4
REV2_SAMPLES = 64


def rev2_values(fmt, trace):
    k = np.arange(REV2_SAMPLES)
    if fmt == 6:
        values = np.sin(k * 0.37 + trace) * 10.0 ** ((k % 40) - 20)
        values[0] = 2.0 ** 1000
        values[1] = -5e-324
        return values
    bounds = {7: (-2 ** 23, 2 ** 23 - 1), 9: (-2 ** 63, 2 ** 63 - 1), 10: (0, 2 ** 32 - 1),
              11: (0, 2 ** 16 - 1), 12: (0, 2 ** 64 - 1), 15: (0, 2 ** 24 - 1), 16: (0, 255)}[fmt]
    low, high = bounds
    span = high - low
    values = [low + (span * ((7919 * (int(j) + 13 * trace)) % 1000)) // 999 for j in k]
    values[0], values[1], values[2] = low, high, (low + high) // 2
    if fmt == 9:
        values[3] = 2 ** 53 + 1          # not a double: rounds to 2^53
        values[4] = -(2 ** 53) - 3       # rounds to -(2^53 + 4)
    return values


def encode_rev2(fmt, values, endian):
    mark = '>' if endian == 'big' else '<'
    if fmt == 6:
        return np.asarray(values, dtype=mark + 'f8').tobytes()
    if fmt in (7, 15):
        words = np.asarray(values, dtype=mark + ('i4' if fmt == 7 else 'u4')).tobytes()
        groups = [words[i:i + 4] for i in range(0, len(words), 4)]
        return b''.join(g[1:] if endian == 'big' else g[:3] for g in groups)
    dtype = {9: 'i8', 10: 'u4', 11: 'u2', 12: 'u8', 16: 'u1'}[fmt]
    return np.asarray(values, dtype=object).astype(mark + dtype).tobytes()


def write_rev2(path, fmt, endian):
    mark = '>' if endian == 'big' else '<'
    binary = bytearray(400)
    struct.pack_into(mark + 'h', binary, 16, 250)            # 3217 sample interval
    struct.pack_into(mark + 'H', binary, 20, REV2_SAMPLES)   # 3221 samples per trace
    struct.pack_into(mark + 'h', binary, 24, fmt)            # 3225 format
    struct.pack_into(mark + 'h', binary, 54, 1)              # 3255 metres
    struct.pack_into(mark + 'i', binary, 96, 16909060)       # 3297 byte-order constant
    binary[300] = 2                                           # 3501 major revision
    binary[301] = 0                                           # 3502 minor revision
    struct.pack_into(mark + 'h', binary, 302, 1)             # 3503 fixed length
    text = ('C 1 REV 2 FORMAT %d %s' % (fmt, endian.upper())).ljust(3200).encode('ascii')
    parts = [text, bytes(binary)]
    expected = []
    for trace in range(REV2_TRACES):
        header = bytearray(240)
        struct.pack_into(mark + 'i', header, 0, trace + 1)
        struct.pack_into(mark + 'H', header, 114, REV2_SAMPLES)
        struct.pack_into(mark + 'h', header, 116, 250)
        values = rev2_values(fmt, trace)
        parts += [bytes(header), encode_rev2(fmt, values, endian)]
        expected.append([float(v) for v in values])
    open(path, 'wb').write(b''.join(parts))
    return expected


def main():
    out = sys.argv[1]
    os.makedirs(out, exist_ok=True)
    made = {}
    for name, fmt in (('ibm-be', 1), ('ieee-be', 5), ('int32-be', 2), ('int16-be', 3), ('int8-be', 8)):
        path = os.path.join(out, name + '.sgy')
        write(path, fmt)
        made[name] = read_back(path, 'big')
    path = os.path.join(out, 'ieee-le-rev2.sgy')
    write(path, 5, endian='little')
    patch_rev2(path, 'little')
    made['ieee-le-rev2'] = read_back(path, 'little')
    path = os.path.join(out, 'ext2-be.sgy')
    write(path, 5, ext_headers=2)
    made['ext2-be'] = read_back(path, 'big')
    ibm_words = write_ibm_words(out)
    rev2 = {}
    for fmt in REV2_FORMATS:
        for endian in ('big', 'little'):
            name = 'rev2-fmt%d-%s' % (fmt, 'be' if endian == 'big' else 'le')
            rev2[name] = write_rev2(os.path.join(out, name + '.sgy'), fmt, endian)
    cp037 = [ord(ch) for ch in bytes(range(256)).decode('cp037')]
    json.dump({'segyio': str(segyio.__version__), 'numpy': np.__version__, 'files': made,
               'ibmWords': ibm_words, 'rev2': rev2, 'cp037': cp037}, sys.stdout)


if __name__ == '__main__':
    import warnings
    warnings.simplefilter('ignore')
    main()
