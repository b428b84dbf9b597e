// UI benchmark (`npm run bench:ui`): the built web renderer in headless Chromium on a
// 1000-pixel-wide window, two plans (8 outputs x 16 bands, and 16 outputs x 64 bands), a real
// pointer drag of a band handle (a move every 16.7 ms, as a mouse reports them; BENCH_MOVE_MS
// changes it), and keyboard nudges of the selected band. Each frame is timed in the page from the
// input event's timeStamp to the task after the animation frame that follows the plot update, so
// the wait for the frame and the paint are included; see renderer/src/lib/test-hook.ts.
// Goals: 8 x 16 drag median <= 16 ms, p95 <= 25 ms; 16 x 64 drag median <= 16 ms, p95 <= 33 ms,
// a nudge <= 50 ms (median). BENCH_CASES=8x16 (or 16x64) runs one case.
// Headless Chromium here renders in software (--disable-gpu) on 2 cores; other load skews it.
import { buildWeb, launchBrowser, serveWeb } from './serve.mjs';

/**
 * Driver measurements on the first outputs (sub .. mid, the dragged one included), so each frame
 * also recomputes a predicted response and the predicted sum: 1/96 octave from 20 Hz to 20 kHz,
 * the density of the WAV importer's grid. BENCH_MEASUREMENTS=0 leaves them out.
 */
const MEASUREMENTS = Number(process.env.BENCH_MEASUREMENTS ?? 4);

/** A smooth invented driver: a 2nd-order-like rise and fall in dB, phase following it. */
function benchMeasurement(k) {
  const frequencyHz = Array.from({ length: 957 }, (_, i) => 20 * Math.pow(2, i / 96));
  const lo = 30 * (k + 1);
  const hi = 3000 * (k + 1);
  return {
    id: `drv${k}`,
    name: `Driver ${k + 1} (invented)`,
    source: { fileName: `drv${k}.txt`, kind: 'generated' },
    frequencyHz,
    magnitudeDb: frequencyHz.map((f) => -10 * Math.log10(1 + (lo / f) ** 4) - 10 * Math.log10(1 + (f / hi) ** 4)),
    phaseDeg: frequencyHz.map((f) => 180 * (Math.atan(lo / f) - Math.atan(f / hi)) / Math.PI),
    phaseEstimated: false,
    delayMs: 2.9,
    notes: ['invented for the UI benchmark'],
  };
}
const FRAMES = Number(process.env.BENCH_FRAMES || 240);
/** Pointer report interval of the simulated drag (60 Hz; many mice report at 125 Hz or more). */
const MOVE_INTERVAL_MS = Number(process.env.BENCH_MOVE_MS || 1000 / 60);

const NUDGES = Number(process.env.BENCH_NUDGES || 40);

export function benchPlan(OUTPUTS = 8, BANDS = 16) {
  const names8 = ['sub', 'low', 'low-mid', 'mid', 'upper-mid', 'presence', 'high', 'air'];
  const names = OUTPUTS === 8 ? names8 : Array.from({ length: OUTPUTS }, (_, k) => `way-${k + 1}`);
  // Crossover edges spread evenly in log frequency from 20 Hz to 20 kHz.
  const edges = OUTPUTS === 8 ? [20, 60, 150, 400, 1000, 2500, 6000, 12000, 20000] : Array.from({ length: OUTPUTS + 1 }, (_, k) => Math.round(20 * Math.pow(1000, k / OUTPUTS)));
  const outputs = names.map((id, k) => ({
    id,
    name: id.replace(/(^|-)\w/g, (s) => s.toUpperCase()).replace('-', ' '),
    gainDb: -k * 0.5,
    delayMs: k * 0.05,
    invert: k % 3 === 2,
    mute: false,
    highPass: k === 0 ? { family: 'butterworth', order: 2, frequency: edges[0] } : { family: 'linkwitz-riley', order: 4, frequency: edges[k] },
    lowPass: k === OUTPUTS - 1 ? null : { family: 'linkwitz-riley', order: 4, frequency: edges[k + 1] },
    bands: Array.from({ length: BANDS }, (_, i) => ({
      id: `b${i + 1}`,
      type: i % 5 === 4 ? 'highShelf' : 'peaking',
      frequency: Math.round(30 * Math.pow(2, (i * 9) / BANDS) * (1 + k * 0.03)),
      gainDb: ((i % 7) - 3) * 1.5,
      q: 1 + (i % 4) * 0.8,
      enabled: true,
    })),
  }));
  const measurements = Array.from({ length: MEASUREMENTS }, (_, k) => benchMeasurement(k));
  measurements.forEach((m, k) => (outputs[k].driverMeasurementId = m.id));
  return {
    format: 'biquadrant.plan',
    version: MEASUREMENTS > 0 ? 3 : 1,
    ...(MEASUREMENTS > 0 ? { measurements } : {}),
    name: `UI benchmark: ${OUTPUTS} outputs x ${BANDS} bands`,
    sampleRate: 48000,
    input: { bands: [{ id: 'b1', type: 'peaking', frequency: 100, gainDb: -2, q: 2, enabled: true }] },
    outputs,
  };
}

/** Opens a plan through the app's Open command (browser fallback: a file input). */
export async function openPlanText(page, name, text) {
  const chooser = page.waitForEvent('filechooser');
  await page.getByTestId('open').click();
  await (await chooser).setFiles({ name, mimeType: 'application/json', buffer: Buffer.from(text) });
}

function stats(xs) {
  const s = [...xs].sort((a, b) => a - b);
  const q = (p) => s[Math.min(s.length - 1, Math.floor(p * (s.length - 1) + 0.5))];
  return { n: s.length, median: q(0.5), p95: q(0.95), min: s[0], max: s[s.length - 1] };
}

/** Drags the handle of `bandId` in the selected chain in a steady loop; returns the timings. */
async function drag(page, bandId) {
  const h = await page.evaluate((id) => window.__biquadrant.handle(id), bandId);
  if (!h) throw new Error(`band handle ${bandId} not on the plot`);
  await page.mouse.move(h.x, h.y);
  await page.mouse.down();
  const before = await page.evaluate(() => window.__biquadrant.cacheStats());
  await page.evaluate(() => {
    window.__biquadrant.frameTimes.length = 0;
    window.__biquadrant.drawTimes.length = 0;
    window.__biquadrant.rafTimes.length = 0;
  });
  // A steady drag: one pointer move every MOVE_INTERVAL_MS, as a mouse reports them, without
  // waiting for the page (the browser delivers them aligned to its frames).
  const t0 = Date.now();
  for (let i = 0; i < FRAMES; i++) {
    const t = i / FRAMES;
    await page.mouse.move(h.x + 160 * Math.sin(2 * Math.PI * t), h.y + 60 * Math.sin(4 * Math.PI * t));
    const wait = t0 + (i + 1) * MOVE_INTERVAL_MS - Date.now();
    if (wait > 0) await new Promise((r) => setTimeout(r, wait));
  }
  await page.waitForTimeout(200);
  const after = await page.evaluate(() => window.__biquadrant.cacheStats());
  await page.mouse.up();
  const hook = await page.evaluate(() => ({ f: window.__biquadrant.frameTimes.slice(), d: window.__biquadrant.drawTimes.slice(), r: window.__biquadrant.rafTimes.slice() }));
  // The first frames warm up the JIT.
  return {
    updates: hook.f.length,
    frames: stats(hook.f.slice(5)),
    draws: stats(hook.d.slice(5)),
    rafs: stats(hook.r.slice(5)),
    outputsPerUpdate: (after.outputsComputed - before.outputsComputed) / Math.max(1, hook.f.length),
    chartUpdates: after.chartUpdates - before.chartUpdates,
  };
}

function report(label, r) {
  console.log(`bench:ui  ${label}: ${FRAMES} pointer moves every ${MOVE_INTERVAL_MS.toFixed(1)} ms, ${r.updates} plot updates, ${r.outputsPerUpdate.toFixed(2)} outputs recomputed per update, ${r.chartUpdates} Chart.js layouts`);
  console.log(`bench:ui    input to painted plots: median=${r.frames.median.toFixed(1)} ms p95=${r.frames.p95.toFixed(1)} ms (min ${r.frames.min.toFixed(1)}, max ${r.frames.max.toFixed(1)})`);
  console.log(`bench:ui    input to the next animation frame (before paint): median=${r.rafs.median.toFixed(1)} ms p95=${r.rafs.p95.toFixed(1)} ms`);
  console.log(`bench:ui    plot update (overlay redraw): median=${r.draws.median.toFixed(1)} ms p95=${r.draws.p95.toFixed(1)} ms`);
}

/** Presses ArrowRight/ArrowLeft on the selected band; each nudge timed from key event to painted plots. */
async function nudges(page) {
  await page.evaluate(() => {
    window.__biquadrant.frameTimes.length = 0;
    window.__biquadrant.drawTimes.length = 0;
  });
  for (let i = 0; i < NUDGES; i++) {
    await page.keyboard.press(i % 2 === 0 ? 'ArrowRight' : 'ArrowLeft');
    await page.waitForTimeout(120);
  }
  const hook = await page.evaluate(() => ({ f: window.__biquadrant.frameTimes.slice(), d: window.__biquadrant.drawTimes.slice() }));
  return { count: hook.f.length, frames: stats(hook.f.slice(2)), draws: stats(hook.d.slice(2)) };
}

async function benchCase(browser, server, outputs, bands, goal) {
  const page = await browser.newPage({ viewport: { width: 1000, height: 800 } });
  const errors = [];
  page.on('pageerror', (e) => errors.push(e.message));
  await page.goto(server.url);
  await page.waitForFunction(() => window.__biquadrant?.plotted() !== null);
  await openPlanText(page, 'bench.bqplan', JSON.stringify(benchPlan(outputs, bands)));
  await page.waitForFunction((n) => window.__biquadrant.plan().outputs.length === n, outputs);
  // The fourth output's band 8: that output and the sum change each frame.
  await page.getByTestId('output-row').nth(3).locator('button.pick').click();
  await page.getByTestId('band-row').nth(7).click();
  await page.waitForTimeout(300);
  const plotted = await page.evaluate(() => {
    const p = window.__biquadrant.plotted();
    return { points: p.frequencies.length, curves: p.magnitude.length };
  });
  console.log(`bench:ui  ${outputs} outputs x ${bands} bands, ${plotted.curves} curves x 3 plots, ${plotted.points} points per curve, window 1000 px`);
  const dragCdp = process.env.BENCH_PROFILE ? await page.context().newCDPSession(page) : null;
  if (dragCdp) await dragCdp.send('Profiler.enable').then(() => dragCdp.send('Profiler.start'));
  const out = await drag(page, 'b8');
  if (dragCdp) {
    const { profile } = await dragCdp.send('Profiler.stop');
    const { writeFileSync, mkdirSync } = await import('node:fs');
    mkdirSync(process.env.BENCH_PROFILE, { recursive: true });
    writeFileSync(`${process.env.BENCH_PROFILE}/drag-${outputs}x${bands}.cpuprofile`, JSON.stringify(profile));
  }
  report('output band drag', out);
  await page.getByTestId('band-row').nth(7).click();
  // BENCH_PROFILE=DIR writes a V8 CPU profile of the nudges (open it in the browser's devtools).
  const cdp = process.env.BENCH_PROFILE ? await page.context().newCDPSession(page) : null;
  if (cdp) await cdp.send('Profiler.enable').then(() => cdp.send('Profiler.start'));
  const nudge = await nudges(page);
  if (cdp) {
    const { profile } = await cdp.send('Profiler.stop');
    const { writeFileSync, mkdirSync } = await import('node:fs');
    mkdirSync(process.env.BENCH_PROFILE, { recursive: true });
    writeFileSync(`${process.env.BENCH_PROFILE}/nudge-${outputs}x${bands}.cpuprofile`, JSON.stringify(profile));
  }
  console.log(`bench:ui  keyboard nudge (${nudge.count} of ${NUDGES} timed): input to painted plots median=${nudge.frames.median.toFixed(1)} ms p95=${nudge.frames.p95.toFixed(1)} ms max=${nudge.frames.max.toFixed(1)} ms; plot update median=${nudge.draws.median.toFixed(1)} ms`);
  // An input-chain band: every output and the sum change each frame (informational).
  await page.getByTestId('chain-input').click();
  await page.getByTestId('band-row').nth(0).click();
  await page.waitForTimeout(300);
  report('input-chain band drag', await drag(page, 'b1'));
  const ok = out.frames.median <= goal.median && out.frames.p95 <= goal.p95 && (goal.nudge === undefined || nudge.frames.median <= goal.nudge);
  console.log(`bench:ui  goal ${outputs} x ${bands} (output band drag median <= ${goal.median} ms, p95 <= ${goal.p95} ms${goal.nudge !== undefined ? `, nudge <= ${goal.nudge} ms` : ''}): ${ok ? 'met' : 'NOT met'}`);
  if (errors.length) console.log(`bench:ui  page errors: ${errors.join('; ')}`);
  await page.close();
  return ok;
}

async function main() {
  if (!process.env.NO_BUILD) await buildWeb();
  const server = await serveWeb();
  const browser = await launchBrowser();
  const cases = (process.env.BENCH_CASES || '8x16,16x64').split(',');
  try {
    if (cases.includes('8x16')) await benchCase(browser, server, 8, 16, { median: 16, p95: 25 });
    if (cases.includes('16x64')) await benchCase(browser, server, 16, 64, { median: 16, p95: 33, nudge: 50 });
  } finally {
    await browser.close();
    await server.close();
  }
}

if (import.meta.url === `file://${process.argv[1]}`) {
  main().catch((e) => {
    console.error(e);
    process.exit(1);
  });
}
