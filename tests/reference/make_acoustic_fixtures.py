#!/usr/bin/env python3
"""Reference fixture for the predicted acoustic response (src/measure/acoustic.ts).

Run from the repository root:   python3 tests/reference/make_acoustic_fixtures.py
Writes tests/reference/fixtures/acoustic.json, deterministically (no randomness; floats written
with Python's repr; sorted keys), so CI can re-run it and `git diff --exit-code` the fixture.

What it computes, independently of the TypeScript core:
- Two analytic "drivers" (invented, common textbook shapes): a closed-box woofer as a second-order
  high-pass (R. H. Small, "Closed-Box Loudspeaker Systems", JAES 20, 1972) times a second-order
  low-pass for its upper roll-off; a dome tweeter as a second-order high-pass at its resonance
  times a first-order low-pass. Each is evaluated with scipy.signal.freqs on a 1/48-octave grid
  from 20 Hz and stored as a measurement would be: magnitude dB, unwrapped phase in degrees with
  the time of flight removed (numpy.unwrap), and that time as delayMs.
- The chain of each output: the Audio EQ Cookbook peaking section (written here from the
  cookbook's formulas) and Linkwitz-Riley 4 edges as scipy.signal.butter(2, fc, fs=fs,
  output='sos') squared (Lipshitz and Vanderkooy, JAES 34(11), 1986), evaluated with
  scipy.signal.sosfreqz; gain, polarity and delay as exp(-j w t).
- The measurement at other frequencies: numpy.interp on ln f of the dB and of the unwrapped phase
  (the documented interpolant); no value outside the measured range.
- The acoustic offset in mm as a time d / c with c = 331.3 sqrt(1 + T / 273.15) m/s.
- The predicted outputs and their complex sum; the group delay -d(arg)/dw by a central difference
  in f of the whole prediction (step 3e-5 f, inside one interpolation segment), not by any
  derivative formula.
"""
import json
import math
import os

import numpy as np
import scipy
import scipy.signal as sig

HERE = os.path.dirname(os.path.abspath(__file__))
OUT = os.path.join(HERE, 'fixtures')

FS = 48000.0
T_AIR = 25.0
C = 331.3 * math.sqrt(1 + T_AIR / 273.15)
GRID = [20.0 * 2.0 ** (k / 48.0) for k in range(479)]  # 20 Hz .. 19.87 kHz


def woofer_s():
    # closed box f_c = 48 Hz, Q_tc = 0.8; upper roll-off 3.5 kHz, Q 0.6; level 0 dB
    w1, q1, w2, q2 = 2 * math.pi * 48.0, 0.8, 2 * math.pi * 3500.0, 0.6
    b = np.polymul([1.0, 0.0, 0.0], [w2 * w2])
    a = np.polymul([1.0, w1 / q1, w1 * w1], [1.0, w2 / q2, w2 * w2])
    return b, a, 1.0


def tweeter_s():
    # dome resonance 1.2 kHz, Q 1.2; first-order roll-off at 25 kHz; level +2 dB
    w1, q1, w2 = 2 * math.pi * 1200.0, 1.2, 2 * math.pi * 25000.0
    g = 10 ** (2 / 20)
    b = np.polymul([g, 0.0, 0.0], [w2])
    a = np.polymul([1.0, w1 / q1, w1 * w1], [1.0, w2])
    return b, a, 1.0


DRIVERS = {
    # id: (model, distance to the microphone in m)
    'wf': (woofer_s, 1.03),
    'tw': (tweeter_s, 1.00),
}


def measurement(mid):
    model, distance = DRIVERS[mid]
    b, a, _ = model()
    _, h = sig.freqs(b, a, worN=2 * np.pi * np.array(GRID))
    delay_ms = distance / 343.2 * 1000  # time of flight at the measurement's own 20 degrees C
    return {
        'id': mid,
        'name': 'analytic ' + mid,
        'source': {'fileName': mid + '.txt', 'kind': 'generated'},
        'frequencyHz': GRID,
        'magnitudeDb': [float(x) for x in 20 * np.log10(np.abs(h))],
        'phaseDeg': [float(x) for x in np.degrees(np.unwrap(np.angle(h)))],
        'phaseEstimated': False,
        'delayMs': delay_ms,
        'notes': ['analytic driver for a test; invented'],
    }


def cookbook_peaking(f0, fs, gain_db, q):
    # Audio EQ Cookbook (R. Bristow-Johnson), peakingEQ
    A = 10 ** (gain_db / 40)
    w0 = 2 * math.pi * f0 / fs
    alpha = math.sin(w0) / (2 * q)
    b0, b1, b2 = 1 + alpha * A, -2 * math.cos(w0), 1 - alpha * A
    a0, a1, a2 = 1 + alpha / A, -2 * math.cos(w0), 1 - alpha / A
    return [b0 / a0, b1 / a0, b2 / a0, 1.0, a1 / a0, a2 / a0]


def lr4(fc, btype):
    sos = sig.butter(2, fc, btype=btype, output='sos', fs=FS)
    return np.vstack([sos, sos])


PLAN = {
    'format': 'biquadrant.plan',
    'version': 3,
    'name': 'acoustic reference',
    'sampleRate': FS,
    'airTemperatureC': T_AIR,
    'input': {'bands': [{'id': 'b1', 'type': 'peaking', 'frequency': 63.0, 'gainDb': -4.0, 'q': 4.0, 'enabled': True}]},
    'outputs': [
        {'id': 'woofer', 'name': 'Woofer', 'gainDb': -1.0, 'delayMs': 0.0, 'invert': False, 'mute': False,
         'highPass': None, 'lowPass': {'family': 'linkwitz-riley', 'order': 4, 'frequency': 2200.0}, 'bands': [],
         'driverMeasurementId': 'wf'},
        {'id': 'tweeter', 'name': 'Tweeter', 'gainDb': -2.0, 'delayMs': 0.05, 'invert': True, 'mute': False,
         'highPass': {'family': 'linkwitz-riley', 'order': 4, 'frequency': 2200.0}, 'lowPass': None, 'bands': [],
         'driverMeasurementId': 'tw', 'acousticOffset': {'value': 30.0, 'unit': 'mm'}},
        {'id': 'spare', 'name': 'Spare, not measured', 'gainDb': 0.0, 'delayMs': 0.0, 'invert': False, 'mute': False,
         'highPass': None, 'lowPass': None, 'bands': []},
    ],
}


def chain_sos(out):
    sos = [cookbook_peaking(63.0, FS, -4.0, 4.0)]
    if out['highPass']:
        sos.extend(lr4(out['highPass']['frequency'], 'high').tolist())
    if out['lowPass']:
        sos.extend(lr4(out['lowPass']['frequency'], 'low').tolist())
    return np.array(sos)


def predicted(out, meas, f):
    """Complex predicted response of one output at frequencies f (NaN outside the measured range)."""
    f = np.asarray(f, dtype=float)
    _, hc = sig.sosfreqz(chain_sos(out), worN=f, fs=FS)
    g = 10 ** (out['gainDb'] / 20) * (-1 if out['invert'] else 1)
    off = out.get('acousticOffset')
    offset_s = 0.0 if off is None else (off['value'] / 1000 / C if off['unit'] == 'mm' else off['value'] / 1000)
    t = out['delayMs'] / 1000 + offset_s + meas['delayMs'] / 1000
    lf = np.log(np.array(meas['frequencyHz']))
    mag = np.interp(np.log(f), lf, meas['magnitudeDb'])
    ph = np.radians(np.interp(np.log(f), lf, meas['phaseDeg']))
    hd = 10 ** (mag / 20) * np.exp(1j * ph)
    h = hc * g * hd * np.exp(-2j * np.pi * f * t)
    inside = (f >= meas['frequencyHz'][0]) & (f <= meas['frequencyHz'][-1])
    return np.where(inside, h, np.nan)


def group_delay_ms(fn, f):
    h = 3e-5 * f  # f +/- h stays inside one 1/48-octave segment (+/-0.7% around its middle)
    ratio = fn([f + h])[0] / fn([f - h])[0]
    return float(-np.angle(ratio) / (2 * np.pi * 2 * h) * 1000)


def main():
    meas = {mid: measurement(mid) for mid in DRIVERS}
    plan = dict(PLAN, measurements=[meas['wf'], meas['tw']])
    outs = [o for o in PLAN['outputs'] if 'driverMeasurementId' in o]
    grid_points = [GRID[k] for k in (0, 1, 60, 150, 240, 300, 330, 360, 420, 478)]
    mids = [math.sqrt(GRID[k] * GRID[k + 1]) for k in (40, 120, 200, 280, 310, 330, 345, 400, 470, 477)]
    outside = [10.0, 19.99, 19900.0, 23000.0]
    cases = []
    for kind, fl in (('grid', grid_points), ('between', mids), ('outside', outside)):
        for f in fl:
            parts = {o['id']: predicted(o, meas[o['driverMeasurementId']], [f])[0] for o in outs}
            total = sum(parts.values())
            case = {'kind': kind, 'frequencyHz': f, 'outputs': {}, 'sum': None}
            for oid, h in parts.items():
                if np.isnan(h):
                    case['outputs'][oid] = None
                    continue
                entry = {'magnitudeDb': float(20 * np.log10(abs(h))), 'phaseDeg': float(np.degrees(np.angle(h)))}
                if kind == 'between':
                    o = next(x for x in outs if x['id'] == oid)
                    entry['groupDelayMs'] = group_delay_ms(lambda ff, o=o: predicted(o, meas[o['driverMeasurementId']], ff), f)
                case['outputs'][oid] = entry
            if not np.isnan(total):
                s = {'magnitudeDb': float(20 * np.log10(abs(total))), 'phaseDeg': float(np.degrees(np.angle(total)))}
                if kind == 'between':
                    s['groupDelayMs'] = group_delay_ms(lambda ff: sum(predicted(o, meas[o['driverMeasurementId']], ff) for o in outs), f)
                case['sum'] = s
            cases.append(case)
    meta = {
        'generator': 'tests/reference/make_acoustic_fixtures.py',
        'scipy': scipy.__version__,
        'numpy': np.__version__,
        'speedOfSoundMps': C,
        'note': 'analytic drivers via scipy.signal.freqs; chains via scipy.signal.sosfreqz; measurement interpolation via numpy.interp on ln f; group delay by central difference',
    }
    os.makedirs(OUT, exist_ok=True)
    text = '{"meta":' + json.dumps(meta, sort_keys=True, separators=(',', ':'), allow_nan=False)
    text += ',\n"plan":' + json.dumps(plan, sort_keys=True, separators=(',', ':'), allow_nan=False)
    text += ',\n"cases":[\n' + ',\n'.join(json.dumps(c, sort_keys=True, separators=(',', ':'), allow_nan=False) for c in cases) + '\n]}\n'
    with open(os.path.join(OUT, 'acoustic.json'), 'w', encoding='utf-8') as fh:
        fh.write(text)


if __name__ == '__main__':
    main()
