// End-to-end checks of cramping in headless Chromium (playwright-core): the Response view's
// analog curves against the core's analog response computed here in Node, the band editor's
// design method, achieved bandwidth and cramping figure, the delays the board runs with the exact
// ones on request, the edge editor's Bessel delay note, and the sample-rate dialog with its
// matched offer. Screenshots go to test-results/. The last line reads `e2e cramping: N passed, M failed`.
import { mkdirSync } from 'node:fs';
import { register } from 'tsx/esm/api';
import { browserChecks, root, assert, checkRunner } from './serve.mjs';
import { openPlanText } from './bench-ui.mjs';

register();
const { analogPlanResponse } = await import('../../src/analysis/analog-response.ts');
const { bandCramping } = await import('../../src/analysis/cramping.ts');
const { designPlan } = await import('../../src/design/chain.ts');
const { designedResponse } = await import('../../src/response/chain-response.ts');

const OUT = `${root}/test-results`;
mkdirSync(OUT, { recursive: true });
const tally = checkRunner();
const check = tally.check;

/** An invented scenario: a two-way with a 16 kHz air boost on the tweeter, its delay a fraction of a sample, a board in whole samples. */
const scenario = {
  format: 'biquadrant.plan',
  version: 3,
  name: 'Air boost near Nyquist (invented)',
  sampleRate: 48000,
  input: { bands: [] },
  outputs: [
    { id: 'woofer', name: 'Woofer', gainDb: 0, delayMs: 0, invert: false, mute: false, highPass: null, lowPass: { family: 'bessel', order: 4, frequency: 2200, normalization: 'delay' }, bands: [] },
    {
      id: 'tweeter',
      name: 'Tweeter',
      gainDb: 0,
      delayMs: 0.0104,
      invert: false,
      mute: false,
      highPass: { family: 'bessel', order: 4, frequency: 2200, normalization: 'delay' },
      lowPass: null,
      bands: [{ id: 'air', type: 'peaking', frequency: 16000, gainDb: 6, q: 1.41 }],
    },
  ],
  profile: { name: 'whole samples', sampleRate: null, order: ['b0', 'b1', 'b2', 'a1', 'a2'], feedbackSign: 'as-computed', writeA0: false, number: { kind: 'decimal', significantDigits: null }, coefficientScale: 1, gain: 'separate', delayUnit: 'samples', maxDelaySamples: null, sectionBudget: 16 },
};

async function main() {
  await browserChecks(tally, 'e2e cramping', { viewport: { width: 1400, height: 900 } }, async ({ page, browser, server, errors }) => {
    const hook = (fn, arg) => page.evaluate(fn, arg);
    const plan = () => hook(() => window.__biquadrant.plan());
    const plotted = () => hook(() => window.__biquadrant.plotted());
    await page.goto(server.url);
    await page.waitForFunction(() => window.__biquadrant?.plotted()?.magnitude.length > 0);
    await openPlanText(page, 'air.bqplan', JSON.stringify(scenario));
    await page.waitForFunction(() => window.__biquadrant.plan().name.startsWith('Air boost'));

    await check('analog curves on request equal the core analog response (1e-9 dB)', async () => {
      assert(!(await plotted()).magnitude.some((c) => c.id.startsWith('analog:')), 'analog curves drawn before they were asked for');
      await page.getByTestId('analog-curves').check();
      await page.waitForFunction(() => window.__biquadrant.plotted().magnitude.some((c) => c.id === 'analog:sum'));
      const pl = await plotted();
      const a = analogPlanResponse(await plan(), pl.frequencies);
      for (const [id, ref] of [['analog:tweeter', a.outputs[1].curves], ['analog:sum', a.sum]]) {
        const c = pl.magnitude.find((x) => x.id === id);
        assert(c, `${id} not plotted`);
        c.y.forEach((y, i) => assert(Math.abs(y - ref.magnitudeDb[i]) < 1e-9, `${id} at ${pl.frequencies[i]} Hz: ${y} vs ${ref.magnitudeDb[i]}`));
      }
      assert(/sum vs analog: [-+]\d+\.\d\d dB/.test(await page.getByTestId('cramping-note').innerText()), 'no cramping note');
      await page.screenshot({ path: `${OUT}/cramping-analog.png` });
    });

    await check('the delays the board runs: whole samples, the sum change noted, exact delays on request', async () => {
      const note = await page.getByTestId('delay-note').innerText();
      assert(/board delays: sum [-+]\d+\.\d\d dB/.test(note), `note: ${note}`);
      const rounded = { ...(await plan()) };
      rounded.outputs = rounded.outputs.map((o) => ({ ...o, delayMs: 0 }));
      const pl = await plotted();
      const sum = pl.magnitude.find((c) => c.id === 'sum');
      const ref = designedResponse(designPlan(rounded), pl.frequencies, 48000).sum.magnitudeDb;
      sum.y.forEach((y, i) => assert(Math.abs(y - ref[i]) < 1e-9, `board sum at ${pl.frequencies[i]} Hz`));
      await page.getByTestId('exact-delays').check();
      await page.waitForFunction(() => !document.querySelector('[data-testid="delay-note"]'));
      const exact = designedResponse(designPlan(await plan()), pl.frequencies, 48000).sum.magnitudeDb;
      const s2 = (await plotted()).magnitude.find((c) => c.id === 'sum');
      s2.y.forEach((y, i) => assert(Math.abs(y - exact[i]) < 1e-9, `exact sum at ${pl.frequencies[i]} Hz`));
    });

    await check('the band editor: cramping figure, achieved bandwidth, and the design method', async () => {
      await page.getByText('Tweeter', { exact: true }).first().click();
      await page.getByText('16 kHz', { exact: false }).first().click();
      await page.waitForSelector('[data-testid="band-cramping"]');
      const band = (await plan()).outputs[1].bands[0];
      const c = bandCramping(band, 48000);
      const text = await page.getByTestId('band-cramping').innerText();
      assert(text.includes(`${c.deviationDb >= 0 ? '+' : ''}${c.deviationDb.toFixed(2)} dB`), `cramping text ${text}, core ${c.deviationDb}`);
      assert(/digital: /.test(await page.getByTestId('band-bandwidth-achieved').innerText()), 'no achieved bandwidth');
      await page.getByTestId('band-design').selectOption('matched');
      await page.waitForFunction(() => window.__biquadrant.plan().outputs[1].bands[0].design === 'matched');
      const pl = await plotted();
      const ref = designedResponse(designPlan(await plan()), pl.frequencies, 48000).outputs[1].response.magnitudeDb;
      pl.magnitude.find((x) => x.id === 'out:tweeter').y.forEach((y, i) => assert(Math.abs(y - ref[i]) < 1e-9, `matched tweeter at ${pl.frequencies[i]} Hz`));
      await page.screenshot({ path: `${OUT}/cramping-band-editor.png` });
      await page.getByTestId('band-design').selectOption('default');
      await page.waitForFunction(() => window.__biquadrant.plan().outputs[1].bands[0].design === undefined);
    });

    await check('the edge editor states the Bessel delay after the bilinear transform', async () => {
      const note = await page.getByTestId('edge-highPass-delay-note').innerText();
      assert(/0\.7 % short/.test(note), note);
    });

    await check('a sample-rate change that moves a band opens the dialog; Cancel keeps the plan, matched changes it', async () => {
      await page.getByTestId('sample-rate').selectOption('44100');
      await page.waitForSelector('[data-testid="retarget-dialog"]');
      assert((await plan()).sampleRate === 48000, 'rate changed before the choice');
      await page.screenshot({ path: `${OUT}/cramping-rate-dialog.png` });
      await page.getByTestId('retarget-cancel').click();
      assert((await plan()).sampleRate === 48000, 'Cancel changed the rate');
      await page.getByTestId('sample-rate').selectOption('44100');
      await page.getByTestId('retarget-matched').click();
      await page.waitForFunction(() => window.__biquadrant.plan().sampleRate === 44100);
      assert((await plan()).outputs[1].bands[0].design === 'matched', 'the moving band is not matched');
    });

  });
}

await main();
