/**
 * Generates assets/two-way-measured.bqplan: the two-way monitor demo with INVENTED "measured"
 * drivers and an invented listening-room measurement, computed from published models. No real
 * driver, product or room was measured. Deterministic: no randomness; numbers rounded to fixed
 * decimals. Run from the repository root:
 *
 *   npx tsx assets/make-two-way-measured.ts
 *
 * tests/assets/make-two-way-measured.test.ts re-runs buildMeasuredDemo() and checks the file is its output.
 *
 * Models (docs/references.md, "Measured responses"), evaluated at s = j 2 pi f:
 * - Woofer, closed box: a second-order high-pass s^2 / (s^2 + s wc/Qtc + wc^2) (R. H. Small,
 *   "Closed-Box Loudspeaker Systems", JAES 20, 1972), times a second-order low-pass for the cone's
 *   upper roll-off.
 * - Tweeter, dome: its resonance as a second-order high-pass at fs with quality Qts, times a
 *   first-order low-pass for the top octave.
 * - Baffle step on both (same baffle): the first-order shelf (s/wb + 1/2) / (s/wb + 1), -6 dB
 *   below and 0 dB above fb = 115 / baffle width (m) Hz (rule of thumb, common practice, no source).
 * - Time of flight: distance / c to a microphone 1 m in front of the tweeter, on its axis, with
 *   c = 331.3 sqrt(1 + T/273.15) m/s; kept as each measurement's delayMs (one microphone position,
 *   so the offset between the drivers is in the data and the plan needs no acoustic offset).
 * - Room: a listening-position response as the closed-box low end times 1 plus a modal sum of the
 *   first axial modes of a rectangular room, f = (c/2) n / L, each a second-order resonance
 *   weighted by the mode shape cos(n pi x / L) at the source and at the listener (H. Kuttruff,
 *   "Room Acoustics", chapter on normal modes). A system measurement, not used in the sum.
 */
import { writeFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { speedOfSoundMps } from '../src/measure/acoustic';
import type { Measurement, Plan } from '../src/plan/types';
import { writePlanText } from '../src/plan/write';

/** Every parameter of the invented scenario. */
export const DEMO = {
  airTemperatureC: 20,
  baffleWidthM: 0.2,
  woofer: { fcHz: 55, qtc: 0.707, rollOffHz: 3200, rollOffQ: 0.6, levelDb: 0, distanceM: Math.hypot(1.0 + 0.018, 0.15) }, // 18 mm behind, 150 mm below the tweeter
  tweeter: { resonanceHz: 850, qts: 0.9, rollOffHz: 35000, levelDb: 3.5, distanceM: 1.0 },
  room: { dimensionsM: [5.3, 4.1, 2.6], sourceM: [0.6, 1.2, 1.1], listenerM: [3.4, 2.05, 1.2], modesPerAxis: 3, q: 8, weight: 0.8 },
  grid: { fromHz: 20, toHz: 20000, perOctave: 48 },
};

type C = [number, number];
const mul = (a: C, b: C): C => [a[0] * b[0] - a[1] * b[1], a[0] * b[1] + a[1] * b[0]];
const div = (a: C, b: C): C => {
  const d = b[0] * b[0] + b[1] * b[1];
  return [(a[0] * b[0] + a[1] * b[1]) / d, (a[1] * b[0] - a[0] * b[1]) / d];
};
/** s = j w */
const jw = (f: number): C => [0, 2 * Math.PI * f];
const scale = (a: C, k: number): C => [a[0] * k, a[1] * k];
const add = (a: C, b: C): C => [a[0] + b[0], a[1] + b[1]];

/** Second-order high-pass s^2 / (s^2 + s w0/Q + w0^2). */
function highPass2(f: number, f0: number, q: number): C {
  const s = jw(f);
  const w0 = 2 * Math.PI * f0;
  const s2 = mul(s, s);
  return div(s2, add(add(s2, scale(s, w0 / q)), [w0 * w0, 0]));
}
/** Second-order low-pass w0^2 / (s^2 + s w0/Q + w0^2). */
function lowPass2(f: number, f0: number, q: number): C {
  const s = jw(f);
  const w0 = 2 * Math.PI * f0;
  return div([w0 * w0, 0], add(add(mul(s, s), scale(s, w0 / q)), [w0 * w0, 0]));
}
/** First-order low-pass w0 / (s + w0). */
function lowPass1(f: number, f0: number): C {
  const w0 = 2 * Math.PI * f0;
  return div([w0, 0], add(jw(f), [w0, 0]));
}
/** Band-pass resonance (s w0/Q) / (s^2 + s w0/Q + w0^2): 1 at f0. */
function resonance(f: number, f0: number, q: number): C {
  const s = jw(f);
  const w0 = 2 * Math.PI * f0;
  const bw = scale(s, w0 / q);
  return div(bw, add(add(mul(s, s), bw), [w0 * w0, 0]));
}
/** Baffle step: (s/wb + 1/2) / (s/wb + 1), wb = 2 pi 115 / width. */
function baffleStep(f: number): C {
  const wb = (2 * Math.PI * 115) / DEMO.baffleWidthM;
  const x = scale(jw(f), 1 / wb);
  return div(add(x, [0.5, 0]), add(x, [1, 0]));
}

function woofer(f: number): C {
  const w = DEMO.woofer;
  const h = mul(mul(highPass2(f, w.fcHz, w.qtc), lowPass2(f, w.rollOffHz, w.rollOffQ)), baffleStep(f));
  return scale(h, Math.pow(10, w.levelDb / 20));
}
function tweeter(f: number): C {
  const t = DEMO.tweeter;
  const h = mul(mul(highPass2(f, t.resonanceHz, t.qts), lowPass1(f, t.rollOffHz)), baffleStep(f));
  return scale(h, Math.pow(10, t.levelDb / 20));
}
function room(f: number, c: number): C {
  const r = DEMO.room;
  let modal: C = [1, 0];
  r.dimensionsM.forEach((length, axis) => {
    for (let n = 1; n <= r.modesPerAxis; n++) {
      const fn = (c / 2) * (n / length);
      const shape = Math.cos((n * Math.PI * r.sourceM[axis]) / length) * Math.cos((n * Math.PI * r.listenerM[axis]) / length);
      modal = add(modal, scale(resonance(f, fn, r.q), r.weight * shape));
    }
  });
  const w = DEMO.woofer;
  return mul(modal, highPass2(f, w.fcHz, w.qtc));
}

const round = (x: number, decimals: number) => {
  const y = Number(x.toFixed(decimals));
  return y === 0 ? 0 : y; // no -0 in the file
};

/** The 1/48-octave grid from 20 Hz up to 20 kHz. */
export function demoGrid(): number[] {
  const g = DEMO.grid;
  const n = Math.floor(g.perOctave * Math.log2(g.toHz / g.fromHz));
  return Array.from({ length: n + 1 }, (_, k) => round(g.fromHz * Math.pow(2, k / g.perOctave), 4));
}

function measured(id: string, name: string, model: (f: number) => C, delayMs: number, notes: string[]): Measurement {
  const frequencyHz = demoGrid();
  const h = frequencyHz.map(model);
  const magnitudeDb = h.map((x) => round(10 * Math.log10(x[0] * x[0] + x[1] * x[1]), 4));
  // Unwrapped along the grid (numpy.unwrap's rule), in degrees.
  const phaseDeg: number[] = [];
  let offset = 0;
  h.forEach((x, i) => {
    const p = (Math.atan2(x[1], x[0]) * 180) / Math.PI;
    if (i > 0) {
      const d = p + offset - phaseDeg[i - 1];
      if (Math.abs(d) > 180) offset -= 360 * Math.round(d / 360);
    }
    phaseDeg.push(p + offset);
  });
  return {
    id,
    name,
    source: { fileName: `${id}.txt`, kind: 'generated' },
    frequencyHz,
    magnitudeDb,
    phaseDeg: phaseDeg.map((p) => round(p, 3)),
    phaseEstimated: false,
    delayMs: round(delayMs, 6),
    notes: ['INVENTED data: computed by assets/make-two-way-measured.ts from published models, not measured', ...notes],
  };
}

export function buildMeasuredDemo(): Plan {
  const c = speedOfSoundMps(DEMO.airTemperatureC);
  const w = DEMO.woofer;
  const t = DEMO.tweeter;
  const r = DEMO.room;
  const ms = (m: number) => (m / c) * 1000;
  const measurements = [
    measured('woofer-1m', 'Woofer at 1 m (invented)', woofer, ms(w.distanceM), [
      `closed box fc ${w.fcHz} Hz, Qtc ${w.qtc} (Small 1972); cone roll-off 2nd order ${w.rollOffHz} Hz, Q ${w.rollOffQ}; baffle step, ${DEMO.baffleWidthM} m baffle; level ${w.levelDb} dB`,
      `microphone 1 m on the tweeter axis; woofer 18 mm behind and 150 mm below: ${w.distanceM.toFixed(4)} m at ${c.toFixed(1)} m/s`,
    ]),
    measured('tweeter-1m', 'Tweeter at 1 m (invented)', tweeter, ms(t.distanceM), [
      `dome resonance ${t.resonanceHz} Hz, Q ${t.qts}, as a 2nd-order high-pass; 1st-order roll-off ${t.rollOffHz} Hz; baffle step; level ${t.levelDb} dB`,
      `microphone 1 m on axis: ${t.distanceM} m at ${c.toFixed(1)} m/s`,
    ]),
    measured('room-seat', 'Listening seat (invented room)', (f) => room(f, c), 0, [
      `room ${r.dimensionsM.join(' x ')} m, first ${r.modesPerAxis} axial modes per dimension, Q ${r.q}, weight ${r.weight}; source at ${r.sourceM.join(', ')} m, listener at ${r.listenerM.join(', ')} m (Kuttruff, normal modes)`,
      'the closed-box low end times the modal sum; the arrival time is removed',
    ]),
  ];
  return {
    format: 'biquadrant.plan',
    version: 3,
    name: 'Two-way studio monitor with measured drivers',
    notes:
      'Demo plan (an invented scenario). The driver and room "measurements" are INVENTED: computed by assets/make-two-way-measured.ts from published models ' +
      '(closed-box woofer, dome tweeter resonance, baffle step, time of flight, axial room modes), not measured from any real driver or room. ' +
      'The crossover is designed on them: Linkwitz-Riley 4th order, the woofer edge at 2.5 kHz and the tweeter edge at 2 kHz (the cone already ' +
      'rolls off), a low shelf for the baffle step, the tweeter padded and delayed for the longer woofer path; the predicted acoustic sum is ' +
      'within +/-1.5 dB from 200 Hz to 15 kHz.',
    sampleRate: 48000,
    input: {
      bands: [
        { id: 'b1', type: 'highPass', frequency: 30, q: 0.7071, enabled: true },
        { id: 'b2', type: 'lowShelf', frequency: 400, gainDb: 5.5, slope: 0.5, enabled: true },
      ],
    },
    outputs: [
      {
        id: 'woofer',
        name: 'Woofer',
        gainDb: 0,
        delayMs: 0,
        invert: false,
        mute: false,
        highPass: null,
        lowPass: { family: 'linkwitz-riley', order: 4, frequency: 2500 },
        bands: [],
        driverMeasurementId: 'woofer-1m',
      },
      {
        id: 'tweeter',
        name: 'Tweeter',
        gainDb: -3.5,
        // time alignment: the woofer's longer path, rounded to 0.1 us
        delayMs: round(ms(w.distanceM) - ms(t.distanceM), 4),
        invert: false,
        mute: false,
        highPass: { family: 'linkwitz-riley', order: 4, frequency: 2000 },
        lowPass: null,
        bands: [],
        driverMeasurementId: 'tweeter-1m',
      },
    ],
    airTemperatureC: DEMO.airTemperatureC,
    systemMeasurementIds: ['room-seat'],
    measurements,
  };
}

export const DEMO_FILE = fileURLToPath(new URL('./two-way-measured.bqplan', import.meta.url));

if (process.argv[1] && fileURLToPath(import.meta.url) === process.argv[1]) {
  writeFileSync(DEMO_FILE, writePlanText(buildMeasuredDemo()));
  process.stdout.write(`wrote ${DEMO_FILE}\n`);
}
