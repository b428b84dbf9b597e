#!/usr/bin/env python3
"""Reference fixtures for the analog prototypes, cramping, bandwidth and delay checks.

Run from the repository root:   python3 tests/reference/make_analog_fixtures.py
Writes tests/reference/fixtures/analog.json (deterministic, as make_fixtures.py).

Sources (see docs/references.md, "Analog prototypes and cramping"):
- Bands: the Audio EQ Cookbook's analog prototypes H(s) (R. Bristow-Johnson), written here in
  Python with s scaled by w0 = 2 pi f0 (rad/s), evaluated with scipy.signal.freqs; the group delay
  is -d arg H / dw by mpmath.diff at 30 digits on the same polynomials.
- Edges: scipy.signal.butter / scipy.signal.bessel with analog=True (Linkwitz-Riley: the
  Butterworth of half the order, squared), evaluated with scipy.signal.freqs_zpk.
- Bandwidth achieved: the cookbook's bandwidth-to-Q formula (with its w0 / sin w0 correction),
  the digital section's half-gain (peaking) or -3.01 dB (band-pass) frequencies found with
  scipy.optimize.brentq on scipy.signal.freqz, and log2 of their ratio.
- Bessel "delay" normalisation after the bilinear transform: scipy.signal.bessel(norm='delay',
  fs=...) sections, their group delay at 1 Hz evaluated exactly at 50 digits (the formula of
  make_fixtures.py), over the promised 1 / (2 pi fc).
- Matched peaking checks: the analog peaking's half-gain frequencies by brentq on freqs.
"""
import json
import math
import os

import numpy as np
import scipy
import scipy.signal as sig
from scipy.optimize import brentq
import mpmath

HERE = os.path.dirname(os.path.abspath(__file__))
OUT = os.path.join(HERE, 'fixtures')
VERSIONS = {'scipy': scipy.__version__, 'numpy': np.__version__, 'mpmath': mpmath.__version__}


def write(name, meta, cases):
    os.makedirs(OUT, exist_ok=True)
    head = json.dumps(meta, sort_keys=True, separators=(',', ':'), allow_nan=False)
    lines = [json.dumps(c, sort_keys=True, separators=(',', ':'), allow_nan=False) for c in cases]
    with open(os.path.join(OUT, name), 'w', encoding='utf-8') as fh:
        fh.write('{"meta":' + head + ',\n"cases":[\n' + ',\n'.join(lines) + '\n]}\n')


def analog_band(kind, f0, gain_db=0.0, q=None, slope=None):
    """Cookbook analog prototype as (b, a) polynomials in s (rad/s), highest power first."""
    A = 10 ** (gain_db / 40)
    if q is None and kind in ('lowShelf', 'highShelf'):
        inv_q = math.sqrt((A + 1 / A) * (1 / (slope if slope is not None else 1.0) - 1) + 2)
    else:
        inv_q = 1 / (q if q is not None else 1 / math.sqrt(2))
    w0 = 2 * math.pi * f0
    # Polynomials in the normalized S = s / w0: [c2, c1, c0] means c2 S^2 + c1 S + c0.
    if kind == 'lowPass':
        b, a = [0, 0, 1], [1, inv_q, 1]
    elif kind == 'highPass':
        b, a = [1, 0, 0], [1, inv_q, 1]
    elif kind == 'bandPass':
        b, a = [0, inv_q, 0], [1, inv_q, 1]
    elif kind == 'notch':
        b, a = [1, 0, 1], [1, inv_q, 1]
    elif kind == 'allPass':
        b, a = [1, -inv_q, 1], [1, inv_q, 1]
    elif kind == 'peaking':
        b, a = [1, A * inv_q, 1], [1, inv_q / A, 1]
    elif kind == 'lowShelf':
        k = math.sqrt(A) * inv_q
        b, a = [A, A * k, A * A], [A, k, 1]
    elif kind == 'highShelf':
        k = math.sqrt(A) * inv_q
        b, a = [A * A, A * k, A], [1, k, A]
    elif kind == 'lowPass1':
        b, a = [0, 1], [1, 1]
    elif kind == 'highPass1':
        b, a = [1, 0], [1, 1]
    elif kind == 'allPass1':
        b, a = [-1, 1], [1, 1]
    else:
        raise ValueError(kind)
    n = len(b) - 1
    # S = s / w0: the coefficient of s^k is c_k / w0^k.
    scale = lambda c: [c[i] / w0 ** (n - i) for i in range(len(c))]
    return scale(b), scale(a)


def group_delay_ms(b, a, f):
    mpmath.mp.dps = 30
    def arg(w):
        s = mpmath.mpc(0, w)
        return mpmath.arg(mpmath.polyval([mpmath.mpf(x) for x in b], s) / mpmath.polyval([mpmath.mpf(x) for x in a], s))
    w = 2 * mpmath.pi * mpmath.mpf(f)
    return float(-mpmath.diff(arg, w) * 1000)


FREQS = [20.0, 100.0, 1000.0, 5000.0, 10000.0, 12000.0, 15000.0, 18000.0, 20000.0, 21000.0, 22000.0]


def band_cases():
    cases = []
    specs = [
        ('peaking', 1000, dict(gain_db=6, q=1.41)),
        ('peaking', 16000, dict(gain_db=9, q=2)),
        ('peaking', 18000, dict(gain_db=-8, q=0.7)),
        ('lowShelf', 200, dict(gain_db=4, slope=0.8)),
        ('lowShelf', 12000, dict(gain_db=6)),
        ('highShelf', 12000, dict(gain_db=-12, q=0.7)),
        ('highShelf', 4000, dict(gain_db=3)),
        ('lowPass', 16000, dict(q=0.707)),
        ('highPass', 16000, dict(q=1.2)),
        ('highPass', 20, dict(q=0.5)),
        ('bandPass', 16000, dict(q=2)),
        ('notch', 16000, dict(q=2)),
        ('allPass', 9000, dict(q=0.9)),
        ('lowPass1', 15000, {}),
        ('highPass1', 300, {}),
        ('allPass1', 1200, {}),
    ]
    for kind, f0, kw in specs:
        b, a = analog_band(kind, f0, **kw)
        w, h = sig.freqs(b, a, worN=2 * np.pi * np.array(FREQS))
        band = {'id': 'b', 'type': kind, 'frequency': f0, 'enabled': True}
        if 'gain_db' in kw:
            band['gainDb'] = kw['gain_db']
        if 'q' in kw:
            band['q'] = kw['q']
        if 'slope' in kw:
            band['slope'] = kw['slope']
        cases.append({
            'kind': 'band', 'band': band, 'frequencies': FREQS,
            'call': f'scipy.signal.freqs({b}, {a}, worN=2*pi*frequencies)',
            'magnitudeDb': [float(20 * np.log10(abs(x))) if abs(x) > 0 else -400.0 for x in h],
            'phaseDeg': [float(np.degrees(np.angle(x))) for x in h],
            'groupDelayMs': [group_delay_ms(b, a, f) for f in FREQS],
        })
    return cases


def edge_cases():
    cases = []
    specs = [('butterworth', 4, 'lowPass', 2200, None), ('butterworth', 3, 'highPass', 80, None),
             ('linkwitz-riley', 4, 'highPass', 2200, None), ('linkwitz-riley', 8, 'lowPass', 15000, None),
             ('bessel', 4, 'lowPass', 16000, 'delay'), ('bessel', 3, 'highPass', 2200, 'phase'), ('bessel', 2, 'lowPass', 8000, 'mag')]
    for family, order, kind, fc, norm in specs:
        btype = 'low' if kind == 'lowPass' else 'high'
        wc = 2 * np.pi * fc
        if family == 'butterworth':
            z, p, k = sig.butter(order, wc, btype, analog=True, output='zpk'); call = f'butter({order}, 2*pi*{fc}, "{btype}", analog=True)'
        elif family == 'linkwitz-riley':
            z, p, k = sig.butter(order // 2, wc, btype, analog=True, output='zpk')
            z, p, k = np.concatenate([z, z]), np.concatenate([p, p]), k * k
            call = f'butter({order // 2}, 2*pi*{fc}, "{btype}", analog=True) squared'
        else:
            z, p, k = sig.bessel(order, wc, btype, analog=True, output='zpk', norm=norm); call = f'bessel({order}, 2*pi*{fc}, "{btype}", analog=True, norm="{norm}")'
        w, h = sig.freqs_zpk(z, p, k, worN=2 * np.pi * np.array(FREQS))
        edge = {'family': family, 'order': order, 'frequency': fc}
        if norm is not None:
            edge['normalization'] = 'magnitude' if norm == 'mag' else norm
        cases.append({'kind': 'edge', 'edge': edge, 'edgeKind': kind, 'frequencies': FREQS, 'call': call,
                      'magnitudeDb': [float(20 * np.log10(abs(x))) for x in h], 'phaseDeg': [float(np.degrees(np.angle(x))) for x in h]})
    return cases


def cookbook_digital(kind, f0, fs, q, gain_db):
    A = 10 ** (gain_db / 40)
    w0 = 2 * math.pi * f0 / fs
    cw, sw = math.cos(w0), math.sin(w0)
    alpha = sw / (2 * q)
    if kind == 'peaking':
        return [1 + alpha * A, -2 * cw, 1 - alpha * A], [1 + alpha / A, -2 * cw, 1 - alpha / A]
    return [alpha, 0, -alpha], [1 + alpha, -2 * cw, 1 - alpha]  # bandPass, 0 dB peak


def bandwidth_cases():
    cases = []
    for kind, f0, fs, bw, gain_db in [('peaking', 18000, 44100, 1.0, 6.0), ('bandPass', 18000, 44100, 1.0, 0.0),
                                      ('peaking', 1000, 48000, 1.0, -6.0), ('peaking', 12000, 48000, 2.0, 9.0)]:
        w0 = 2 * math.pi * f0 / fs
        q = 1 / (2 * math.sinh(math.log(2) / 2 * bw * w0 / math.sin(w0)))  # cookbook, BW case
        b, a = cookbook_digital(kind, f0, fs, q, gain_db)
        level = gain_db / 2 if kind == 'peaking' else 10 * math.log10(0.5)
        def f(x):
            return 20 * math.log10(abs(sig.freqz(b, a, worN=[x], fs=fs)[1][0])) - level
        lo = brentq(f, 1.0, f0, xtol=1e-12, rtol=1e-15)
        hi = brentq(f, f0, fs / 2 * (1 - 1e-9), xtol=1e-12, rtol=1e-15)
        cases.append({'kind': 'bandwidth', 'type': kind, 'frequency': f0, 'sampleRate': fs, 'bandwidthOctaves': bw, 'gainDb': gain_db,
                      'q': q, 'lowerHz': lo, 'upperHz': hi, 'achievedOctaves': math.log2(hi / lo),
                      'call': 'brentq on 20 log10|freqz(b, a, fs=fs)| minus the half gain (peaking) or -3.01 dB (band-pass)'})
    return cases


def bessel_delay_cases():
    cases = []
    mpmath.mp.dps = 50
    for order in (2, 4):
        for fc in (2200.0, 16000.0):
            fs = 48000.0
            sos = sig.bessel(order, fc, 'low', norm='delay', fs=fs, output='sos')
            w = 2 * mpmath.pi * 1 / mpmath.mpf(fs)
            z1 = mpmath.expj(-w); z2 = z1 * z1
            tau = mpmath.mpf(0)
            for row in sos:
                b0, b1, b2, a0, a1, a2 = [mpmath.mpf(float(x)) for x in row]
                tau += mpmath.re((b1 * z1 + 2 * b2 * z2) / (b0 + b1 * z1 + b2 * z2) - (a1 * z1 + 2 * a2 * z2) / (a0 + a1 * z1 + a2 * z2))
            delay_s = float(tau) / fs
            promised = 1 / (2 * math.pi * fc)
            cases.append({'kind': 'besselDelay', 'order': order, 'frequency': fc, 'sampleRate': fs, 'delayAt1HzS': delay_s,
                          'promisedS': promised, 'ratio': delay_s / promised,
                          'call': f'bessel({order}, {fc}, "low", norm="delay", fs={fs}, output="sos"), group delay at 1 Hz at 50 digits'})
    return cases


def matched_peaking_cases():
    cases = []
    for f0, fs, gain_db, q in [(16000, 48000, 9.0, 2.0), (18000, 44100, -8.0, 0.7), (15000, 44100, 6.0, 1.41), (20000, 48000, 12.0, 4.0)]:
        b, a = analog_band('peaking', f0, gain_db=gain_db, q=q)
        def f(x):
            return 20 * math.log10(abs(sig.freqs(b, a, worN=[2 * math.pi * x])[1][0])) - gain_db / 2
        lo = brentq(f, 1.0, f0, xtol=1e-12, rtol=1e-15)
        grid = [f0 * 2 ** (k / 8) for k in range(-24, 9) if f0 * 2 ** (k / 8) < fs / 2]
        w, h = sig.freqs(b, a, worN=2 * np.pi * np.array(grid))
        cases.append({'kind': 'matchedPeaking', 'band': {'id': 'p', 'type': 'peaking', 'frequency': f0, 'gainDb': gain_db, 'q': q, 'enabled': True},
                      'sampleRate': fs, 'analogLowerHalfGainHz': lo, 'frequencies': grid,
                      'analogMagnitudeDb': [float(20 * np.log10(abs(x))) for x in h],
                      'call': 'scipy.signal.freqs of the cookbook analog peaking; brentq for the lower half-gain frequency'})
    return cases


def main():
    meta = dict(VERSIONS, generator='tests/reference/make_analog_fixtures.py',
                note='analog prototypes (scipy.signal.freqs / freqs_zpk), bandwidth achieved by cookbook bands, Bessel delay after the bilinear transform, analog peaking references for matched designs')
    write('analog.json', meta, band_cases() + edge_cases() + bandwidth_cases() + bessel_delay_cases() + matched_peaking_cases())


if __name__ == '__main__':
    main()
