// End-to-end tests of the plots in headless Chromium (playwright-core), beside run.mjs: a held
// handle stays under the pointer, clipped group-delay peaks are marked, Z-plane and Time zoom,
// legends that hide curves, the phase difference of two outputs, a snapshot drawn as ghosts, the
// sum beneath a lone output, band curves on request, and the Export view's columns at 1280 px.
// Plotted values are compared with the core's designedResponse computed here in Node (same code
// path: the tolerance is floating-point noise). Screenshots at 1440x900, 1280x720 and 900x600 go
// to test-results/. Exits non-zero on any failure; the last line reads `e2e plots: N passed, M failed`.
import { mkdirSync, readFileSync } from 'node:fs';
import { register } from 'tsx/esm/api';
import { browserChecks, root, assert, checkRunner } from './serve.mjs';
import { openPlanText } from './bench-ui.mjs';

register();
const { designPlan } = await import('../../src/design/chain.ts');
const { designedResponse, wrapPi } = await import('../../src/response/chain-response.ts');

const OUT = `${root}/test-results`;
mkdirSync(OUT, { recursive: true });

const tally = checkRunner();
const check = tally.check;

const DEG = 180 / Math.PI;

/** An invented scenario: one output with two overlapping boosts, so the curve under band 1 rises as it nears band 2. */
function overlappingPlan() {
  return {
    format: 'biquadrant.plan',
    version: 1,
    name: 'Overlapping boosts (invented)',
    sampleRate: 48000,
    input: { bands: [] },
    outputs: [
      {
        id: 'full',
        name: 'Full range',
        gainDb: -12,
        delayMs: 0,
        invert: false,
        mute: false,
        highPass: null,
        lowPass: null,
        bands: [
          { id: 'b1', type: 'peaking', frequency: 400, gainDb: 3, q: 1.4, enabled: true },
          { id: 'b2', type: 'peaking', frequency: 1200, gainDb: 9, q: 1.2, enabled: true },
        ],
      },
    ],
  };
}

async function main() {
  await browserChecks(tally, 'e2e plots', { viewport: { width: 1280, height: 720 } }, async ({ page, browser, server, errors }) => {
    const hook = (fn, arg) => page.evaluate(fn, arg);
    const plan = () => hook(() => window.__biquadrant.plan());
    const plotted = () => hook(() => window.__biquadrant.plotted());
    const core = (p, freqs) => designedResponse(designPlan(p), freqs, p.sampleRate);

    await page.goto(server.url);
    await page.waitForFunction(() => window.__biquadrant?.plotted()?.magnitude.length > 0);

    for (const [w, h] of [
      [1440, 900],
      [1280, 720],
      [900, 600],
    ]) {
      await page.setViewportSize({ width: w, height: h });
      await page.waitForTimeout(250);
      await page.screenshot({ path: `${OUT}/plots-response-${w}x${h}.png` });
    }
    await page.setViewportSize({ width: 1280, height: 720 });
    await page.waitForTimeout(200);

    await check('the sum is painted beneath the outputs, so a lone output stays visible', async () => {
      await page.locator('[data-testid="output-row"]').nth(1).getByRole('button', { name: 'M', exact: true }).click();
      await page.waitForTimeout(100);
      const pl = await plotted();
      for (const kind of ['magnitude', 'phase', 'groupDelay']) {
        const ids = pl[kind].filter((c) => c.layer === 'base').map((c) => c.id);
        assert(ids.indexOf('sum') >= 0 && ids.indexOf('sum') < ids.indexOf('out:woofer'), `${kind} paint order ${ids.join(', ')}`);
      }
      const sum = pl.magnitude.find((c) => c.id === 'sum').y;
      const woofer = pl.magnitude.find((c) => c.id === 'out:woofer').y;
      assert(sum.every((v, i) => Math.abs(v - woofer[i]) < 1e-9), 'with the tweeter muted the sum is the woofer');
      await page.screenshot({ path: `${OUT}/plots-lone-output.png` });
      await page.locator('[data-testid="output-row"]').nth(1).getByRole('button', { name: 'M', exact: true }).click();
    });

    await check('a legend entry hides its curve and shows it again', async () => {
      const key = page.locator('[data-testid="legend-key"][data-curve="out:woofer"]');
      await key.click();
      let pl = await plotted();
      assert(!pl.magnitude.some((c) => c.id === 'out:woofer') && !pl.phase.some((c) => c.id === 'out:woofer'), 'woofer still drawn');
      assert((await key.getAttribute('aria-pressed')) === 'false', 'legend entry not marked off');
      await key.click();
      pl = await plotted();
      assert(pl.magnitude.some((c) => c.id === 'out:woofer'), 'woofer not back');
    });

    await check('group-delay peaks beyond the axis are marked and can be shown in full', async () => {
      let pl = await plotted();
      assert(pl.groupDelayClipped.length > 0, 'the demo room-mode cut clips no peak?');
      const note = page.getByTestId('gd-clipped');
      assert(/beyond the axis/.test(await note.innerText()), `note: ${await note.innerText()}`);
      // Each mark stands for a real value of that curve beyond the range (the core's group delay there).
      const p = await plan();
      const c = core(p, pl.frequencies);
      for (const m of pl.groupDelayClipped) {
        const ref = m.id === 'sum' ? c.sum : c.outputs.find((o) => `out:${o.id}` === m.id)?.response;
        if (!ref) continue;
        const i = pl.frequencies.indexOf(m.frequency);
        assert(Math.abs(ref.groupDelayMs[i] - m.value) < 1e-6, `${m.id} clipped value ${m.value} vs core ${ref.groupDelayMs[i]}`);
      }
      await page.getByTestId('gd-full').click();
      pl = await plotted();
      assert(pl.groupDelayClipped.length === 0, `${pl.groupDelayClipped.length} peaks still clipped with the full range`);
      await page.getByTestId('gd-robust').click();
      pl = await plotted();
      assert(pl.groupDelayClipped.length > 0, 'back to the robust range');
    });

    await check('the phase difference of two chosen outputs is drawn as the core computes it', async () => {
      await page.getByTestId('phase-pair-a').selectOption('woofer');
      await page.getByTestId('phase-pair-b').selectOption('tweeter');
      const p = await plan();
      for (const mode of ['wrapped', 'unwrapped']) {
        await page.getByTestId('phase-mode').selectOption(mode);
        const pl = await plotted();
        const diff = pl.phase.find((c) => c.id === 'phase-difference');
        assert(diff, 'no phase-difference curve');
        assert(!pl.magnitude.some((c) => c.id === 'phase-difference'), 'phase difference on the magnitude plot');
        const c = core(p, pl.frequencies);
        const [w, t] = ['woofer', 'tweeter'].map((id) => c.outputs.find((o) => o.id === id).response);
        for (let i = 0; i < pl.frequencies.length; i++) {
          const want = mode === 'wrapped' ? wrapPi(w.phaseRad[i] - t.phaseRad[i]) * DEG : (w.phaseUnwrappedRad[i] - t.phaseUnwrappedRad[i]) * DEG;
          let d = Math.abs(diff.y[i] - want);
          if (mode === 'wrapped') d = Math.min(d, Math.abs(360 - d));
          assert(d < 1e-6, `${mode} at ${pl.frequencies[i].toFixed(1)} Hz: plotted ${diff.y[i]}, core ${want}`);
        }
        // LR4 outputs are in phase at the crossover (Linkwitz 1976): the difference near 2.2 kHz is about 0.
        const k = pl.frequencies.findIndex((f) => f >= 2200);
        const atCrossover = ((((diff.y[k] + 180) % 360) + 360) % 360) - 180;
        assert(Math.abs(atCrossover) < 5, `difference at 2.2 kHz ${diff.y[k]}`);
      }
      await page.getByTestId('phase-mode').selectOption('wrapped');
      await page.screenshot({ path: `${OUT}/plots-phase-difference.png` });
      await page.getByTestId('phase-pair-a').selectOption('');
      assert(!(await plotted()).phase.some((c) => c.id === 'phase-difference'), 'difference stays after clearing the pair');
    });

    await check('a snapshot is drawn as ghosts beneath the live curves while editing, cleared with one click', async () => {
      const before = await plan();
      await page.getByTestId('snapshot-take').click();
      await page.getByTestId('chain-input').click();
      await page.getByTestId('band-row').nth(1).click();
      const g = page.getByTestId('band-gain');
      await g.fill('+4 dB');
      await g.press('Enter');
      const after = await plan();
      assert(JSON.stringify(after) !== JSON.stringify(before), 'edit not applied');
      const pl = await plotted();
      const ghost = pl.magnitude.find((c) => c.id === 'ghost:sum');
      const live = pl.magnitude.find((c) => c.id === 'sum');
      assert(ghost && ghost.style === 'ghost', 'no ghost sum');
      const ids = pl.magnitude.map((c) => c.id);
      assert(ids.indexOf('ghost:sum') < ids.indexOf('sum'), `ghost painted above the live sum: ${ids.join(', ')}`);
      const old = core(before, pl.frequencies).sum.magnitudeDb;
      let moved = 0;
      for (let i = 0; i < old.length; i++) {
        assert(Math.abs(ghost.y[i] - old[i]) < 1e-6, `ghost at ${pl.frequencies[i]} Hz: ${ghost.y[i]} vs the snapshot plan's ${old[i]}`);
        moved = Math.max(moved, Math.abs(live.y[i] - ghost.y[i]));
      }
      assert(moved > 3, `live sum and ghost differ by at most ${moved} dB after an 8.5 dB change`);
      assert(pl.groupDelay.some((c) => c.id === 'ghost:sum') && pl.phase.some((c) => c.id === 'ghost:out:woofer'), 'ghosts missing on the phase or group-delay plot');
      await page.screenshot({ path: `${OUT}/plots-snapshot.png` });
      await page.getByTestId('snapshot-clear').click();
      const cleared = await plotted();
      assert(!['magnitude', 'phase', 'groupDelay'].some((k) => cleared[k].some((c) => c.style === 'ghost')), 'ghosts stay after Clear');
      await page.keyboard.press('Control+z');
    });

    await check('band curves, when asked for, are drawn clearly for every enabled band of the chain', async () => {
      await page.getByTestId('band-curves').check();
      const pl = await plotted();
      const bands = pl.magnitude.filter((c) => c.id.startsWith('band:'));
      const p = await plan();
      assert(bands.length === p.input.bands.filter((b) => b.enabled).length, `${bands.length} band curves`);
      for (const b of bands) {
        const alpha = /^#[0-9a-f]{8}$/i.test(b.color) ? parseInt(b.color.slice(7), 16) / 255 : 1;
        assert(alpha >= 0.65 && b.width >= 1.25, `band curve ${b.id} faint: ${b.color} width ${b.width}`);
      }
      assert(!pl.phase.some((c) => c.id.startsWith('band:')), 'band curves belong to the magnitude plot');
      await page.screenshot({ path: `${OUT}/plots-band-curves.png` });
      await page.getByTestId('band-curves').uncheck();
    });

    await check('a held handle stays under the pointer while its band passes a neighbour', async () => {
      page.once('dialog', (d) => d.accept());
      await openPlanText(page, 'overlap.bqplan', JSON.stringify(overlappingPlan()));
      await page.waitForFunction(() => window.__biquadrant.plan().outputs[0].id === 'full');
      await page.getByTestId('band-row').nth(0).click();
      await page.waitForTimeout(150);
      const h = await hook(() => window.__biquadrant.handle('b1'));
      assert(h, 'handle b1 not on the plot');
      await page.mouse.move(h.x, h.y);
      await page.mouse.down();
      let worst = 0;
      let curveGap = 0;
      for (let i = 1; i <= 16; i++) {
        const at = { x: h.x + 9 * i, y: h.y - 1.5 * i };
        await page.mouse.move(at.x, at.y);
        const now = await hook(() => window.__biquadrant.handle('b1'));
        worst = Math.max(worst, Math.hypot(now.x - at.x, now.y - at.y));
        // How far the curve under the band is from the handle (what a handle on the curve would jump by).
        const pl = await plotted();
        const p = await plan();
        const b = p.outputs[0].bands[0];
        const c = core(p, pl.frequencies).outputs[0].response.magnitudeDb;
        const k = pl.frequencies.findIndex((f) => f >= b.frequency);
        const onCurve = await hook(({ f, db }) => window.__biquadrant.magnitudePoint(f, db), { f: b.frequency, db: c[k] });
        curveGap = Math.max(curveGap, Math.abs(onCurve.y - now.y));
      }
      await page.mouse.up();
      assert(worst <= 2.5, `the handle strayed ${worst.toFixed(1)} px from the pointer`);
      assert(curveGap > 10, `the neighbour moved the curve only ${curveGap.toFixed(1)} px: the test does not exercise the jump`);
      const b = (await plan()).outputs[0].bands[0];
      assert(b.frequency > 500 && b.gainDb > 3, `band after the drag ${JSON.stringify(b)}`);
      await page.keyboard.press('Control+z');
    });

    await check("a handle's tooltip names its band in words (number, type, values), never a letter code", async () => {
      const h = await hook(() => window.__biquadrant.handle('b1'));
      assert(h, 'handle b1 not on the plot');
      await page.mouse.move(h.x + 40, h.y + 40);
      await page.mouse.move(h.x, h.y);
      const title = await page.getByTestId('plot-magnitude').getAttribute('title');
      const b = (await plan()).outputs[0].bands[0];
      assert(b.type === 'peaking', `band b1 is ${b.type}`);
      assert(/^1 · Peaking · /.test(title ?? ''), `tooltip: ${title}`);
      assert(/ dB/.test(title) && /Q /.test(title), `tooltip lacks gain or Q: ${title}`);
      await page.mouse.move(h.x + 200, h.y + 120);
      const away = await page.getByTestId('plot-magnitude').getAttribute('title');
      assert(!away, `tooltip stays off the handle: ${away}`);
    });

    await check('the Z-plane zooms with the wheel and to the roots near z = 1', async () => {
      page.once('dialog', (d) => d.accept());
      await openPlanText(page, 'two-way.bqplan', readFileSync(`${root}/assets/two-way-monitor.bqplan`, 'utf8'));
      await page.waitForFunction(() => window.__biquadrant.plan().outputs.length === 2);
      await page.getByTestId('chain-input').click();
      await page.getByTestId('view-zplane').click();
      await page.waitForTimeout(200);
      const w0 = await hook(() => window.__biquadrant.zplaneWindow());
      const box = await page.getByTestId('zplane-plot').boundingBox();
      await page.mouse.move(box.x + box.width * 0.75, box.y + box.height * 0.5);
      await page.mouse.wheel(0, -400);
      const w1 = await hook(() => window.__biquadrant.zplaneWindow());
      assert(w1.x[1] - w1.x[0] < 0.7 * (w0.x[1] - w0.x[0]), `wheel did not zoom: ${JSON.stringify(w0)} -> ${JSON.stringify(w1)}`);
      assert(Math.abs(w1.x[1] - w1.x[0] - (w1.y[1] - w1.y[0])) < 1e-9, 'zoomed window not square');
      await page.getByTestId('zplane-near-one').click();
      const w2 = await hook(() => window.__biquadrant.zplaneWindow());
      // The 32 Hz high-pass at 48 kHz has poles about 0.003 from z = 1 (radius 0.99704 in the table).
      assert(w2.x[0] < 1 && w2.x[1] > 1 && w2.x[1] - w2.x[0] < 0.05, `around z = 1: ${JSON.stringify(w2)}`);
      await page.screenshot({ path: `${OUT}/plots-zplane-near-one.png` });
      await page.mouse.dblclick(box.x + box.width * 0.5, box.y + box.height * 0.5);
      const w3 = await hook(() => window.__biquadrant.zplaneWindow());
      assert(JSON.stringify(w3) === JSON.stringify(w0), `double-click did not reset: ${JSON.stringify(w3)}`);
    });

    await check('the Time view has a legend that hides curves and a zoomable time axis', async () => {
      await page.getByTestId('view-time').click();
      await page.waitForTimeout(200);
      const legend = await page.getByTestId('time-legend').innerText();
      assert(/Sum/.test(legend) && /Woofer/.test(legend) && /Tweeter/.test(legend), `legend: ${legend}`);
      const windowText = () => page.getByTestId('time-window').innerText();
      assert((await windowText()).startsWith('0.00 – 20.00'), await windowText());
      const box = await page.getByTestId('time-impulse').boundingBox();
      await page.mouse.move(box.x + box.width * 0.2, box.y + box.height * 0.5);
      await page.mouse.wheel(0, -400);
      const zoomed = await windowText();
      const [a, b] = zoomed.split('–').map((s) => parseFloat(s));
      assert(b - a < 12, `time window after zoom: ${zoomed}`);
      await page.locator('[data-testid="time-legend"] [data-curve="out:tweeter"]').click();
      assert((await page.locator('[data-testid="time-legend"] [data-curve="out:tweeter"]').getAttribute('aria-pressed')) === 'false', 'tweeter not hidden');
      await page.screenshot({ path: `${OUT}/plots-time-zoom.png` });
      await page.locator('[data-testid="time-legend"] [data-curve="out:tweeter"]').click();
      await page.mouse.dblclick(box.x + box.width * 0.5, box.y + box.height * 0.5);
      assert((await windowText()).startsWith('0.00 – 20.00'), `reset: ${await windowText()}`);
    });

    await check('the Export view fits 1280 px: no sideways scroll, no clipped preview lines', async () => {
      await page.getByTestId('view-export').click();
      await page.waitForTimeout(300);
      for (const [w, h] of [
        [1440, 900],
        [1280, 720],
      ]) {
        await page.setViewportSize({ width: w, height: h });
        await page.waitForTimeout(250);
        const over = await hook(() => {
          const out = [];
          if (document.documentElement.scrollWidth > window.innerWidth) out.push(`page ${document.documentElement.scrollWidth}`);
          for (const el of document.querySelectorAll('.export *')) {
            const s = getComputedStyle(el);
            if (el.scrollWidth > el.clientWidth + 1 && (s.overflowX === 'auto' || s.overflowX === 'scroll') && el.clientWidth > 0) out.push(`${el.tagName}.${el.className} ${el.scrollWidth}>${el.clientWidth}`);
          }
          return out;
        });
        assert(over.length === 0, `at ${w} px: ${over.join('; ')}`);
        await page.screenshot({ path: `${OUT}/plots-export-${w}x${h}.png` });
      }
      await page.setViewportSize({ width: 900, height: 600 });
      await page.waitForTimeout(250);
      await page.screenshot({ path: `${OUT}/plots-export-900x600.png` });
      await page.setViewportSize({ width: 1280, height: 720 });
      await page.getByTestId('view-response').click();
    });

  });
}

await main();
