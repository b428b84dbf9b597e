#!/usr/bin/env python3
"""Reference fixtures for measured responses: smoothing, WAV impulse-response import, minimum phase.

Run from the repository root:   python3 tests/reference/make_measure_fixtures.py
(`npm run fixtures` runs it after make_fixtures.py). Writes tests/reference/fixtures/measure-*.json
and tests/reference/fixtures/wav/*.wav. The output is deterministic (no random numbers without a
fixed seed, sorted keys, floats written with Python's repr) so CI can re-run it and
`git diff --exit-code` the fixtures.

Sources (docs/references.md, "Measured responses"):
- Smoothing: the definition of docs/measurements.md ("Smoothing"), computed here independently
  of the TypeScript code: the interpolant (linear in log2 f for the level in dB and for the
  unwrapped phase) integrated numerically with scipy.integrate.quad, not in closed form.
- WAV: the impulse response of a known biquad cascade by scipy.signal.sosfilt, written with
  scipy.io.wavfile.write (16-bit and 32-bit PCM, 32- and 64-bit IEEE float) and with Python's
  wave module (24-bit PCM, which scipy.io.wavfile cannot write; read back with scipy to check);
  the reference response is scipy.signal.sosfreqz of the same cascade.
- Minimum phase: analog minimum-phase systems whose exact phase is known, evaluated with
  scipy.signal.freqs: the Audio EQ Cookbook's analog prototypes (R. Bristow-Johnson) and
  Butterworth / Linkwitz-Riley crossover cascades (scipy.signal.butter(analog=True)).
"""
import json
import math
import os
import warnings
import wave

import numpy as np
import scipy
import scipy.integrate as integ
import scipy.io.wavfile as wavfile
import scipy.signal as sig

HERE = os.path.dirname(os.path.abspath(__file__))
OUT = os.path.join(HERE, 'fixtures')
WAV_OUT = os.path.join(OUT, 'wav')
VERSIONS = {'scipy': scipy.__version__, 'numpy': np.__version__, 'generator': 'tests/reference/make_measure_fixtures.py'}


def write(name, meta, cases):
    """One JSON file: meta on the first line, one case per line (diff-friendly)."""
    head = json.dumps(meta, sort_keys=True, separators=(',', ':'), allow_nan=False)
    lines = [json.dumps(c, sort_keys=True, separators=(',', ':'), allow_nan=False) for c in cases]
    with open(os.path.join(OUT, name), 'w', encoding='utf-8') as fh:
        fh.write('{"meta":' + head + ',\n"cases":[\n' + ',\n'.join(lines) + '\n]}\n')


def log_grid(f_lo, f_hi, per_octave):
    n = int(math.floor(math.log2(f_hi / f_lo) * per_octave + 1e-9))
    return [f_lo * 2.0 ** (k / per_octave) for k in range(n + 1)]


# ---- smoothing --------------------------------------------------------------------------------

def invented_measurement(freqs):
    """An invented response: a 2nd-order high-pass, a resonance, a dip and a fixed ripple."""
    s = 2j * np.pi * np.asarray(freqs)
    w1 = 2 * np.pi * 45.0
    hp = s ** 2 / (s ** 2 + s * w1 / 0.9 + w1 ** 2)
    w2 = 2 * np.pi * 900.0
    peak = (s ** 2 + s * w2 * 2.0 / 4 + w2 ** 2) / (s ** 2 + s * w2 / (2.0 * 4) + w2 ** 2)
    w3 = 2 * np.pi * 6000.0
    lp = w3 ** 2 / (s ** 2 + s * w3 / 0.6 + w3 ** 2)
    h = hp * peak * lp
    u = np.log2(np.asarray(freqs))
    mag = 20 * np.log10(np.abs(h)) + 1.5 * np.sin(7.3 * u) * np.cos(2.1 * u)
    ph = np.degrees(np.unwrap(np.angle(h))) + 25 * np.sin(5.1 * u)
    return [float(x) for x in mag], [float(x) for x in ph]


def width_octaves(setting, f):
    if setting == 'variable':
        if f <= 100:
            return 1 / 48
        if f >= 10000:
            return 1 / 3
        t = math.log10(f / 100) / 2.0
        return (1 / 48) * ((1 / 3) / (1 / 48)) ** t
    return 1.0 / setting


def smooth_reference(freqs, mag, ph, setting):
    """The definition, integrated numerically: mean of |H|^2 and of H over log2 f."""
    u = np.log2(np.asarray(freqs))
    mag = np.asarray(mag)
    ph = np.asarray(ph)
    out_m = []
    out_p = []

    def level(x):
        return np.interp(x, u, mag)

    def phase_rad(x):
        return np.radians(np.interp(x, u, ph))

    for i, f in enumerate(freqs):
        half = min(width_octaves(setting, f) / 2, u[i] - u[0], u[-1] - u[i])
        if half <= 0:
            out_m.append(float(mag[i]))
            out_p.append(float(ph[i]))
            continue
        a, b = u[i] - half, u[i] + half
        inner = [x for x in u if a < x < b]
        opts = dict(points=inner if inner else None, limit=200, epsabs=0, epsrel=1e-11)
        pw = integ.quad(lambda x: 10 ** (level(x) / 10), a, b, **opts)[0] / (b - a)
        re = integ.quad(lambda x: 10 ** (level(x) / 20) * math.cos(phase_rad(x)), a, b, **opts)[0]
        im = integ.quad(lambda x: 10 ** (level(x) / 20) * math.sin(phase_rad(x)), a, b, **opts)[0]
        out_m.append(10 * math.log10(pw))
        # The angle nearest the unwrapped phase at f (the TypeScript side returns it that way).
        ang = math.degrees(math.atan2(im, re))
        out_p.append(float(ph[i] + ((ang - ph[i] + 180) % 360 - 180)))
    return out_m, out_p


def smoothing_cases():
    cases = []
    grids = {
        '1/12-octave grid 20 Hz - 20 kHz': log_grid(20, 20000, 12),
        # Unevenly spaced points (a file of mixed density), 30 Hz - 18 kHz.
        'uneven grid': sorted(set([30 * 600 ** (k / 60.0) for k in range(61)] + [100 + 37 * k for k in range(30)])),
    }
    for gname, freqs in grids.items():
        mag, ph = invented_measurement(freqs)
        smoothed = []
        for setting in [48, 6, 3, 1, 'variable']:
            sm, sp = smooth_reference(freqs, mag, ph, setting)
            smoothed.append({'setting': setting, 'magnitudeDb': sm, 'phaseDeg': sp})
        cases.append({'grid': gname, 'frequencyHz': freqs, 'magnitudeDb': mag, 'phaseDeg': ph, 'smoothed': smoothed})
    return cases


def main():
    warnings.simplefilter('ignore', integ.IntegrationWarning)
    os.makedirs(WAV_OUT, exist_ok=True)
    write('measure-smoothing.json', dict(VERSIONS, note='smoothing by its definition, integrated with scipy.integrate.quad (epsrel 1e-11)'), smoothing_cases())


if __name__ == '__main__':
    main()
