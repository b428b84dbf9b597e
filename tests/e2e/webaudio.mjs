/**
 * The float path against the browser engine's own biquad: Chromium's BiquadFilterNode
 * .getFrequencyResponse (W3C Web Audio API, "BiquadFilterNode" and its filter formulas) for
 * peaking, notch, all-pass, band-pass, low-pass, high-pass and the shelves.
 *
 * Run: node --import tsx tests/e2e/webaudio.mjs   (npm run test:webaudio)
 * Prints `webaudio: N passed, M failed` last and exits non-zero on any failure.
 *
 * Our side: the core's design (src/design/cookbook.ts) and response kernel (src/response/kernel.ts)
 * in Node. Their side: the node's response in headless Chromium, on a page served over http.
 * Parameter mapping (W3C Web Audio API, section "BiquadFilterNode", filter formulas):
 * - AudioParams are single precision: frequency, Q and gain are rounded to float32 (Math.fround)
 *   before our design sees them, and so are the probe frequencies (a Float32Array).
 * - lowpass/highpass: the spec's alpha_QdB = sin w0 / (2 * 10^(Q/20)), so our Q (cookbook
 *   alpha = sin w0 / (2 Q)) maps to Q_dB = 20 log10(Q).
 * - bandpass, notch, allpass, peaking: alpha_Q = sin w0 / (2 Q), the cookbook's Q as is; the
 *   spec's bandpass is the constant 0 dB peak gain form, like ours.
 * - lowshelf/highshelf: the spec fixes the shelf slope S = 1; ours takes slope 1.
 * Tolerance: the browser returns Float32Array results (relative rounding 2^-24 ~ 6e-8) from
 * float32 parameters; 1e-6 relative on magnitude (plus 1e-7 absolute for deep notches) and
 * 1e-5 rad on phase leave room for its different (double) order of operations only.
 */
import { createServer } from 'node:http';
import { chromium } from 'playwright-core';
import { designBand } from '../../src/design/cookbook.ts';
import { packSections } from '../../src/design/section.ts';
import { allocateKernelOutput, cascadeResponse } from '../../src/response/kernel.ts';

const f32 = Math.fround;
const RATES = [44100, 48000, 96000];
const PROBES = Float32Array.from([10, 31.5, 63, 100, 250, 500, 999, 1000, 1001, 2000, 4000, 8000, 12000, 16000, 19999, 21000]);

/** Our band type -> the node's type, and which parameters the node reads. */
const CASES = [];
for (const fs of RATES) {
  for (const [f, q, g] of [
    [80, 0.5, 6],
    [1000, 0.7071, -9],
    [1000, 4.3, 12],
    [6300, 1.41, -3.5],
    [15000, 9, 2],
  ]) {
    CASES.push({ fs, ours: 'peaking', theirs: 'peaking', f, q, g });
    CASES.push({ fs, ours: 'notch', theirs: 'notch', f, q, g: 0 });
    CASES.push({ fs, ours: 'allPass', theirs: 'allpass', f, q, g: 0 });
    CASES.push({ fs, ours: 'bandPass', theirs: 'bandpass', f, q, g: 0 });
    CASES.push({ fs, ours: 'lowPass', theirs: 'lowpass', f, q, g: 0 });
    CASES.push({ fs, ours: 'highPass', theirs: 'highpass', f, q, g: 0 });
    CASES.push({ fs, ours: 'lowShelf', theirs: 'lowshelf', f, q: null, g });
    CASES.push({ fs, ours: 'highShelf', theirs: 'highshelf', f, q: null, g });
  }
}

/** The node's parameter values, in float32 as the node holds them. */
function nodeParams(c) {
  const isPassQdB = c.theirs === 'lowpass' || c.theirs === 'highpass';
  return {
    type: c.theirs,
    frequency: f32(c.f),
    Q: c.q === null ? 1 : f32(isPassQdB ? 20 * Math.log10(c.q) : c.q),
    gain: f32(c.g),
  };
}

/** Our response at the probes, from the node's (float32) parameters mapped back to ours. */
function ourResponse(c, p) {
  const band = { id: 'x', type: c.ours, frequency: p.frequency, enabled: true };
  if (c.ours === 'lowPass' || c.ours === 'highPass') band.q = Math.pow(10, p.Q / 20);
  else if (c.q !== null) band.q = p.Q;
  if (c.ours === 'peaking' || c.ours === 'lowShelf' || c.ours === 'highShelf') band.gainDb = p.gain;
  if (c.ours === 'lowShelf' || c.ours === 'highShelf') band.slope = 1;
  const sections = designBand(band, c.fs);
  const probes = Array.from(PROBES).filter((f) => f < c.fs / 2);
  // The engine hands its evaluation the probe as f / (fs / 2) in single precision (from memory of
  // Chromium's biquad code: the float32 probe array is normalized in float32). Next to a notch's
  // zero that rounding (~3e-8 relative) is what a 1e-6 comparison sees, so ours probes there too.
  const nyquist = c.fs / 2;
  const omega = Float64Array.from(probes, (f) => Math.PI * f32(f / nyquist));
  const out = allocateKernelOutput(omega.length);
  cascadeResponse(packSections(sections), sections.length, omega, out);
  return { probes, magnitude: Array.from(out.magnitudeDb, (db) => Math.pow(10, db / 20)), phase: Array.from(out.phaseRad) };
}

const PAGE = `<!doctype html><meta charset="utf-8"><title>webaudio reference</title>
<script>
window.respond = (cases) => cases.map((c) => {
  const ctx = new OfflineAudioContext(1, 128, c.fs);
  const node = new BiquadFilterNode(ctx, { type: c.p.type, frequency: c.p.frequency, Q: c.p.Q, gain: c.p.gain });
  const f = Float32Array.from(c.probes);
  const mag = new Float32Array(f.length);
  const phase = new Float32Array(f.length);
  node.getFrequencyResponse(f, mag, phase);
  return { magnitude: Array.from(mag), phase: Array.from(phase) };
});
</script>`;

function wrapDiff(a, b) {
  let d = (a - b) % (2 * Math.PI);
  if (d > Math.PI) d -= 2 * Math.PI;
  if (d < -Math.PI) d += 2 * Math.PI;
  return Math.abs(d);
}

async function main() {
  const server = createServer((req, res) => {
    res.writeHead(200, { 'content-type': 'text/html; charset=utf-8' });
    res.end(PAGE);
  });
  await new Promise((resolve) => server.listen(0, '127.0.0.1', resolve));
  const { port } = server.address();
  const browser = await chromium.launch({
    executablePath: '/usr/bin/chromium',
    args: ['--headless', '--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run', '--disable-background-networking', '--disable-component-update', '--disable-sync'],
  });
  let passed = 0;
  let failed = 0;
  let worstMagnitude = 0;
  let worstPhase = 0;
  try {
    const page = await browser.newPage();
    await page.goto(`http://127.0.0.1:${port}/`);
    const prepared = CASES.map((c) => {
      const p = nodeParams(c);
      return { c, p, ours: ourResponse(c, p) };
    });
    const theirs = await page.evaluate((cases) => window.respond(cases), prepared.map(({ c, p, ours }) => ({ fs: c.fs, p, probes: ours.probes })));
    prepared.forEach(({ c, ours }, i) => {
      const t = theirs[i];
      const problems = [];
      ours.probes.forEach((f, k) => {
        const m = ours.magnitude[k];
        const dm = Math.abs(t.magnitude[k] - m);
        if (m > 1e-3) worstMagnitude = Math.max(worstMagnitude, dm / m);
        if (!(dm <= 1e-6 * m + 1e-7)) problems.push(`|H| at ${f} Hz: ours ${m}, browser ${t.magnitude[k]} (relative ${(dm / m).toExponential(2)})`);
        // Phase is undefined at an exact zero of the response.
        if (m > 1e-6) {
          const dp = wrapDiff(t.phase[k], ours.phase[k]);
          worstPhase = Math.max(worstPhase, dp);
          if (!(dp <= 1e-5)) problems.push(`phase at ${f} Hz: ours ${ours.phase[k]}, browser ${t.phase[k]}`);
        }
      });
      const label = `${c.ours} f=${c.f} q=${c.q ?? 'S=1'} g=${c.g} at ${c.fs} Hz`;
      if (problems.length === 0) passed++;
      else {
        failed++;
        console.log(`FAIL ${label}\n  ${problems.slice(0, 4).join('\n  ')}`);
      }
    });
  } finally {
    await browser.close();
    server.close();
  }
  console.log(`largest differences: |H| ${worstMagnitude.toExponential(2)} relative (where |H| > 1e-3), phase ${worstPhase.toExponential(2)} rad`);
  console.log(`webaudio: ${passed} passed, ${failed} failed`);
  process.exitCode = failed === 0 && passed > 0 ? 0 : 1;
}

main().catch((e) => {
  console.error(e);
  console.log('webaudio: 0 passed, 1 failed');
  process.exitCode = 1;
});
