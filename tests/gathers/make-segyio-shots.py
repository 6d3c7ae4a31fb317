#!/usr/bin/python3
"""Write a three-shot SEG-Y line with segyio (Debian python3-segyio) and print its geometry.

Usage: /usr/bin/python3 tests/gathers/make-segyio-shots.py OUTPUT_FILE

Three shots (field records 201-203, energy source points 11-13) of 12 traces each, format 5,
big-endian, 200 samples at 500 us. Coordinates and elevations are written in centimetres with
scalar -100 (SEG-Y rev 1, bytes 69-72: a negative scalar divides), offsets (bytes 37-40) in whole
metres. Prints one JSON document: for every trace, the geometry computed here from segyio's
reading of the header bytes by the standard's rule, with no code of slopebreak involved.
"""
import json
import sys

import numpy as np
import segyio

SHOTS = [(201, 11, -2.5), (202, 12, 30.25), (203, 13, 63.0)]
CHANNELS = 12
SAMPLES = 200

spec = segyio.spec()
spec.format = 5
spec.samples = list(range(SAMPLES))
spec.tracecount = len(SHOTS) * CHANNELS
spec.endian = 'big'
with segyio.create(sys.argv[1], spec) as f:
    f.bin.update({segyio.BinField.Interval: 500, segyio.BinField.Samples: SAMPLES, segyio.BinField.MeasurementSystem: 1})
    index = 0
    for record, point, source_x in SHOTS:
        for channel in range(1, CHANNELS + 1):
            receiver_x = 5.5 * channel
            f.header[index] = {
                segyio.TraceField.FieldRecord: record,
                segyio.TraceField.TraceNumber: channel,
                segyio.TraceField.EnergySourcePoint: point,
                segyio.TraceField.offset: int(round(receiver_x - source_x)),
                segyio.TraceField.ReceiverGroupElevation: int(round((100 + 0.1 * channel) * 100)),
                segyio.TraceField.SourceSurfaceElevation: int(round(99.5 * 100)),
                segyio.TraceField.ElevationScalar: -100,
                segyio.TraceField.SourceGroupScalar: -100,
                segyio.TraceField.SourceX: int(round(source_x * 100)),
                segyio.TraceField.GroupX: int(round(receiver_x * 100)),
                segyio.TraceField.CoordinateUnits: 1,
                segyio.TraceField.TRACE_SAMPLE_COUNT: SAMPLES,
                segyio.TraceField.TRACE_SAMPLE_INTERVAL: 500,
            }
            f.trace[index] = np.zeros(SAMPLES, dtype=np.float32) + np.float32(channel)
            index += 1

out = []
with segyio.open(sys.argv[1], ignore_geometry=True) as f:
    for h in f.header:
        scalar = h[segyio.TraceField.SourceGroupScalar]
        escalar = h[segyio.TraceField.ElevationScalar]
        factor = 1 / abs(scalar) if scalar < 0 else (scalar or 1)
        efactor = 1 / abs(escalar) if escalar < 0 else (escalar or 1)
        out.append({
            'record': h[segyio.TraceField.FieldRecord],
            'sourcePoint': h[segyio.TraceField.EnergySourcePoint],
            'channel': h[segyio.TraceField.TraceNumber],
            'sourceX': h[segyio.TraceField.SourceX] * factor,
            'receiverX': h[segyio.TraceField.GroupX] * factor,
            'receiverElevation': h[segyio.TraceField.ReceiverGroupElevation] * efactor,
            'sourceElevation': h[segyio.TraceField.SourceSurfaceElevation] * efactor,
        })
print(json.dumps({'traces': out}))
