#!/usr/bin/env python3
"""Reference fixtures for the band fitter (src/fit/).

Run from the repository root:   python3 tests/reference/make_fit_fixtures.py
Writes tests/reference/fixtures/fit.json, deterministically (no randomness; sorted keys), so CI
can re-run it and compare the fixture.

What it computes, independently of the TypeScript core:
- "inverse": a flat response seen through known peaking bands. The bands' coefficients are the
  Audio EQ Cookbook's peaking EQ (R. Bristow-Johnson; written out here from its formulas), their
  response by scipy.signal.sosfreqz on a 1/48-octave grid from 20 Hz to 20 kHz at 48 kHz. The
  "measurement" is the inverse: minus their summed level in dB. A fit toward a flat target with
  the same number of bands must find them back (the level of a flat response needs nothing else).
- "room": the pressure at a listening position of an invented rectangular room (5.3 x 4.1 x
  2.7 m), as the modal sum of H. Kuttruff, "Room Acoustics" (chapter "Sound waves in a closed
  room: wave theory", the Green's function of a rectangular room as a sum over its normal modes):
      p(w) ~ sum_n psi_n(r_s) psi_n(r_r) / (K_n (w^2 - w_n^2 - 2 j delta_n w_n)),
  psi_n = cos(nx pi x / Lx) cos(ny pi y / Ly) cos(nz pi z / Lz), K_n the integral of psi_n^2 over
  the room (V times 1/2 per non-zero index), w_n = c pi sqrt((nx/Lx)^2 + (ny/Ly)^2 + (nz/Lz)^2),
  delta_n = 6.91 / T the damping constant of a decay time T (Sabine's relation between the decay
  and the damping constant, the same text). The source is one of constant volume acceleration (a
  driver above its resonance), so the sum is used as it stands. Every mode up to 1 kHz is summed
  (far above the 400 Hz top of the data, so the sum has converged there). The level is shifted so
  the mean dB over the data is 0; this is the "measurement" on a 1/48-octave grid from 15 to
  400 Hz, magnitude only.
"""
import itertools
import json
import math
import os

import numpy as np
import scipy
import scipy.signal as sig

HERE = os.path.dirname(os.path.abspath(__file__))
OUT = os.path.join(HERE, 'fixtures')

FS = 48000.0


def grid(f0, f1, per_octave=48):
    n = int(math.floor(per_octave * math.log2(f1 / f0) + 1e-9))
    return [f0 * 2.0 ** (k / per_octave) for k in range(n + 1)]


def peaking_sos(f0, gain_db, q, fs):
    # Audio EQ Cookbook, peaking EQ: A = 10^(gain/40), w0 = 2 pi f0 / fs, alpha = sin(w0) / (2 Q)
    A = 10 ** (gain_db / 40)
    w0 = 2 * math.pi * f0 / fs
    alpha = math.sin(w0) / (2 * q)
    b = [1 + alpha * A, -2 * math.cos(w0), 1 - alpha * A]
    a = [1 + alpha / A, -2 * math.cos(w0), 1 - alpha / A]
    return [b[0] / a[0], b[1] / a[0], b[2] / a[0], 1.0, a[1] / a[0], a[2] / a[0]]


INVERSE_BANDS = [
    {'frequency': 45.0, 'gainDb': 6.0, 'q': 5.0},
    {'frequency': 180.0, 'gainDb': -5.0, 'q': 2.5},
    {'frequency': 900.0, 'gainDb': 4.0, 'q': 1.2},
    {'frequency': 3500.0, 'gainDb': -3.0, 'q': 4.0},
    {'frequency': 11000.0, 'gainDb': 3.5, 'q': 1.0},
]


def inverse_case():
    f = np.array(grid(20.0, 20000.0))
    sos = np.array([peaking_sos(b['frequency'], b['gainDb'], b['q'], FS) for b in INVERSE_BANDS])
    _, h = sig.sosfreqz(sos, worN=f, fs=FS)
    return {
        'name': 'inverse',
        'sampleRate': FS,
        'bands': INVERSE_BANDS,
        'frequencyHz': [float(x) for x in f],
        'magnitudeDb': [float(-20 * np.log10(abs(x))) for x in h],
        'call': 'scipy.signal.sosfreqz(cookbook peaking sos, worN=f, fs=48000); magnitude negated',
    }


ROOM = {'size': [5.3, 4.1, 2.7], 'source': [0.35, 0.5, 0.4], 'listener': [3.2, 2.3, 1.15], 'decayS': 0.35, 'c': 343.2, 'modesUpToHz': 1000.0}


def room_case():
    Lx, Ly, Lz = ROOM['size']
    c = ROOM['c']
    V = Lx * Ly * Lz
    delta = 6.91 / ROOM['decayS']
    f = np.array(grid(15.0, 400.0))
    w = 2 * math.pi * f
    p = np.zeros(len(f), dtype=complex)
    top = ROOM['modesUpToHz']
    nmax = [int(2 * top * L / c) + 1 for L in (Lx, Ly, Lz)]
    count = 0
    for nx, ny, nz in itertools.product(range(nmax[0] + 1), range(nmax[1] + 1), range(nmax[2] + 1)):
        fn = (c / 2) * math.sqrt((nx / Lx) ** 2 + (ny / Ly) ** 2 + (nz / Lz) ** 2)
        if fn > top:
            continue
        count += 1
        psi = lambda r: math.cos(nx * math.pi * r[0] / Lx) * math.cos(ny * math.pi * r[1] / Ly) * math.cos(nz * math.pi * r[2] / Lz)
        K = V * (0.5 if nx else 1.0) * (0.5 if ny else 1.0) * (0.5 if nz else 1.0)
        wn = 2 * math.pi * fn
        p += psi(ROOM['source']) * psi(ROOM['listener']) / (K * (w ** 2 - wn ** 2 - 2j * delta * wn))
    db = 20 * np.log10(np.abs(p))
    db -= db.mean()
    return {
        'name': 'room',
        'sampleRate': FS,
        'room': dict(ROOM, modes=count),
        'frequencyHz': [float(x) for x in f],
        'magnitudeDb': [float(x) for x in db],
        'call': 'modal sum (Kuttruff, Room Acoustics), numpy; every mode up to 1 kHz',
    }


def main():
    cases = [inverse_case(), room_case()]
    meta = {
        'generator': 'tests/reference/make_fit_fixtures.py',
        'scipy': scipy.__version__,
        'numpy': np.__version__,
        'note': 'invented scenarios: bands to find back, and a rectangular room by its modal sum',
    }
    os.makedirs(OUT, exist_ok=True)
    text = '{"meta":' + json.dumps(meta, sort_keys=True, separators=(',', ':'), allow_nan=False)
    text += ',\n"cases":[\n' + ',\n'.join(json.dumps(c, sort_keys=True, separators=(',', ':'), allow_nan=False) for c in cases) + '\n]}\n'
    with open(os.path.join(OUT, 'fit.json'), 'w', encoding='utf-8') as fh:
        fh.write(text)


if __name__ == '__main__':
    main()
