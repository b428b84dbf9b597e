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


# ---- WAV impulse responses --------------------------------------------------------------------

def cookbook_peaking(f0, gain_db, q, fs):
    """Audio EQ Cookbook peaking EQ (R. Bristow-Johnson), as [b0 b1 b2 1 a1 a2]."""
    a = 10 ** (gain_db / 40)
    w0 = 2 * math.pi * f0 / fs
    alpha = math.sin(w0) / (2 * q)
    b = [1 + alpha * a, -2 * math.cos(w0), 1 - alpha * a]
    den = [1 + alpha / a, -2 * math.cos(w0), 1 - alpha / a]
    return [b[0] / den[0], b[1] / den[0], b[2] / den[0], 1.0, den[1] / den[0], den[2] / den[0]]


def cookbook_high_shelf(f0, gain_db, fs, s=1.0):
    """Audio EQ Cookbook high shelf, shelf slope S, as [b0 b1 b2 1 a1 a2]."""
    a = 10 ** (gain_db / 40)
    w0 = 2 * math.pi * f0 / fs
    cw = math.cos(w0)
    alpha = math.sin(w0) / 2 * math.sqrt((a + 1 / a) * (1 / s - 1) + 2)
    sa = 2 * math.sqrt(a) * alpha
    b0 = a * ((a + 1) + (a - 1) * cw + sa)
    b1 = -2 * a * ((a - 1) + (a + 1) * cw)
    b2 = a * ((a + 1) + (a - 1) * cw - sa)
    a0 = (a + 1) - (a - 1) * cw + sa
    a1 = 2 * ((a - 1) - (a + 1) * cw)
    a2 = (a + 1) - (a - 1) * cw - sa
    return [b0 / a0, b1 / a0, b2 / a0, 1.0, a1 / a0, a2 / a0]


def wav_cascade(fs):
    """High-pass 40 Hz (Butterworth 2), peaking +6 dB at 1 kHz Q 2, high shelf -4 dB at 6 kHz,
    low-pass 16 kHz (Butterworth 2): at most about 13 dB of range from 20 Hz to 20 kHz, so even
    16-bit samples hold it to well under 0.05 dB."""
    hp = sig.butter(2, 40, 'highpass', fs=fs, output='sos')
    lp = sig.butter(2, 16000, 'lowpass', fs=fs, output='sos')
    return np.vstack([hp, [cookbook_peaking(1000, 6, 2, fs)], [cookbook_high_shelf(6000, -4, fs)], lp])


WAV_CASES = [
    # file, writer, sample rate, channels (the IR goes in the last one), pre-delay (samples)
    ('ir-pcm16-44100.wav', 'int16', 44100, 1, 150),
    ('ir-pcm24-48000.wav', 'int24', 48000, 1, 168),
    ('ir-pcm32-96000.wav', 'int32', 96000, 1, 400),
    ('ir-float32-48000-stereo.wav', 'float32', 48000, 2, 200),
    ('ir-float64-44100.wav', 'float64', 44100, 1, 123),
]
IR_SECONDS = 0.125  # the cascade has decayed below 1e-7 of its peak by then
PEAK_LEVEL = 0.9    # the largest sample, as a fraction of full scale


def write_wav_24(path, fs, data):
    """24-bit PCM with Python's wave module (scipy.io.wavfile.write has no 24-bit writer)."""
    ints = np.asarray(data, dtype=np.int64)
    raw = bytearray()
    for v in ints.reshape(-1):
        raw += int(v).to_bytes(3, 'little', signed=True)
    with wave.open(path, 'wb') as w:
        w.setnchannels(1 if ints.ndim == 1 else ints.shape[1])
        w.setsampwidth(3)
        w.setframerate(fs)
        w.writeframes(bytes(raw))


def wav_cases():
    cases = []
    # Every 8th point of the importer's grid (1 kHz 2^(k/96), docs/measurements.md) from 20 Hz to
    # 20 kHz: the check needs no interpolation.
    freqs = [1000 * 2.0 ** (k / 12) for k in range(-51, 52) if 20 <= 1000 * 2.0 ** (k / 12) <= 20000]
    for name, kind, fs, channels, pre in WAV_CASES:
        sos = wav_cascade(fs)
        n = int(IR_SECONDS * fs)
        impulse = np.zeros(n)
        impulse[0] = 1.0
        ir = sig.sosfilt(sos, impulse)
        scale = PEAK_LEVEL / np.max(np.abs(ir))
        x = np.concatenate([np.zeros(pre), ir * scale])
        path = os.path.join(WAV_OUT, name)
        if kind == 'int16':
            q = np.round(x * 32768).astype(np.int16)
            wavfile.write(path, fs, q)
        elif kind == 'int24':
            write_wav_24(path, fs, np.round(x * 8388608))
        elif kind == 'int32':
            wavfile.write(path, fs, np.round(x * 2147483648).astype(np.int32))
        elif kind == 'float32':
            # Channel 1 holds a different signal (a sign-flipped, halved copy delayed by 10
            # samples), so reading the wrong channel fails the check.
            other = np.concatenate([np.zeros(10), -0.5 * x[:-10]])
            wavfile.write(path, fs, np.stack([other, x], axis=1).astype(np.float32))
        else:
            wavfile.write(path, fs, x.astype(np.float64))
        # Read back with scipy to prove the file is what it claims.
        rate, back = wavfile.read(path)
        assert rate == fs
        back = back if back.ndim == 1 else back[:, -1]
        full = {'int16': 32768, 'int24': 2147483648, 'int32': 2147483648}.get(kind, 1)
        err = np.max(np.abs(back / full - x))
        assert err < 1e-4, (name, err)
        _, h = sig.sosfreqz(sos, worN=np.array(freqs), fs=fs)
        h = h * scale
        cases.append({
            'file': 'wav/' + name, 'format': kind, 'sampleRate': fs, 'channels': channels, 'channel': channels - 1,
            'preDelaySamples': pre, 'peakSample': int(pre + np.argmax(np.abs(ir))),
            'gate': {'startMs': 1.0, 'lengthMs': 1000.0 * (IR_SECONDS - 0.01), 'fadeOutMs': 5.0},
            'frequencyHz': freqs,
            'magnitudeDb': [float(v) for v in 20 * np.log10(np.abs(h))],
            'phaseDeg': [float(v) for v in np.degrees(np.angle(h))],
            'sos': [[float(v) for v in row] for row in sos],
        })
    return cases


# ---- minimum phase ----------------------------------------------------------------------------

def analog_cookbook(kind, f0, gain_db=0.0, q=0.7071067811865476):
    """Audio EQ Cookbook analog prototypes H(s) (s normalized to w0), as (b, a) in s."""
    a = 10 ** (gain_db / 40)
    if kind == 'peaking':
        return [1, a / q, 1], [1, 1 / (a * q), 1]
    if kind == 'lowShelf':
        return [a, math.sqrt(a) / q * a, a * a], [a, math.sqrt(a) / q, 1]
    if kind == 'highShelf':
        return [a * a, math.sqrt(a) / q * a, a], [1, math.sqrt(a) / q, a]
    if kind == 'highPass':
        return [1, 0, 0], [1, 1 / q, 1]
    if kind == 'lowPass':
        return [0, 0, 1], [1, 1 / q, 1]
    raise ValueError(kind)


def scaled(ba, f0):
    """H(s / w0): the prototype moved to f0."""
    b, a = ba
    w0 = 2 * math.pi * f0
    n = max(len(b), len(a)) - 1
    b = np.concatenate([np.zeros(n + 1 - len(b)), b])
    a = np.concatenate([np.zeros(n + 1 - len(a)), a])
    pw = np.array([w0 ** -(n - k) for k in range(n + 1)])
    return b * pw, a * pw


def linkwitz_riley(order, kind, f0):
    b, a = sig.butter(order // 2, 2 * math.pi * f0, 'low' if kind == 'lowPass' else 'high', analog=True)
    return np.polymul(b, b), np.polymul(a, a)


def cascade(*parts):
    b, a = np.array([1.0]), np.array([1.0])
    for pb, pa in parts:
        b, a = np.polymul(b, pb), np.polymul(a, pa)
    return b, a


def minphase_cases():
    freqs = log_grid(20, 20000, 48)
    w = 2 * np.pi * np.array(freqs)
    systems = [
        ('cookbook peaking 1 kHz +9 dB Q 4', scaled(analog_cookbook('peaking', 1000, 9, 4), 1000)),
        ('cookbook peaking 120 Hz -12 dB Q 1.5', scaled(analog_cookbook('peaking', 120, -12, 1.5), 120)),
        ('cookbook low shelf 200 Hz +6 dB', scaled(analog_cookbook('lowShelf', 200, 6), 200)),
        ('cookbook high shelf 8 kHz -8 dB', scaled(analog_cookbook('highShelf', 8000, -8), 8000)),
        ('cookbook high-pass 60 Hz Q 0.7071', scaled(analog_cookbook('highPass', 60), 60)),
        ('Linkwitz-Riley 4 low-pass 2 kHz', linkwitz_riley(4, 'lowPass', 2000)),
        ('Linkwitz-Riley 4 high-pass 2 kHz', linkwitz_riley(4, 'highPass', 2000)),
        ('Butterworth 4 high-pass 30 Hz, peaking 3 kHz +4 dB Q 2, Linkwitz-Riley 8 low-pass 12 kHz',
         cascade(sig.butter(4, 2 * math.pi * 30, 'high', analog=True), scaled(analog_cookbook('peaking', 3000, 4, 2), 3000),
                 linkwitz_riley(8, 'lowPass', 12000))),
    ]
    cases = []
    for name, (b, a) in systems:
        _, h = sig.freqs(b, a, worN=w)
        # Magnitude at every grid point (the input), to 12 significant digits (1e-10 dB or
        # better); the exact phase at every 4th point (the check), to keep the file small.
        ph = np.degrees(np.unwrap(np.angle(h)))
        cases.append({'system': name,
                      'magnitudeDb': [float('%.12g' % v) for v in 20 * np.log10(np.abs(h))],
                      'checkEvery': 4, 'phaseDeg': [float('%.12g' % v) for v in ph[::4]]})
    return cases


def main():
    warnings.simplefilter('ignore', integ.IntegrationWarning)
    os.makedirs(WAV_OUT, exist_ok=True)
    write('measure-wav.json', dict(VERSIONS, note='impulse responses of the cascade by scipy.signal.sosfilt, written as WAV; reference = scipy.signal.sosfreqz(sos, worN=freqs, fs=fs) times the scale written, phase relative to the first sample of the impulse response (the pre-delay removed)'), wav_cases())
    write('measure-minphase.json', dict(VERSIONS, note='analog minimum-phase systems, exact response by scipy.signal.freqs, unwrapped phase',
                                        frequencyHz=log_grid(20, 20000, 48)), minphase_cases())
    write('measure-smoothing.json', dict(VERSIONS, note='smoothing by its definition, integrated with scipy.integrate.quad (epsrel 1e-11)'), smoothing_cases())


if __name__ == '__main__':
    main()
