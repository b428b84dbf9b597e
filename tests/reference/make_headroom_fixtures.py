#!/usr/bin/env python3
"""Reference figures for the headroom search and the worst-case peak (tests/analysis/headroom.test.ts).

Run from the repository root:   python3 tests/reference/make_headroom_fixtures.py
Writes tests/reference/fixtures/headroom.json (deterministic: sorted keys, Python repr floats).

Independent of the TypeScript core:
- Sections: the Audio EQ Cookbook formulas (R. Bristow-Johnson) written here in Python, and
  Linkwitz-Riley edges as scipy.signal.butter(n, fc, fs=fs, output='sos') squared (Lipshitz and
  Vanderkooy, JAES 34(11), 1986). docs/references.md, "Biquad formulas" and "Crossover alignments".
- Sine peak: max |H| by brute force, no knowledge of pole positions: scipy.signal.sosfreqz on a
  uniform grid of 2^21 + 1 points over 0 .. pi (spacing 1.5e-6 rad), then
  scipy.optimize.minimize_scalar (bounded, xatol 1e-14) between the best point's neighbours.
- Worst-case peak: sum |h[n]| of the impulse response from scipy.signal.sosfilt, 2^20 samples
  (docs/references.md, "Headroom and the worst-case peak"; every case here decays below 1e-15
  well inside that length, which the script asserts).
"""
import json
import math
import os

import numpy as np
import scipy
import scipy.optimize as opt
import scipy.signal as sig

HERE = os.path.dirname(os.path.abspath(__file__))
OUT = os.path.join(HERE, 'fixtures', 'headroom.json')


def cookbook(kind, f0, fs, gain_db=0.0, q=None, slope=None):
    A = 10 ** (gain_db / 40)
    w0 = 2 * math.pi * f0 / fs
    c, s = math.cos(w0), math.sin(w0)
    if slope is not None:
        alpha = s / 2 * math.sqrt((A + 1 / A) * (1 / slope - 1) + 2)
    else:
        alpha = s / (2 * q)
    if kind == 'peaking':
        b = [1 + alpha * A, -2 * c, 1 - alpha * A]
        a = [1 + alpha / A, -2 * c, 1 - alpha / A]
    elif kind == 'highShelf':
        t = 2 * math.sqrt(A) * alpha
        b = [A * ((A + 1) + (A - 1) * c + t), -2 * A * ((A - 1) + (A + 1) * c), A * ((A + 1) + (A - 1) * c - t)]
        a = [(A + 1) - (A - 1) * c + t, 2 * ((A - 1) - (A + 1) * c), (A + 1) - (A - 1) * c - t]
    elif kind == 'lowShelf':
        t = 2 * math.sqrt(A) * alpha
        b = [A * ((A + 1) - (A - 1) * c + t), 2 * A * ((A - 1) - (A + 1) * c), A * ((A + 1) - (A - 1) * c - t)]
        a = [(A + 1) + (A - 1) * c + t, -2 * ((A - 1) + (A + 1) * c), (A + 1) + (A - 1) * c - t]
    elif kind == 'notch':
        b = [1, -2 * c, 1]
        a = [1 + alpha, -2 * c, 1 - alpha]
    else:
        raise ValueError(kind)
    return [b[0] / a[0], b[1] / a[0], b[2] / a[0], 1.0, a[1] / a[0], a[2] / a[0]]


def linkwitz_riley(order, fc, kind, fs):
    sos = sig.butter(order // 2, fc, btype='highpass' if kind == 'highPass' else 'lowpass', fs=fs, output='sos')
    return [list(map(float, row)) for row in np.vstack([sos, sos])]


def mag_db(sos, w):
    _, h = sig.sosfreqz(np.array(sos), worN=np.atleast_1d(w))
    with np.errstate(divide='ignore'):  # an exact zero (a notch) is -inf dB
        return 20 * np.log10(np.abs(h))


def sine_peak(sos, fs):
    n = 2 ** 21 + 1
    w = np.linspace(0, math.pi, n)
    m = mag_db(sos, w)
    i = int(np.nanargmax(m))
    lo, hi = w[max(0, i - 1)], w[min(n - 1, i + 1)]
    r = opt.minimize_scalar(lambda x: -mag_db(sos, x)[0], bounds=(lo, hi), method='bounded', options={'xatol': 1e-14})
    peak, where = (float(-r.fun), float(r.x)) if -r.fun >= m[i] else (float(m[i]), float(w[i]))
    return {'peakDb': peak, 'frequencyHz': where * fs / (2 * math.pi)}


def l1_norm(sos):
    x = np.zeros(2 ** 22)
    x[0] = 1.0
    h = sig.sosfilt(np.array(sos), x)
    assert np.max(np.abs(h[-1000:])) < 1e-15, 'impulse response not decayed'
    return float(np.sum(np.abs(h)))


def case(name, fs, sos, note, l1=True):
    # l1=False: a resonance too slow to decay inside 2^22 samples; only its sine peak is a reference.
    return {'name': name, 'sampleRate': fs, 'sections': [[s[0], s[1], s[2], s[4], s[5]] for s in sos], 'note': note,
            'sine': sine_peak(sos, fs), 'l1': l1_norm(sos) if l1 else None}


def main():
    cases = [
        case('narrow peak beside a shelf', 48000,
             [cookbook('peaking', 1234.5, 48000, 20, q=1000), cookbook('highShelf', 5000, 48000, 6, slope=1)],
             'peaking +20 dB Q 1000 at 1234.5 Hz, then high shelf +6 dB S 1 at 5 kHz'),
        case('narrow low peak at 96 kHz', 96000, [cookbook('peaking', 21, 96000, 12, q=800)], 'peaking +12 dB Q 800 at 21 Hz', l1=False),
        case('peak above 20 kHz', 48000, [cookbook('peaking', 22000, 48000, 9, q=30)], 'peaking +9 dB Q 30 at 22 kHz'),
        case('notch beside a narrow boost', 44100,
             [cookbook('notch', 3000, 44100, q=5), cookbook('peaking', 3010, 44100, 15, q=600)],
             'notch Q 5 at 3 kHz, peaking +15 dB Q 600 at 3010 Hz'),
        case('low shelf boost', 48000, [cookbook('lowShelf', 200, 48000, 6, slope=1)], 'low shelf +6 dB S 1 at 200 Hz (peak at 0 Hz)'),
        case('LR8 high-pass at 80 Hz', 48000, linkwitz_riley(8, 80, 'highPass', 48000), 'Linkwitz-Riley 8th order high-pass at 80 Hz'),
        case('LR4 low-pass at 2 kHz', 48000, linkwitz_riley(4, 2000, 'lowPass', 48000), 'Linkwitz-Riley 4th order low-pass at 2 kHz'),
        case('peaking +6 dB Q 2', 48000, [cookbook('peaking', 1000, 48000, 6, q=2)], 'peaking +6 dB Q 2 at 1 kHz'),
    ]
    meta = {'scipy': scipy.__version__, 'numpy': np.__version__,
            'sine': 'sosfreqz on 2^21+1 uniform points over 0..pi, minimize_scalar(bounded, xatol 1e-14) between neighbours',
            'l1': 'sum |sosfilt(sos, unit impulse of 2^22 samples)|'}
    with open(OUT, 'w') as f:
        f.write('{\n"meta": ' + json.dumps(meta, sort_keys=True) + ',\n"cases": [\n')
        f.write(',\n'.join(json.dumps(c, sort_keys=True) for c in cases))
        f.write('\n]}\n')


if __name__ == '__main__':
    main()
