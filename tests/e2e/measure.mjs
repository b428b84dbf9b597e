// Measurement import end to end in headless Chromium: a text file and a WAV impulse response
// dropped on the page (a DataTransfer with a File, as the browser gives a drop) and opened through
// the file input appear on the plot at once, named after the file; the import panel says what
// they measure, sets a WAV file's gate (shown on the Time view) and carries the caution line;
// undo takes them out; a bad file shows its line and changes nothing; smoothing and the excess
// phase change what is drawn, never the plan. What is drawn is compared with the core's own
// import, smoothing and interpolation computed here in Node. Screenshots in test-results/.
import { mkdirSync, readFileSync } from 'node:fs';
import { register } from 'tsx/esm/api';
import { assert, browserChecks, checkRunner, root } from './serve.mjs';

register();
const { importMeasurement } = await import('../../src/measure/import.ts');
const { interpolateMeasurement } = await import('../../src/measure/acoustic.ts');
const { smoothMeasurement } = await import('../../src/measure/smooth.ts');

const OUT = `${root}/test-results`;
mkdirSync(OUT, { recursive: true });
const tally = checkRunner();
const check = tally.check;

// An invented "room at the listening position": a broad 6 dB rise at 60 Hz on a gentle tilt,
// magnitude only (common practice for such files: Hz and dB columns with a header line).
const ROOM = [
  '* invented room response, listening position',
  'Freq(Hz) SPL(dB)',
  ...Array.from({ length: 200 }, (_, i) => {
    const f = 20 * Math.pow(1000, i / 199);
    const db = 6 * Math.exp(-Math.pow(Math.log2(f / 60) / 0.4, 2)) - 1.5 * Math.log2(f / 1000) / 5;
    return `${f.toFixed(4)} ${db.toFixed(4)}`;
  }),
].join('\n');
const WAV_CASE = JSON.parse(readFileSync(`${root}/tests/reference/fixtures/measure-wav.json`, 'utf8')).cases.find((c) => c.channels === 2);
const WAV = readFileSync(`${root}/tests/reference/fixtures/${WAV_CASE.file}`);

/** Drops files on the page as a person's drop arrives: dragenter, dragover, drop with a DataTransfer. */
async function drop(page, files) {
  await page.evaluate((list) => {
    const dt = new DataTransfer();
    for (const f of list) dt.items.add(new File([Uint8Array.from(atob(f.base64), (c) => c.charCodeAt(0))], f.name));
    const at = document.querySelector('[data-testid="plot-magnitude"]') ?? document.body;
    for (const type of ['dragenter', 'dragover', 'drop']) at.dispatchEvent(new DragEvent(type, { dataTransfer: dt, bubbles: true, cancelable: true }));
  }, files.map((f) => ({ name: f.name, base64: Buffer.from(f.bytes).toString('base64') })));
}

/** The plotted values of a curve against the core's values at the plot's frequencies (NaN where the core has none). */
function compareCurve(curve, want, what) {
  assert(curve, `${what}: not plotted`);
  let compared = 0;
  for (let i = 0; i < want.length; i++) {
    if (!Number.isFinite(want[i])) {
      assert(curve.y[i] === null || !Number.isFinite(curve.y[i]), `${what}[${i}]: the core has no value, the plot shows ${curve.y[i]}`);
      continue;
    }
    assert(Math.abs(curve.y[i] - want[i]) < 1e-6, `${what}[${i}]: plotted ${curve.y[i]}, core ${want[i]}`);
    compared++;
  }
  assert(compared > 50, `${what}: only ${compared} points compared`);
}

async function main() {
  await browserChecks(tally, 'e2e measurements', { viewport: { width: 1280, height: 800 } }, async ({ page, browser, server, errors }) => {
    const plan = () => page.evaluate(() => window.__biquadrant.plan());
    const plotted = () => page.evaluate(() => window.__biquadrant.plotted());
    await page.goto(server.url);
    await page.waitForFunction(() => window.__biquadrant?.plotted()?.magnitude.length > 0);
    const start = await plan();

    await check('a dropped text file is a system measurement at once, named after the file, drawn as the core reads it; the panel carries the caution', async () => {
      await drop(page, [{ name: 'Living room.txt', bytes: Buffer.from(ROOM) }]);
      await page.waitForFunction(() => window.__biquadrant.plotted()?.magnitude.some((c) => c.id.startsWith('sys:')));
      const p = await plan();
      assert(p.measurements?.length === 1, `${p.measurements?.length} measurements`);
      const m = p.measurements[0];
      assert(m.name === 'Living room' && m.id === 'living-room', `name ${m.name}, id ${m.id}`);
      assert(JSON.stringify(p.systemMeasurementIds) === '["living-room"]', `system ${JSON.stringify(p.systemMeasurementIds)}`);
      const pl = await plotted();
      const core = interpolateMeasurement(importMeasurement('Living room.txt', Buffer.from(ROOM)), pl.frequencies);
      compareCurve(pl.magnitude.find((c) => c.id === 'sys:living-room'), core.magnitudeDb, 'sys:living-room');
      const key = page.locator('[data-testid="legend-key"][data-curve="sys:living-room"]');
      assert((await key.count()) === 1, 'no legend entry');
      assert(/Living room \(system\)/.test(await key.getAttribute('title')), `legend: ${await key.getAttribute('title')}`);
      const caution = await page.getByTestId('measure-caution').textContent();
      assert(/start quietly/.test(caution) && /tweeters/.test(caution) && /hearing protection/.test(caution) && /regulations/.test(caution), caution);
      await page.screenshot({ path: `${OUT}/30-measure-dropped-text.png` });
    });

    await check('the panel attaches it to an output: the driver, its prediction and the predicted sum appear; undo steps back', async () => {
      await page.getByTestId('measure-use').selectOption('driver:woofer');
      await page.waitForFunction(() => window.__biquadrant.plotted()?.magnitude.some((c) => c.id === 'pred:woofer'));
      let p = await plan();
      assert(p.outputs.find((o) => o.id === 'woofer').driverMeasurementId === 'living-room', 'not attached');
      assert(!p.systemMeasurementIds, `still a system measurement: ${JSON.stringify(p.systemMeasurementIds)}`);
      const pl = await plotted();
      assert(pl.magnitude.some((c) => c.id === 'meas:woofer'), 'no driver curve');
      assert(!pl.magnitude.some((c) => c.id.startsWith('sys:')), 'the system curve should be gone');
      await page.keyboard.press('Control+z');
      p = await plan();
      assert(JSON.stringify(p.systemMeasurementIds) === '["living-room"]', 'undo did not bring back the system use');
    });

    await check('undo of the drop removes the measurement and its curve; redo brings both back', async () => {
      await page.locator('body').click({ position: { x: 5, y: 5 } });
      await page.keyboard.press('Control+z');
      let p = await plan();
      assert(!p.measurements, `measurements left: ${p.measurements?.length}`);
      assert(JSON.stringify(p) === JSON.stringify(start), 'undo did not restore the plan as it was');
      let pl = await plotted();
      assert(!pl.magnitude.some((c) => c.id.startsWith('sys:')), 'curve left after undo');
      assert((await page.getByTestId('measure-panel').count()) === 0, 'the panel stays open on a measurement that is gone');
      await page.keyboard.press('Control+y');
      p = await plan();
      assert(p.measurements?.length === 1, 'redo did not bring it back');
      pl = await plotted();
      assert(pl.magnitude.some((c) => c.id === 'sys:living-room'), 'no curve after redo');
    });

    await check('smoothing and the excess phase change what is drawn, not the plan', async () => {
      const before = JSON.stringify(await plan());
      await page.getByTestId('measure-smoothing').selectOption({ label: 'Smoothing 1/3 oct' });
      const pl = await plotted();
      const m = (await plan()).measurements[0];
      const core = interpolateMeasurement(smoothMeasurement(m, { kind: 'octave', n: 3 }), pl.frequencies);
      compareCurve(pl.magnitude.find((c) => c.id === 'sys:living-room'), core.magnitudeDb, 'smoothed sys:living-room');
      assert(/1\/3 oct/.test(await page.locator('[data-testid="legend-key"][data-curve="sys:living-room"]').getAttribute('title')), 'legend does not name the smoothing');
      assert(JSON.stringify(await plan()) === before, 'smoothing changed the plan');
      await page.screenshot({ path: `${OUT}/31-measure-smoothed.png` });
      await page.getByTestId('measure-smoothing').selectOption({ label: 'No smoothing' });
    });

    await check('a bad file shows its line and changes nothing', async () => {
      const before = JSON.stringify(await plan());
      await drop(page, [{ name: 'broken.txt', bytes: Buffer.from('# two points\n100 0\n90 1\n') }]);
      await page.getByTestId('measure-error').waitFor();
      const text = await page.getByTestId('measure-error').textContent();
      assert(/line 3/.test(text), `error: ${text}`);
      assert(JSON.stringify(await plan()) === before, 'a refused file changed the plan');
      await page.screenshot({ path: `${OUT}/32-measure-bad-file.png` });
      await page.getByRole('button', { name: 'Close' }).click();
    });

    await check('a dropped WAV impulse response: channel and gate in the panel, the spectrum taken again from the kept samples, the gate on the Time view', async () => {
      await drop(page, [{ name: 'tweeter ir.wav', bytes: WAV }]);
      await page.waitForFunction(() => window.__biquadrant.plan().measurements?.some((m) => m.id === 'tweeter-ir'));
      let m = (await plan()).measurements.find((x) => x.id === 'tweeter-ir');
      const first = importMeasurement('tweeter ir.wav', WAV);
      // The same code in the page and in Node; Math.log10 and atan2 may differ in the last bit between engines.
      const diff = (a, b) => a.reduce((w, v, i) => Math.max(w, Math.abs(v - b[i])), 0);
      assert(m.magnitudeDb.length === first.magnitudeDb.length && diff(m.magnitudeDb, first.magnitudeDb) < 1e-9, `default import differs from the core by ${diff(m.magnitudeDb, first.magnitudeDb)} dB`);
      await page.getByTestId('measure-channel').selectOption('1');
      await page.getByTestId('measure-gate-length').fill('115');
      await page.getByTestId('measure-gate-length').press('Enter');
      await page.getByTestId('measure-gate-start').fill('1 ms');
      await page.getByTestId('measure-gate-start').press('Enter');
      m = (await plan()).measurements.find((x) => x.id === 'tweeter-ir');
      const want = importMeasurement('tweeter ir.wav', WAV, { channel: 1, gate: { startMs: 1, lengthMs: 115 } });
      let worst = 0;
      for (let i = 0; i < want.magnitudeDb.length; i++) worst = Math.max(worst, Math.abs(m.magnitudeDb[i] - want.magnitudeDb[i]));
      assert(worst < 1e-9, `re-imported spectrum differs from the core's by ${worst} dB`);
      assert(Math.abs(m.delayMs - (WAV_CASE.peakSample * 1000) / WAV_CASE.sampleRate) < 1e-9, `delay ${m.delayMs}`);
      // Against scipy.signal.sosfreqz of the cascade in the file (make_measure_fixtures.py), 0.05 dB as the importer's own test.
      let ref = 0;
      WAV_CASE.frequencyHz.forEach((f, i) => {
        const j = m.frequencyHz.findIndex((g) => Math.abs(g / f - 1) < 1e-12);
        ref = Math.max(ref, Math.abs(m.magnitudeDb[j] - WAV_CASE.magnitudeDb[i]));
      });
      assert(ref < 0.05, `channel 2 with the reference gate is ${ref} dB from scipy's`);
      const bad = await page.getByTestId('measure-gate-length');
      await bad.fill('0.5');
      await bad.press('Enter');
      const problem = await page.getByTestId('measure-gate-length-error').textContent();
      assert(/gate length/.test(problem), `bad gate: ${problem}`);
      await bad.press('Escape');
      await page.screenshot({ path: `${OUT}/33-measure-wav-panel.png` });
      await page.getByTestId('measure-show-gate').click();
      await page.getByTestId('time-gate').waitFor();
      const gate = await page.evaluate(() => window.__biquadrant.gatePlot());
      const g = gate.find((c) => c.id === 'gate-window').y;
      const ir = gate.find((c) => c.id === 'gate-ir').y;
      assert(Math.max(...g) === 1 && Math.min(...g) === 0, 'the gate is not drawn from 0 to 1');
      assert(Math.max(...ir.map(Math.abs)) === 1, 'the impulse response is not scaled to its peak');
      await page.screenshot({ path: `${OUT}/34-measure-gate-time-view.png` });
      await page.getByTestId('gate-zoom').click();
      await page.screenshot({ path: `${OUT}/36-measure-gate-peak.png` });
      await page.getByTestId('gate-zoom').click();
      await page.getByTestId('gate-length').fill('50');
      await page.getByTestId('gate-length').press('Enter');
      const w = (await page.evaluate(() => window.__biquadrant.gatePlot())).find((c) => c.id === 'gate-window').y.filter((v) => v > 0).length;
      const m50 = (await plan()).measurements.find((x) => x.id === 'tweeter-ir');
      const want50 = importMeasurement('x.wav', WAV, { channel: 1, gate: { startMs: 1, lengthMs: 50 } });
      assert(diff(m50.magnitudeDb, want50.magnitudeDb) < 1e-9, 'the Time view gate did not re-import');
      assert(Math.abs(w - 0.05 * WAV_CASE.sampleRate) < 3, `gate of ${w} samples drawn for 50 ms`);
      await page.getByTestId('view-response').click().catch(() => page.keyboard.press('Alt+1'));
    });

    await check('excess phase: a WAV measurement drawn with its delay removed is its stored phase', async () => {
      await page.keyboard.press('Alt+1');
      await page.getByTestId('measure-phase').selectOption('excess');
      await page.getByTestId('phase-mode').selectOption('unwrapped');
      const pl = await plotted();
      const m = (await plan()).measurements.find((x) => x.id === 'tweeter-ir');
      const core = interpolateMeasurement({ ...m, delayMs: 0 }, pl.frequencies);
      compareCurve(pl.phase.find((c) => c.id === 'sys:tweeter-ir'), Array.from(core.phaseRad, (v) => (v * 180) / Math.PI), 'excess phase');
      await page.getByTestId('measure-phase').selectOption('full');
      const full = await plotted();
      const coreFull = interpolateMeasurement(m, pl.frequencies);
      compareCurve(full.phase.find((c) => c.id === 'sys:tweeter-ir'), Array.from(coreFull.phaseRad, (v) => (v * 180) / Math.PI), 'full phase');
      await page.getByTestId('phase-mode').selectOption('wrapped');
    });

    await check('minimum phase on request is marked as estimated in the legend', async () => {
      await page.getByTestId('measure-minphase').check();
      const m = (await plan()).measurements.find((x) => x.id === 'tweeter-ir');
      assert(m.phaseEstimated === true, 'not estimated');
      const title = await page.locator('[data-testid="legend-key"][data-curve="sys:tweeter-ir"]').getAttribute('title');
      assert(/phase estimated/.test(title), `legend: ${title}`);
      await page.getByTestId('measure-done').click();
      assert((await page.getByTestId('measure-panel').count()) === 0, 'Done did not close the panel');
    });

    await check('Open measurement through the file input; remove, rename and the air temperature in the list', async () => {
      await page.getByTestId('measure-file').setInputFiles({ name: 'room2.txt', mimeType: 'text/plain', buffer: Buffer.from(ROOM) });
      await page.waitForFunction(() => window.__biquadrant.plan().measurements?.some((m) => m.id === 'room2'));
      const row = page.locator('[data-testid="measurement-row"][data-measurement="room2"]');
      await row.getByLabel('Measurement name').fill('Second seat');
      await row.getByLabel('Measurement name').press('Enter');
      await row.getByLabel('Measurement name').blur();
      assert((await plan()).measurements.find((x) => x.id === 'room2').name === 'Second seat', 'not renamed');
      await page.getByTestId('air-temperature').fill('30 °C');
      await page.getByTestId('air-temperature').press('Enter');
      assert((await plan()).airTemperatureC === 30, 'air temperature not set');
      assert(/349\.\d m\/s/.test(await page.getByTestId('speed-of-sound').textContent()), 'speed of sound at 30 °C');
      await page.screenshot({ path: `${OUT}/35-measure-list.png` });
      await row.getByTestId('measurement-remove').click();
      const p = await plan();
      assert(!p.measurements.some((x) => x.id === 'room2'), 'not removed');
      assert(!(await plotted()).magnitude.some((c) => c.id === 'sys:room2'), 'curve left after remove');
    });

  });
}

await main();
