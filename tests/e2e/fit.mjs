// The fit in the app (docs/fitting.md): the Target panel beside the band list, the target drawn
// dashed with its tolerance on the Response plot, Fit in a Web Worker with progress and Cancel,
// the proposal previewed, Accept as one undoable step. Screenshots in test-results/.
import { mkdirSync, readFileSync } from 'node:fs';
import { browserChecks, root, assert, checkRunner } from './serve.mjs';
import { openPlanText } from './bench-ui.mjs';

const OUT = `${root}/test-results`;
mkdirSync(OUT, { recursive: true });
const tally = checkRunner();
const { check } = tally;

await browserChecks(tally, 'fit', { viewport: { width: 1400, height: 900 } }, async ({ page, server }) => {
  await page.goto(server.url);
  await page.waitForFunction(() => window.__biquadrant && window.__biquadrant.plan);
  await openPlanText(page, 'two-way-measured.bqplan', readFileSync(`${root}/assets/two-way-measured.bqplan`, 'utf8'));
  await page.waitForFunction(() => window.__biquadrant.plan().name.includes('measured'));
  const bands = () => page.evaluate(() => window.__biquadrant.plan().outputs[0].bands.map((b) => ({ id: b.id, type: b.type, fitted: b.fitted === true, gainDb: b.gainDb })));
  const plottedIds = () => page.evaluate(() => window.__biquadrant.plotted().magnitude.map((s) => s.id));

  await check('the Target panel sits with the chain; a target set there is stored in the plan and drawn dashed with its tolerance', async () => {
    await page.getByTestId('output-row').first().locator('button.pick').click();
    const panel = page.getByTestId('target-panel');
    await panel.waitFor();
    await page.getByTestId('target-from').fill('40');
    await page.getByTestId('target-from').press('Enter');
    await page.getByTestId('target-to').fill('2000');
    await page.getByTestId('target-to').press('Enter');
    await page.waitForFunction(() => (window.__biquadrant.plan().targets ?? []).length === 1);
    const t = await page.evaluate(() => window.__biquadrant.plan().targets[0]);
    assert(t.scope === 'output' && t.fromHz === 40 && t.toHz === 2000, `stored target ${JSON.stringify(t)}`);
    await page.waitForFunction(() => window.__biquadrant.plotted().magnitude.some((s) => s.id === 'target'));
    const ids = await plottedIds();
    assert(ids.includes('target-low') && ids.includes('target-high'), `tolerance curves missing: ${ids}`);
    await page.screenshot({ path: `${OUT}/fit-1-target.png` });
    // Its legend entry hides the target and its tolerance together, and shows them again.
    const key = page.locator('[data-testid="legend-key"][data-curve="target"]');
    await key.click();
    await page.waitForFunction(() => !window.__biquadrant.plotted().magnitude.some((s) => s.id.startsWith('target')));
    await key.click();
    await page.waitForFunction(() => window.__biquadrant.plotted().magnitude.filter((s) => s.id.startsWith('target')).length === 3);
  });

  await check('Fit runs off the main thread with progress; Cancel leaves the plan untouched', async () => {
    const before = await page.evaluate(() => JSON.stringify(window.__biquadrant.plan()));
    await page.getByTestId('fit-bands').fill('40');
    await page.getByTestId('fit-bands').press('Enter');
    await page.getByTestId('target-to').fill('18000');
    await page.getByTestId('target-to').press('Enter');
    const mid = await page.evaluate(() => JSON.stringify(window.__biquadrant.plan()));
    await page.getByTestId('fit-run').click();
    await page.getByTestId('fit-progress').waitFor({ timeout: 5000 });
    // The page answers while the worker runs: a frame is painted within a second.
    const t0 = Date.now();
    await page.evaluate(() => new Promise((r) => requestAnimationFrame(() => r(null))));
    assert(Date.now() - t0 < 1000, 'the page did not paint while the fit ran');
    await page.getByTestId('fit-cancel').click();
    await page.getByTestId('fit-run').waitFor();
    assert((await page.getByTestId('fit-proposal').count()) === 0, 'a cancelled fit left a proposal');
    const after = await page.evaluate(() => JSON.stringify(window.__biquadrant.plan()));
    assert(after === mid && before !== mid, 'cancel changed the plan');
    await page.getByTestId('target-to').fill('2000');
    await page.getByTestId('target-to').press('Enter');
    await page.getByTestId('fit-bands').fill('4');
    await page.getByTestId('fit-bands').press('Enter');
  });

  await check('Fit proposes bands, previewed on the plot; Accept adds them as one undoable step', async () => {
    const start = await bands();
    await page.getByTestId('fit-run').click();
    await page.getByTestId('fit-proposal').waitFor({ timeout: 60000 });
    await page.waitForFunction(() => window.__biquadrant.plotted().magnitude.some((s) => s.id === 'fit-proposal' || s.id === 'fit-preview'));
    assert(JSON.stringify(await bands()) === JSON.stringify(start), 'the proposal changed the plan before Accept');
    await page.screenshot({ path: `${OUT}/fit-2-proposal.png` });
    await page.getByTestId('fit-accept').click();
    await page.waitForFunction(() => window.__biquadrant.plan().outputs[0].bands.some((b) => b.fitted === true));
    const added = (await bands()).filter((b) => b.fitted);
    assert(added.length >= 1 && added.length <= 4, `fitted bands ${JSON.stringify(added)}`);
    assert(added.every((b) => b.gainDb <= 6), 'a band boosts above 6 dB');
    await page.screenshot({ path: `${OUT}/fit-3-accepted.png` });
    await page.keyboard.press('Control+z');
    await page.waitForFunction(() => !window.__biquadrant.plan().outputs[0].bands.some((b) => b.fitted === true));
    await page.keyboard.press('Control+Shift+z');
    await page.waitForFunction(() => window.__biquadrant.plan().outputs[0].bands.some((b) => b.fitted === true));
  });

  await check('Shelves at the range ends: the proposal may use a low and a high shelf besides peaking bands', async () => {
    await page.keyboard.press('Control+z');
    await page.waitForFunction(() => !window.__biquadrant.plan().outputs[0].bands.some((b) => b.fitted === true));
    await page.getByTestId('fit-shelves').check();
    await page.getByTestId('fit-run').click();
    await page.getByTestId('fit-proposal').waitFor({ timeout: 60000 });
    await page.getByTestId('fit-accept').click();
    await page.waitForFunction(() => window.__biquadrant.plan().outputs[0].bands.some((b) => b.fitted === true));
    const added = (await bands()).filter((b) => b.fitted);
    const types = added.map((b) => b.type);
    assert(types.includes('lowShelf') || types.includes('highShelf'), `no shelf among the fitted bands: ${types}`);
    assert(added.length <= 4 && added.every((b) => b.gainDb <= 6), `limits not kept: ${JSON.stringify(added)}`);
    await page.keyboard.press('Control+z');
    await page.waitForFunction(() => !window.__biquadrant.plan().outputs[0].bands.some((b) => b.fitted === true));
    await page.getByTestId('fit-shelves').uncheck();
  });

  await check('a breakpoint target: its points are handles on the plot; a drag moves one, one undo puts it back', async () => {
    await page.getByTestId('target-kind').selectOption('points');
    await page.waitForFunction(() => window.__biquadrant.plan().targets[0].parts[0].kind === 'points');
    const id = '\u0001target:2';
    await page.waitForFunction((h) => window.__biquadrant.plotted().handles.some((x) => x.id === h), id);
    const before = await page.evaluate(() => window.__biquadrant.plan().targets[0].parts[0].points[2]);
    const h = await page.evaluate((x) => window.__biquadrant.handle(x), id);
    assert(h, 'no handle for the breakpoint');
    await page.mouse.move(h.x, h.y);
    await page.mouse.down();
    for (let k = 1; k <= 8; k++) await page.mouse.move(h.x + 3 * k, h.y - 5 * k);
    await page.mouse.up();
    const after = await page.evaluate(() => window.__biquadrant.plan().targets[0].parts[0].points[2]);
    assert(after[1] > before[1] + 1 && after[0] > before[0], `the point did not move up and right: ${before} -> ${after}`);
    await page.screenshot({ path: `${OUT}/fit-4-breakpoints.png` });
    await page.keyboard.press('Control+z');
    await page.waitForFunction((b) => JSON.stringify(window.__biquadrant.plan().targets[0].parts[0].points[2]) === JSON.stringify(b), before);
  });
});
