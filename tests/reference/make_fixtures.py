#!/usr/bin/env python3
"""Reference fixtures for the core's tests, from scipy.signal and 50-digit mpmath.

Run from the repository root:   python3 tests/reference/make_fixtures.py
Writes tests/reference/fixtures/*.json. The output is deterministic (sorted keys, floats written
with Python's repr, one case per line) so CI can re-run this script and `git diff --exit-code`
the fixtures.

Sources (see docs/references.md):
- scipy.signal.butter / scipy.signal.bessel with fs= (bilinear transform pre-warped at the edge),
  scipy.signal.sosfreqz for the complex response.
- Linkwitz-Riley of order 2n = Butterworth of order n, squared (Lipshitz and Vanderkooy, JAES
  34(11), 1986).
- Group delay: the exact formula tau = Re(sum k b_k z^-k / N(z) - sum k a_k z^-k / D(z)) per
  section (J. O. Smith, "Numerical Computation of Group Delay") evaluated with mpmath at 50
  digits on scipy's float64 sections (scipy.signal.group_delay loses ~1e-3 relative near DC for
  high-order low-frequency sections, so it is recorded only as a secondary, loose reference).
- "design": an independent exact response of the ideal design, with no coefficient rounding at
  all: the bilinear transform pre-warped at fc maps the digital frequency f to the prototype
  frequency Omega = tan(pi f / fs) / tan(pi fc / fs), so H(e^jw) = P(j Omega) (low-pass) or
  P(1 / (j Omega)) (high-pass), with the prototype poles computed at 50 digits (Butterworth in
  closed form, Bessel as the roots of the reverse Bessel polynomial, scipy.signal.besselap's
  normalizations). Its group delay is -d(arg H)/dw by mpmath.diff at 50 digits.
- Audio EQ Cookbook coefficients (R. Bristow-Johnson), written here in Python from the cookbook's
  formulas, independently of the TypeScript core.
"""
import json
import math
import os
import sys

import numpy as np
import scipy
import scipy.signal as sig

try:
    import mpmath
except ImportError:  # pragma: no cover
    sys.stderr.write('make_fixtures.py needs mpmath (python3-mpmath) for the 50-digit references\n')
    sys.exit(3)

mpmath.mp.dps = 50
HERE = os.path.dirname(os.path.abspath(__file__))
OUT = os.path.join(HERE, 'fixtures')
VERSIONS = {'scipy': scipy.__version__, 'numpy': np.__version__, 'mpmath': mpmath.__version__, 'mpmathDigits': 50}

# Frequencies of each edge case, as multiples of fc (kept below 0.49 fs).
RATIOS = [0.1, 0.3, 0.5, 0.8, 1.0, 1.25, 2.0, 3.0, 10.0]


def freqs_for(fc, fs):
    return [fc * r for r in RATIOS if fc * r < 0.49 * fs]


# ---- exact evaluation of float64 sections -------------------------------------------------

def sos_exact(sos, f, fs):
    """(H, tau_samples) of float64 sections [b0 b1 b2 1 a1 a2], evaluated at 50 digits."""
    w = 2 * mpmath.pi * mpmath.mpf(f) / mpmath.mpf(fs)
    z1 = mpmath.expj(-w)
    z2 = z1 * z1
    h = mpmath.mpc(1)
    tau = mpmath.mpf(0)
    for row in sos:
        b0, b1, b2, a0, a1, a2 = [mpmath.mpf(float(x)) for x in row]
        n = b0 + b1 * z1 + b2 * z2
        d = a0 + a1 * z1 + a2 * z2
        h *= n / d
        tau += mpmath.re((b1 * z1 + 2 * b2 * z2) / n - (a1 * z1 + 2 * a2 * z2) / d)
    return h, tau


def db(h):
    return float(20 * mpmath.log10(abs(h)))


def deg(h):
    return float(mpmath.degrees(mpmath.arg(h)))


# ---- exact prototypes ---------------------------------------------------------------------

def butter_poles(n):
    return [mpmath.expj(mpmath.pi * (2 * k + n - 1) / (2 * n)) for k in range(1, n + 1)]


def reverse_bessel(n):
    return [mpmath.factorial(2 * n - k) / (2 ** (n - k) * mpmath.factorial(k) * mpmath.factorial(n - k)) for k in range(n + 1)]


def proto_lp(poles):
    g = mpmath.mpc(1)
    for p in poles:
        g *= -p

    def P(s):
        v = g
        for p in poles:
            v /= (s - p)
        return v
    return P


def bessel_poles(n, norm):
    a = reverse_bessel(n)
    roots = mpmath.polyroots(list(reversed(a)), maxsteps=500, extraprec=300)
    if norm == 'delay':
        return roots
    if norm == 'phase':
        k = a[0] ** (mpmath.mpf(1) / n)
        return [r / k for r in roots]
    # 'mag': -3.01 dB (half power) at 1 rad/s.
    P = proto_lp(roots)
    w3 = mpmath.findroot(lambda w: abs(P(mpmath.mpc(0, w))) ** 2 - mpmath.mpf(1) / 2, (mpmath.mpf('0.5'), mpmath.mpf(3)), solver='anderson')
    return [r / w3 for r in roots]


def design_exact(poles, btype, fc, fs, f, square=False):
    """Exact digital response (H, tau samples) of the pre-warped bilinear design at f."""
    P = proto_lp(poles)
    t = mpmath.tan(mpmath.pi * mpmath.mpf(fc) / mpmath.mpf(fs))

    def H(w):
        omega = mpmath.tan(w / 2) / t
        s = mpmath.mpc(0, omega)
        v = P(s) if btype == 'low' else P(1 / s)
        return v * v if square else v

    w0 = 2 * mpmath.pi * mpmath.mpf(f) / mpmath.mpf(fs)
    h0 = H(w0)
    tau = -mpmath.diff(lambda w: mpmath.arg(H(w) / h0), w0)
    return h0, tau


# ---- writing ------------------------------------------------------------------------------

def write(name, meta, cases):
    os.makedirs(OUT, exist_ok=True)
    head = json.dumps(meta, sort_keys=True, separators=(',', ':'), allow_nan=False)
    lines = [json.dumps(c, sort_keys=True, separators=(',', ':'), allow_nan=False) for c in cases]
    text = '{"meta":' + head + ',\n"cases":[\n' + ',\n'.join(lines) + '\n]}\n'
    with open(os.path.join(OUT, name), 'w', encoding='utf-8') as fh:
        fh.write(text)


def fl(x):
    return float(x)


def edge_case(family, order, btype, fc, fs, sos, call, poles, square=False, norm=None):
    freqs = freqs_for(fc, fs)
    _, h = sig.sosfreqz(sos, worN=np.array(freqs), fs=fs)
    case = {
        'family': family, 'order': order, 'kind': 'lowPass' if btype == 'low' else 'highPass',
        'frequency': fc, 'sampleRate': fs, 'call': call,
        'sos': [[fl(x) for x in row] for row in sos],
        'freqs': freqs,
        'sosfreqz': {'magnitudeDb': [fl(20 * np.log10(abs(x))) for x in h], 'phaseDeg': [fl(np.degrees(np.angle(x))) for x in h]},
    }
    if norm is not None:
        case['normalization'] = norm
    em, ep, gd = [], [], []
    for f in freqs:
        h0, tau = sos_exact(sos, f, fs)
        em.append(db(h0))
        ep.append(deg(h0))
        gd.append(fl(tau))
    case['sosExact'] = {'magnitudeDb': em, 'phaseDeg': ep, 'groupDelaySamples': gd}
    dm, dp, dg = [], [], []
    for f in freqs:
        h0, tau = design_exact(poles, btype, fc, fs, f, square)
        dm.append(db(h0))
        dp.append(deg(h0))
        dg.append(fl(tau))
    case['design'] = {'magnitudeDb': dm, 'phaseDeg': dp, 'groupDelaySamples': dg}
    return case


def butter_cases():
    cases = []
    for fc, fs in [(1000.0, 44100.0), (2200.0, 48000.0), (80.0, 96000.0), (20.0, 192000.0)]:
        for order in range(1, 9):
            for btype in ('low', 'high'):
                sos = sig.butter(order, fc, btype=btype, output='sos', fs=fs)
                call = f"scipy.signal.butter({order}, {fc!r}, btype='{btype}', output='sos', fs={fs!r})"
                cases.append(edge_case('butterworth', order, btype, fc, fs, sos, call, butter_poles(order)))
    # scipy.signal.group_delay (per section, summed) where it is accurate: mid-band designs only.
    for c in cases:
        if c['frequency'] / c['sampleRate'] >= 0.01:
            total = np.zeros(len(c['freqs']))
            for row in c['sos']:
                _, g = sig.group_delay((row[:3], row[3:]), w=np.array(c['freqs']), fs=c['sampleRate'])
                total += g
            c['scipyGroupDelay'] = {'call': 'sum over sections of scipy.signal.group_delay((b, a), w=freqs, fs=fs)', 'groupDelaySamples': [fl(x) for x in total]}
    return cases


def bessel_cases():
    cases = []
    poles = {}
    for fc, fs in [(2200.0, 48000.0), (40.0, 192000.0)]:
        for order in range(1, 9):
            for norm, name in (('phase', 'phase'), ('delay', 'delay'), ('mag', 'magnitude')):
                key = (order, norm)
                if key not in poles:
                    poles[key] = bessel_poles(order, norm)
                for btype in ('low', 'high'):
                    sos = sig.bessel(order, fc, btype=btype, norm=norm, output='sos', fs=fs)
                    call = f"scipy.signal.bessel({order}, {fc!r}, btype='{btype}', norm='{norm}', output='sos', fs={fs!r})"
                    cases.append(edge_case('bessel', order, btype, fc, fs, sos, call, poles[key], norm=name))
    return cases


def lr_cases():
    cases = []
    for fc, fs in [(2200.0, 48000.0), (90.0, 96000.0)]:
        for order in (2, 4, 6, 8):
            for btype in ('low', 'high'):
                half = sig.butter(order // 2, fc, btype=btype, output='sos', fs=fs)
                sos = np.vstack([half, half])
                call = f"numpy.vstack([s, s]) with s = scipy.signal.butter({order // 2}, {fc!r}, btype='{btype}', output='sos', fs={fs!r})"
                cases.append(edge_case('linkwitz-riley', order, btype, fc, fs, sos, call, butter_poles(order // 2), square=True))
    return cases


# ---- Audio EQ Cookbook, written from the cookbook text --------------------------------------

def cookbook(kind, f0, fs, gain_db=0.0, q=None, bw=None, slope=None):
    """Returns [b0, b1, b2, a1, a2] normalized by a0 (R. Bristow-Johnson, Audio EQ Cookbook)."""
    A = 10 ** (gain_db / 40)
    w0 = 2 * math.pi * f0 / fs
    cw, sw = math.cos(w0), math.sin(w0)
    if q is not None:
        alpha = sw / (2 * q)
    elif bw is not None:
        alpha = sw * math.sinh(math.log(2) / 2 * bw * w0 / sw)
    else:
        alpha = sw / 2 * math.sqrt((A + 1 / A) * (1 / slope - 1) + 2)
    sa = 2 * math.sqrt(A) * alpha
    if kind == 'lowPass':
        b = [(1 - cw) / 2, 1 - cw, (1 - cw) / 2]; a = [1 + alpha, -2 * cw, 1 - alpha]
    elif kind == 'highPass':
        b = [(1 + cw) / 2, -(1 + cw), (1 + cw) / 2]; a = [1 + alpha, -2 * cw, 1 - alpha]
    elif kind == 'bandPass':  # constant 0 dB peak gain
        b = [alpha, 0.0, -alpha]; a = [1 + alpha, -2 * cw, 1 - alpha]
    elif kind == 'notch':
        b = [1.0, -2 * cw, 1.0]; a = [1 + alpha, -2 * cw, 1 - alpha]
    elif kind == 'allPass':
        b = [1 - alpha, -2 * cw, 1 + alpha]; a = [1 + alpha, -2 * cw, 1 - alpha]
    elif kind == 'peaking':
        b = [1 + alpha * A, -2 * cw, 1 - alpha * A]; a = [1 + alpha / A, -2 * cw, 1 - alpha / A]
    elif kind == 'lowShelf':
        b = [A * ((A + 1) - (A - 1) * cw + sa), 2 * A * ((A - 1) - (A + 1) * cw), A * ((A + 1) - (A - 1) * cw - sa)]
        a = [(A + 1) + (A - 1) * cw + sa, -2 * ((A - 1) + (A + 1) * cw), (A + 1) + (A - 1) * cw - sa]
    elif kind == 'highShelf':
        b = [A * ((A + 1) + (A - 1) * cw + sa), -2 * A * ((A - 1) + (A + 1) * cw), A * ((A + 1) + (A - 1) * cw - sa)]
        a = [(A + 1) - (A - 1) * cw + sa, 2 * ((A - 1) - (A + 1) * cw), (A + 1) - (A - 1) * cw - sa]
    else:
        raise ValueError(kind)
    return [b[0] / a[0], b[1] / a[0], b[2] / a[0], a[1] / a[0], a[2] / a[0]]


def band_response(section, fs, freqs):
    sos = [[section[0], section[1], section[2], 1.0, section[3], section[4]]]
    m, p, g = [], [], []
    for f in freqs:
        h, tau = sos_exact(sos, f, fs)
        m.append(db(h)); p.append(deg(h)); g.append(fl(tau))
    return {'magnitudeDb': m, 'phaseDeg': p, 'groupDelaySamples': g}


def cookbook_cases():
    cases = []
    specs = []
    for f0, fs in ((31.5, 192000.0), (100.0, 96000.0), (1000.0, 44100.0), (12000.0, 48000.0)):
        for kind in ('lowPass', 'highPass', 'bandPass', 'notch', 'allPass'):
            for q in (0.7071067811865476, 4.0):
                specs.append({'type': kind, 'frequency': f0, 'sampleRate': fs, 'q': q})
        for g in (-12.0, 6.0):
            specs.append({'type': 'peaking', 'frequency': f0, 'sampleRate': fs, 'gainDb': g, 'q': 1.41})
            specs.append({'type': 'peaking', 'frequency': f0, 'sampleRate': fs, 'gainDb': g, 'bandwidthOct': 1.0 / 3.0})
            for kind in ('lowShelf', 'highShelf'):
                specs.append({'type': kind, 'frequency': f0, 'sampleRate': fs, 'gainDb': g, 'q': 0.9})
                specs.append({'type': kind, 'frequency': f0, 'sampleRate': fs, 'gainDb': g, 'slope': 1.0})
                specs.append({'type': kind, 'frequency': f0, 'sampleRate': fs, 'gainDb': g, 'slope': 0.5})
    for s in specs:
        sec = cookbook(s['type'], s['frequency'], s['sampleRate'], s.get('gainDb', 0.0), s.get('q'), s.get('bandwidthOct'), s.get('slope'))
        f0, fs = s['frequency'], s['sampleRate']
        freqs = [f for f in (f0 / 4, f0 / 1.5, f0, f0 * 1.5, f0 * 4) if f < 0.49 * fs]
        c = dict(s)
        c['section'] = sec
        c['freqs'] = freqs
        c['exact'] = band_response(sec, fs, freqs)
        cases.append(c)
    return cases


# ---- first-order sections ----------------------------------------------------------------

def first_order_cases():
    """Bilinear transform pre-warped at f: scipy.signal.bilinear of the analog section with
    wc = 2 fs tan(pi f / fs): low-pass wc / (s + wc), high-pass s / (s + wc),
    all-pass (wc - s) / (s + wc) (= low-pass minus high-pass: 0 degrees at DC, -90 at f, -180 at
    Nyquist, the phase convention of the cookbook's second-order all-pass)."""
    cases = []
    for fs in (44100.0, 48000.0, 96000.0, 192000.0):
        for f in (20.0, 1000.0, 15000.0):
            wc = 2 * fs * math.tan(math.pi * f / fs)
            for kind, b, a in (('lowPass1', [wc], [1.0, wc]), ('highPass1', [1.0, 0.0], [1.0, wc]), ('allPass1', [-1.0, wc], [1.0, wc])):
                bz, az = sig.bilinear(b, a, fs=fs)
                bz = list(bz) + [0.0] * (2 - len(bz) + 1)
                az = list(az) + [0.0] * (2 - len(az) + 1)
                sec = [fl(bz[0] / az[0]), fl(bz[1] / az[0]), 0.0, fl(az[1] / az[0]), 0.0]
                freqs = [x for x in (f / 4, f, f * 4) if x < 0.49 * fs]
                cases.append({
                    'type': kind, 'frequency': f, 'sampleRate': fs,
                    'call': f'scipy.signal.bilinear({[fl(x) for x in b]!r}, {[fl(x) for x in a]!r}, fs={fs!r}) with wc = 2 fs tan(pi f / fs)',
                    'section': sec, 'freqs': freqs, 'exact': band_response(sec, fs, freqs),
                })
    return cases


# ---- whole plans: outputs with gain, polarity, delay and their complex sum ------------------

def edge_sos(edge, kind, fs):
    btype = 'low' if kind == 'lowPass' else 'high'
    if edge['family'] == 'butterworth':
        return sig.butter(edge['order'], edge['frequency'], btype=btype, output='sos', fs=fs)
    if edge['family'] == 'linkwitz-riley':
        h = sig.butter(edge['order'] // 2, edge['frequency'], btype=btype, output='sos', fs=fs)
        return np.vstack([h, h])
    norm = {'phase': 'phase', 'delay': 'delay', 'magnitude': 'mag'}[edge.get('normalization', 'phase')]
    return sig.bessel(edge['order'], edge['frequency'], btype=btype, norm=norm, output='sos', fs=fs)


def band_sos(band, fs):
    sec = cookbook(band['type'], band['frequency'], fs, band.get('gainDb', 0.0), band.get('q'), None, band.get('slope'))
    return np.array([[sec[0], sec[1], sec[2], 1.0, sec[3], sec[4]]])


def plan_cases():
    def out(id_, hp=None, lp=None, bands=(), gain=0.0, delay=0.0, invert=False, mute=False):
        return {'id': id_, 'name': id_, 'gainDb': gain, 'delayMs': delay, 'invert': invert, 'mute': mute,
                'highPass': hp, 'lowPass': lp, 'bands': list(bands)}

    def plan(name, fs, outputs, input_bands=()):
        return {'format': 'biquadrant.plan', 'version': 1, 'name': name, 'sampleRate': fs,
                'input': {'bands': list(input_bands)}, 'outputs': outputs}

    lr4 = {'family': 'linkwitz-riley', 'order': 4, 'frequency': 2000.0}
    plans = [
        plan('LR4 pair, tweeter delayed and padded', 48000.0, [
            out('woofer', lp=lr4),
            out('tweeter', hp=lr4, gain=-2.5, delay=0.137),
        ], [{'id': 'b1', 'type': 'peaking', 'frequency': 120.0, 'gainDb': -3.0, 'q': 2.0, 'enabled': True}]),
        plan('BW3 pair, one inverted, shelf on the woofer', 96000.0, [
            out('low', lp={'family': 'butterworth', 'order': 3, 'frequency': 500.0},
                bands=[{'id': 'b1', 'type': 'lowShelf', 'frequency': 80.0, 'gainDb': 4.0, 'slope': 1.0, 'enabled': True}]),
            out('high', hp={'family': 'butterworth', 'order': 3, 'frequency': 500.0}, invert=True, delay=1.5),
        ]),
        plan('Bessel 4 delay-normalized, three ways, one muted', 44100.0, [
            out('a', lp={'family': 'bessel', 'order': 4, 'frequency': 300.0, 'normalization': 'delay'}),
            out('b', hp={'family': 'bessel', 'order': 4, 'frequency': 300.0, 'normalization': 'delay'},
                lp={'family': 'bessel', 'order': 4, 'frequency': 3000.0, 'normalization': 'magnitude'}, gain=1.5),
            out('c', hp={'family': 'bessel', 'order': 4, 'frequency': 3000.0, 'normalization': 'magnitude'}, invert=True, delay=0.25),
            out('d', bands=[{'id': 'n', 'type': 'notch', 'frequency': 50.0, 'q': 10.0, 'enabled': True}], mute=True),
        ]),
        plan('LR2 with inverted high, LR8 sub at 192 kHz', 192000.0, [
            out('sub', lp={'family': 'linkwitz-riley', 'order': 8, 'frequency': 60.0},
                hp={'family': 'butterworth', 'order': 2, 'frequency': 18.0}, delay=3.0),
            out('main', hp={'family': 'linkwitz-riley', 'order': 8, 'frequency': 60.0},
                lp={'family': 'linkwitz-riley', 'order': 2, 'frequency': 3000.0}),
            out('top', hp={'family': 'linkwitz-riley', 'order': 2, 'frequency': 3000.0}, invert=True, gain=-1.0),
        ]),
    ]
    cases = []
    for p in plans:
        fs = p['sampleRate']
        freqs = [20.0, 63.0, 100.0, 300.0, 500.0, 1000.0, 2000.0, 3000.0, 6300.0, 15000.0, 19999.0]
        in_sos = [band_sos(b, fs) for b in p['input']['bands']]
        parts = []
        for o in p['outputs']:
            sos = list(in_sos)
            if o['highPass']:
                sos.append(edge_sos(o['highPass'], 'highPass', fs))
            if o['lowPass']:
                sos.append(edge_sos(o['lowPass'], 'lowPass', fs))
            sos += [band_sos(b, fs) for b in o['bands']]
            sos = np.vstack(sos) if sos else np.zeros((0, 6))
            c = mpmath.mpf(10) ** (mpmath.mpf(o['gainDb']) / 20) * (-1 if o['invert'] else 1)
            parts.append((o, sos, c))

        def H_of(sos, c, delay_ms):
            def H(w):
                z1 = mpmath.expj(-w)
                z2 = z1 * z1
                h = mpmath.mpc(c)
                for row in sos:
                    b0, b1, b2, a0, a1, a2 = [mpmath.mpf(float(x)) for x in row]
                    h *= (b0 + b1 * z1 + b2 * z2) / (a0 + a1 * z1 + a2 * z2)
                d = mpmath.mpf(delay_ms) * mpmath.mpf(fs) / 1000
                return h * mpmath.expj(-w * d)
            return H

        funcs = [(o, H_of(sos, c, o['delayMs'])) for (o, sos, c) in parts]
        res = {'outputs': [], 'sum': None}

        def columns(H):
            m, ph, g = [], [], []
            for f in freqs:
                w0 = 2 * mpmath.pi * mpmath.mpf(f) / mpmath.mpf(fs)
                h0 = H(w0)
                m.append(db(h0)); ph.append(deg(h0))
                tau = -mpmath.diff(lambda w: mpmath.arg(H(w) / h0), w0)
                g.append(fl(tau * 1000 / mpmath.mpf(fs)))
            return {'magnitudeDb': m, 'phaseDeg': ph, 'groupDelayMs': g}

        for o, H in funcs:
            col = columns(H)
            col['id'] = o['id']
            col['mute'] = o['mute']
            res['outputs'].append(col)
        live = [H for (o, H) in funcs if not o['mute']]
        res['sum'] = columns(lambda w: sum((H(w) for H in live), mpmath.mpc(0)))
        cases.append({'plan': p, 'freqs': freqs, 'exact': res,
                      'method': 'edges from scipy.signal butter/bessel sos (Linkwitz-Riley = butter squared), bands from the Python cookbook; '
                                'response, complex sum and group delay (-d arg/dw by mpmath.diff) at 50 digits'})
    return cases


# ---- analog prototypes ------------------------------------------------------------------

def upper_sorted(poles):
    ups = [p for p in poles if mpmath.im(p) > mpmath.mpf(10) ** -40 or abs(mpmath.im(p)) <= mpmath.mpf(10) ** -40]
    q = lambda p: abs(p) / (-2 * mpmath.re(p))
    return sorted(ups, key=q)


def prototype_cases():
    """Upper-half-plane poles, sorted by Q, at 50 digits; and scipy.signal.besselap's for comparison."""
    cases = []
    for n in range(1, 9):
        ps = upper_sorted(butter_poles(n))
        cases.append({'family': 'butterworth', 'order': n, 'poles': [[fl(mpmath.re(p)), fl(mpmath.chop(mpmath.im(p), tol=mpmath.mpf(10) ** -40))] for p in ps],
                      'q': [fl(abs(p) / (-2 * mpmath.re(p))) for p in ps]})
        for norm, name in (('phase', 'phase'), ('delay', 'delay'), ('mag', 'magnitude')):
            ps = upper_sorted(bessel_poles(n, norm))
            _, p_sc, _ = sig.besselap(n, norm=norm)
            sc = sorted([complex(x) for x in p_sc if x.imag >= 0], key=lambda p: abs(p) / (-2 * p.real))
            cases.append({'family': 'bessel', 'order': n, 'normalization': name,
                          'poles': [[fl(mpmath.re(p)), fl(mpmath.chop(mpmath.im(p), tol=mpmath.mpf(10) ** -40))] for p in ps],
                          'q': [fl(abs(p) / (-2 * mpmath.re(p))) for p in ps],
                          'scipyCall': f"scipy.signal.besselap({n}, norm='{norm}')",
                          'scipyPoles': [[fl(p.real), fl(p.imag)] for p in sc]})
    return cases


def extreme_probe_cases():
    """Sections probed a hair above 0 Hz and a hair below Nyquist, where a response written as
    powers of cos w and sin w cancels: references for the kernel's evaluation (not for a design),
    so the sections are scipy's or the cookbook's, and the reference is sos_exact at 50 digits."""
    cases = []

    def probes(fs):
        ny = fs / 2
        return [0.01, 0.05, 0.5, 2.0, ny - 2.0, ny - 0.5, ny - 0.05]

    def add(name, sos, fs, call):
        freqs = probes(fs)
        em, ep, gd = [], [], []
        for f in freqs:
            h0, tau = sos_exact(sos, f, fs)
            em.append(db(h0))
            ep.append(deg(h0))
            gd.append(fl(tau))
        cases.append({'name': name, 'sampleRate': fs, 'call': call, 'sos': [[fl(x) for x in row] for row in sos],
                      'freqs': freqs, 'sosExact': {'magnitudeDb': em, 'phaseDeg': ep, 'groupDelaySamples': gd}})

    for (order, fc, btype, fs) in [(4, 20.0, 'high', 192000.0), (2, 10.0, 'high', 48000.0), (4, 20000.0, 'low', 44100.0), (3, 23000.0, 'low', 48000.0)]:
        call = "scipy.signal.butter(%d, %r, btype='%s', output='sos', fs=%r)" % (order, fc, btype, fs)
        add('butter', sig.butter(order, fc, btype=btype, output='sos', fs=fs), fs, call)
    for (order, fc, btype, fs, norm) in [(8, 15.0, 'high', 96000.0, 'mag'), (6, 21000.0, 'low', 48000.0, 'phase')]:
        call = "scipy.signal.bessel(%d, %r, btype='%s', output='sos', fs=%r, norm='%s')" % (order, fc, btype, fs, norm)
        add('bessel', sig.bessel(order, fc, btype=btype, output='sos', fs=fs, norm=norm), fs, call)
    for (kind, f0, fs, g, q) in [('peaking', 5.0, 48000.0, -12.0, 2.0), ('lowPass', 23500.0, 48000.0, 0.0, 0.7071067811865476), ('notch', 3.0, 96000.0, 0.0, 4.0)]:
        b0, b1, b2, a1, a2 = cookbook(kind, f0, fs, gain_db=g, q=q)
        sos = [[b0, b1, b2, 1.0, a1, a2]]
        add('cookbook ' + kind, sos, fs, 'cookbook(%r, %r, %r, gain_db=%r, q=%r) in this script' % (kind, f0, fs, g, q))
    return cases


def main():
    meta = dict(VERSIONS)
    meta['generator'] = 'tests/reference/make_fixtures.py'
    meta['ratiosOfFc'] = RATIOS
    meta['sosfreqzCall'] = 'scipy.signal.sosfreqz(sos, worN=numpy.array(freqs), fs=sampleRate); magnitudeDb = 20 log10|h|, phaseDeg = numpy.degrees(numpy.angle(h))'
    write('butterworth.json', dict(meta, note='scipy.signal.butter + sosfreqz; sosExact = 50-digit group delay of the same sos; design = exact analog-prototype evaluation'), butter_cases())
    write('bessel.json', dict(meta, note='scipy.signal.bessel (norm phase/delay/mag) + sosfreqz; sosExact and design as in butterworth.json'), bessel_cases())
    write('linkwitz-riley.json', dict(meta, note='butter(order/2) squared'), lr_cases())
    write('cookbook.json', dict(meta, note='Audio EQ Cookbook formulas written in Python (this script); exact = 50-digit evaluation of the section'), cookbook_cases())
    write('first-order.json', dict(meta, note='scipy.signal.bilinear of the pre-warped analog first-order sections'), first_order_cases())
    write('prototypes.json', dict(meta, note='analog prototype poles (upper half plane, by increasing Q) at 50 digits; Bessel roots of the reverse Bessel polynomial'), prototype_cases())
    write('extreme-probes.json', dict(meta, note='sections probed within a few Hz of 0 Hz and of Nyquist; sosExact = 50-digit evaluation of the same float64 sections'), extreme_probe_cases())
    write('plans.json', dict(meta, note='whole plans: outputs with gain, polarity, delay, and the complex sum with its group delay'), plan_cases())


if __name__ == '__main__':
    main()
