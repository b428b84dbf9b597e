// End-to-end checks of the app as a practitioner uses it: export names, a new edge matching its
// neighbour, keyboard focus on the plot, comma-grouped numbers, the header at three window
// sizes, the warnings list, Delete in every view, undo to the saved state, a junk file, the band
// glyphs and the section budget on screen. Called by run.mjs (a fresh page per check group);
// `node tests/e2e/practice.mjs` runs them alone. Screenshots go to test-results/.
import { readFileSync } from 'node:fs';
import { assert, root } from './serve.mjs';
import { openPlanText } from './bench-ui.mjs';

const OUT = `${root}/test-results`;
const SIZES = [
  [1440, 900],
  [1280, 720],
  [900, 600],
];


/** Console and page errors of every page these checks open. */
const errors = [];

async function fresh(browser, url, width = 1280, height = 800) {
  const context = await browser.newContext({ viewport: { width, height }, acceptDownloads: true });
  // Without the browser's save dialog, Save is a download the checks can read (as in run.mjs).
  await context.addInitScript(() => Object.defineProperty(window, 'showSaveFilePicker', { value: undefined, configurable: true }));
  const page = await context.newPage();
  page.on('console', (m) => {
    if (m.type() === 'error' || m.type() === 'warning') errors.push(`console ${m.type()}: ${m.text()}`);
  });
  page.on('pageerror', (e) => errors.push(`page error: ${e.message}`));
  await page.goto(url);
  await page.waitForFunction(() => window.__biquadrant?.plotted()?.magnitude.length > 0);
  return { page, context, errors, plan: () => page.evaluate(() => window.__biquadrant.plan()) };
}

export async function practiceChecks(browser, url, check) {
  await check('export name: a new output renamed "Main L" exports as main_l; the name can be set and shows in the preview', async () => {
    const { page, context, plan } = await fresh(browser, url);
    await page.getByTestId('output-add').click();
    const name = page.getByTestId('output-name');
    await name.fill('Main L');
    await name.press('Enter');
    const x = page.getByTestId('output-export-name');
    assert((await x.inputValue()) === 'main_l', `export name ${await x.inputValue()}`);
    assert((await page.getByTestId('output-export-name-source').innerText()).includes('follows the name'), 'source not shown');
    await page.getByTestId('view-export').click();
    const preview = await page.getByTestId('export-preview').innerText();
    assert(/^output main_l$/m.test(preview) && !/output-3|output_3/.test(preview), 'preview does not use the export name');
    await page.getByTestId('export-format').selectOption('c');
    assert((await page.getByTestId('export-preview').innerText()).includes('bq_main_l_sos'), 'C arrays not named by the export name');
    await x.fill('2bad');
    await x.press('Enter');
    assert((await page.getByTestId('output-export-name-error').innerText()).includes('C identifier'), 'bad export name not refused in place');
    await x.fill('HF_left');
    await x.press('Enter');
    assert((await plan()).outputs[2].exportName === 'HF_left', 'export name not set in the plan');
    assert((await page.getByTestId('export-preview').innerText()).includes('bq_hf_left_sos'), 'preview did not follow the set name');
    await page.screenshot({ path: `${OUT}/p01-export-name.png` });
    await context.close();
  });

  await check("a tweeter's new high-pass starts at the woofer's low-pass; the match button says which way it goes", async () => {
    const { page, context, plan } = await fresh(browser, url);
    await page.getByTestId('output-row').nth(1).locator('button.pick').click();
    await page.getByTestId('edge-highPass-on').uncheck();
    await page.getByTestId('edge-highPass-on').check();
    const p = await plan();
    assert(JSON.stringify(p.outputs[1].highPass) === JSON.stringify(p.outputs[0].lowPass), `new high-pass ${JSON.stringify(p.outputs[1].highPass)} vs woofer low-pass ${JSON.stringify(p.outputs[0].lowPass)}`);
    const button = page.getByTestId('edge-highPass-match');
    assert(/Woofer's low-pass edge matches/.test(await button.innerText()), `button: ${await button.innerText()}`);
    await page.getByTestId('edge-highPass-frequency').fill('2.5k');
    await page.getByTestId('edge-highPass-frequency').press('Enter');
    const label = await button.innerText();
    assert(/Copy 2\.5 kHz → Woofer's low-pass edge/.test(label), `button: ${label}`);
    assert(/this edge stays as it is/.test(await button.getAttribute('title')), 'title does not say this edge stays');
    await button.click();
    assert((await plan()).outputs[0].lowPass.frequency === 2500, "the woofer's low-pass did not take 2.5 kHz");
    assert((await plan()).outputs[1].highPass.frequency === 2500, 'this edge changed');
    await context.close();
  });

  await check('a handle click takes keyboard focus; the magnitude plot is reachable with Tab', async () => {
    const { page, context, plan } = await fresh(browser, url);
    await page.getByTestId('chain-input').click();
    await page.getByTestId('band-row').nth(0).click();
    const field = page.getByTestId('band-frequency');
    await field.focus();
    const before = await plan();
    const h = await page.evaluate(() => window.__biquadrant.handle('b2'));
    await page.mouse.click(h.x, h.y);
    await page.keyboard.press('3');
    await page.keyboard.press('ArrowRight');
    const after = await plan();
    assert(after.input.bands[0].frequency === before.input.bands[0].frequency, `the text field's band changed: ${before.input.bands[0].frequency} -> ${after.input.bands[0].frequency}`);
    const focused = await page.evaluate(() => document.activeElement?.getAttribute('data-testid'));
    assert(focused === 'plot-magnitude', `focus on ${focused}`);
    // Tab from the band list reaches the plot.
    await page.getByTestId('band-row').nth(0).focus();
    let reached = false;
    for (let i = 0; i < 60 && !reached; i++) {
      await page.keyboard.press('Tab');
      reached = (await page.evaluate(() => document.activeElement?.getAttribute('data-testid'))) === 'plot-magnitude';
    }
    assert(reached, 'Tab never reached the magnitude plot');
    await page.screenshot({ path: `${OUT}/p02-plot-focus.png` });
    await context.close();
  });

  await check('"1,500" in a frequency field is refused with a hint, never read as 1.5 Hz', async () => {
    const { page, context, plan } = await fresh(browser, url);
    await page.getByTestId('chain-input').click();
    await page.getByTestId('band-row').nth(0).click();
    const before = await plan();
    const f = page.getByTestId('band-frequency');
    await f.fill('1,500');
    await f.press('Enter');
    const err = await page.getByTestId('band-frequency-error').innerText();
    assert(/could be 1500 or 1\.500/.test(err), `hint: ${err}`);
    assert(JSON.stringify(await plan()) === JSON.stringify(before), 'plan changed');
    await f.fill('1,500.0');
    await f.press('Enter');
    assert((await plan()).input.bands[0].frequency === 1500, 'an unambiguous group is 1500');
    await context.close();
  });

  await check('a refused custom sample rate does not survive opening another plan', async () => {
    const { page, context } = await fresh(browser, url);
    await page.getByTestId('sample-rate').selectOption('custom');
    const c = page.getByTestId('sample-rate-custom');
    await c.fill('7k');
    await c.press('Enter');
    await page.getByTestId('sample-rate-custom-error').waitFor();
    page.once('dialog', (d) => d.accept());
    await openPlanText(page, 'three-way-hall.bqplan', readFileSync(`${root}/assets/three-way-hall.bqplan`, 'utf8'));
    await page.waitForFunction(() => window.__biquadrant.plan().outputs.length === 4);
    assert((await page.getByTestId('sample-rate-custom').count()) === 0, 'custom editor still open after opening another plan');
    assert((await page.getByTestId('sample-rate-custom-error').count()) === 0, 'refusal still shown');
    assert((await page.getByTestId('sample-rate').inputValue()) === '96000', 'the list does not show the opened plan rate (96 kHz)');
    await context.close();
  });

  await check('header: one line and the plan name uncut at 1440x900, 1280x720 and 900x600 (custom rate open too)', async () => {
    for (const [w, h] of SIZES) {
      const { page, context } = await fresh(browser, url, w, h);
      for (const custom of [false, true]) {
        if (custom) await page.getByTestId('sample-rate').selectOption('custom');
        await page.screenshot({ path: `${OUT}/p03-header-${w}x${h}${custom ? '-custom' : ''}.png` });
        const box = await page.locator('header.top').boundingBox();
        assert(box.height <= 46, `${w}x${h}${custom ? ' custom' : ''}: header ${box.height} px high (more than one line)`);
        const cut = await page.getByTestId('plan-name').evaluate((el) => el.scrollWidth - el.clientWidth);
        assert(cut <= 1, `${w}x${h}${custom ? ' custom' : ''}: the plan name is cut by ${cut} px`);
        const sideways = await page.evaluate(() => document.documentElement.scrollWidth - window.innerWidth);
        assert(sideways <= 0, `${w}x${h}: page scrolls sideways by ${sideways} px`);
      }
      await context.close();
    }
  });

  await check('warnings list: opens only on a click, Escape and a view change close it, and it covers no plot', async () => {
    for (const [w, h] of SIZES) {
      const { page, context } = await fresh(browser, url, w, h);
      await page.getByTestId('output-row').nth(1).locator('button.pick').click();
      await page.getByTestId('edge-highPass-on').uncheck();
      const button = page.getByTestId('warnings-button');
      await button.waitFor();
      assert((await page.getByTestId('warnings-panel').count()) === 0, 'the list opened by itself');
      await button.click();
      const panel = page.getByTestId('warnings-panel');
      await panel.waitFor();
      for (const id of ['plot-magnitude', 'plot-phase', 'plot-groupDelay']) {
        const a = await panel.boundingBox();
        const b = await page.getByTestId(id).boundingBox();
        const overlap = a.y < b.y + b.height && b.y < a.y + a.height && a.x < b.x + b.width && b.x < a.x + a.width;
        assert(!overlap, `${w}x${h}: the warnings list covers ${id}`);
      }
      await page.screenshot({ path: `${OUT}/p04-warnings-${w}x${h}.png` });
      await page.keyboard.press('Escape');
      assert((await page.getByTestId('warnings-panel').count()) === 0, 'Escape did not close it');
      await button.click();
      await panel.waitFor();
      await page.getByTestId('view-zplane').click();
      assert((await page.getByTestId('warnings-panel').count()) === 0, 'a view change did not close it');
      await page.getByTestId('view-response').click();
      assert((await page.getByTestId('warnings-panel').count()) === 0, 'it came back by itself');
      // Warnings gone and back: it stays closed.
      await button.click();
      await page.getByTestId('edge-highPass-on').check();
      await page.getByTestId('edge-highPass-on').uncheck();
      assert((await page.getByTestId('warnings-panel').count()) === 0, 'it came back with the warnings');
      await context.close();
    }
  });

  await check('Delete removes the selected band in the Z-plane, Time and Export views; focus lands on the next band', async () => {
    const { page, context, plan } = await fresh(browser, url);
    await page.getByTestId('chain-input').click();
    for (let i = 0; i < 3; i++) await page.getByTestId('band-add').click();
    for (const v of ['zplane', 'time', 'export']) {
      await page.getByTestId('band-row').nth(0).click();
      const n = (await plan()).input.bands.length;
      const id = (await plan()).input.bands[0].id;
      await page.getByTestId(`view-${v}`).click();
      await page.keyboard.press('Delete');
      await page.getByTestId('view-response').click();
      const p = await plan();
      assert(p.input.bands.length === n - 1 && !p.input.bands.some((b) => b.id === id), `${v}: Delete did not remove the band`);
      await page.waitForTimeout(50);
      const fell = await page.evaluate(() => !document.activeElement || document.activeElement === document.body);
      assert(!fell, `${v}: focus fell to the page after the delete`);
    }
    // The band's own remove button goes away with it: focus must not fall to the page.
    await page.getByTestId('band-row').nth(0).click();
    await page.getByTestId('band-remove').click();
    await page.waitForTimeout(50);
    const focused = await page.evaluate(() => document.activeElement?.getAttribute('data-testid'));
    assert(focused === 'band-row' || focused === 'band-add', `focus on ${focused} after the remove button`);
    await context.close();
  });

  await check('a handle click without a move is no undo step; undo back to the saved plan shows it saved', async () => {
    const { page, context } = await fresh(browser, url);
    await page.getByTestId('chain-input').click();
    const download = page.waitForEvent('download');
    await page.getByTestId('save').click();
    await download;
    assert(!(await page.evaluate(() => window.__biquadrant.dirty())), 'not saved');
    const undoDisabled = await page.getByTestId('undo').isDisabled();
    const h = await page.evaluate(() => window.__biquadrant.handle('b2'));
    await page.mouse.click(h.x, h.y);
    assert(!(await page.evaluate(() => window.__biquadrant.dirty())), 'a click made the plan unsaved');
    assert((await page.getByTestId('undo').isDisabled()) === undoDisabled, 'a click made an undo step');
    await page.keyboard.press('ArrowUp');
    assert(await page.evaluate(() => window.__biquadrant.dirty()), 'a nudge did not mark it unsaved');
    await page.keyboard.press('Control+z');
    assert(!(await page.evaluate(() => window.__biquadrant.dirty())), 'undo back to the saved plan still shows unsaved');
    assert((await page.getByTestId('dirty-mark').count()) === 0, 'unsaved mark after undo to the saved plan');
    await context.close();
  });

  await check("a junk file's bytes never reach the error text", async () => {
    const { page, context } = await fresh(browser, url);
    const png = Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a, 0, 0, 0, 13, 0x49, 0x48, 0x44, 0x52, 0, 0, 1, 0]);
    const chooser = page.waitForEvent('filechooser');
    await page.getByTestId('open').click();
    await (await chooser).setFiles({ name: 'photo.bqplan', mimeType: 'application/octet-stream', buffer: png });
    const notice = page.getByTestId('notice');
    await notice.waitFor();
    const text = await notice.innerText();
    assert(!/[\u0000-\u0008\u000e-\u001f\ufffd]|PNG|IHDR/.test(text), `notice shows the bytes: ${JSON.stringify(text)}`);
    assert(/binary|not valid|not a/.test(text), `notice: ${text}`);
    await page.getByTestId('band-row').nth(0).click();
    const q = page.getByTestId('band-q');
    await q.fill('abc oct');
    await q.press('Enter');
    const err = await page.getByTestId('band-q-error').innerText();
    assert(!/abc/.test(err) && /bandwidth/.test(err), `bandwidth refusal: ${err}`);
    await context.close();
  });

  await check('band list: a drawn glyph per type and the type spelled out, no two-letter codes', async () => {
    const { page, context } = await fresh(browser, url);
    await page.getByTestId('chain-input').click();
    const rows = page.getByTestId('band-row');
    const n = await rows.count();
    assert(n > 0, 'no bands');
    for (let i = 0; i < n; i++) {
      const row = rows.nth(i);
      assert((await row.getByTestId('band-glyph').count()) === 1, `row ${i + 1} has no glyph`);
      const text = await row.innerText();
      assert(!/\b(PK|LS|HS|LP\d?|HP\d?|BP|AP\d?|N)\b/.test(text), `row ${i + 1} shows a code: ${text}`);
      assert(/peaking|shelf|pass|notch|coefficients/.test(text), `row ${i + 1} does not name its type: ${text}`);
    }
    await page.getByTestId('band-list').screenshot({ path: `${OUT}/p05-band-glyphs.png` });
    await context.close();
  });

  await check('section budget: used/allowed per output in the list and the status bar, a warning before Export refuses', async () => {
    for (const [w, h] of SIZES) {
      const { page, context, plan } = await fresh(browser, url, w, h);
      await page.getByTestId('view-export').click();
      await page.getByTestId('export-profile').selectOption('q5.23');
      await page.getByTestId('export-adopt').click();
      const p = await plan();
      assert(p.profile?.sectionBudget === 16, 'profile not kept in the plan');
      const chips = page.getByTestId('output-budget');
      assert((await chips.count()) === p.outputs.length, 'one budget per output');
      const first = await chips.nth(0).innerText();
      assert(/^\d+\/16$/.test(first.trim()), `budget text ${first}`);
      const status = page.getByTestId('status-budget');
      assert(/\/16/.test(await status.innerText()), `status: ${await status.innerText()}`);
      // Cut the budget below the woofer's count: the list and the status bar say Export will refuse.
      const used = Number(first.trim().split('/')[0]);
      const budgetField = page.getByTestId('profile-budget');
      await budgetField.fill(String(used - 1));
      await budgetField.press('Enter');
      await page.waitForFunction((b) => window.__biquadrant.plan().profile.sectionBudget === b, used - 1);
      const over = await status.innerText();
      assert(/Over budget/.test(over) && /Export will refuse/.test(over) && /woofer/.test(over), `status: ${over}`);
      assert((await chips.nth(0).getAttribute('class')).includes('over'), 'the output list does not flag it');
      assert((await page.getByTestId('export-problems').innerText()).includes(`needs ${used} sections`), 'Export does refuse it');
      await page.screenshot({ path: `${OUT}/p06-budget-${w}x${h}.png` });
      await context.close();
    }
  });

  await check('plan sheet: one printed page with the plot, every output in a table, the profile and the caution', async () => {
    const { page, context, plan } = await fresh(browser, url);
    await page.evaluate(() => {
      window.print = () => (window.__printed = (window.__printed ?? 0) + 1);
    });
    await page.getByTestId('more').click();
    await page.getByTestId('plan-sheet-print').click();
    await page.waitForFunction(() => window.__printed === 1);
    await page.emulateMedia({ media: 'print' });
    const sheet = page.getByTestId('plan-sheet');
    assert(await sheet.isVisible(), 'the sheet is not shown in print');
    assert(!(await page.locator('.app').isVisible()), 'the app is printed too');
    const p = await plan();
    const rows = page.getByTestId('plan-sheet-output');
    assert((await rows.count()) === p.outputs.length, 'one table row per output');
    const text = await sheet.innerText();
    for (const o of p.outputs) assert(text.includes(o.name), `${o.name} missing`);
    assert(/Linkwitz-Riley 4th order, 2\.2 kHz/.test(text), 'edges not in the table');
    assert(/peaking, 63 Hz, -4\.5 dB, Q 4/.test(text), 'input chain bands not in the table');
    assert(/Headroom/.test(text) && /Polarity/.test(text) && /Delay/.test(text), 'columns missing');
    assert(/hearing/.test(text) && /regulations/.test(text), 'caution missing');
    assert(/board profile: none chosen/.test(text), 'profile line missing');
    const curves = await page.getByTestId('plan-sheet-plot').locator('path.curve').evaluateAll((ps) => ps.map((e) => e.getAttribute('d')?.length ?? 0));
    assert(curves.length === p.outputs.length + 1 && curves.every((n) => n > 200), `plot curves ${curves}`);
    await page.screenshot({ path: `${OUT}/p07-plan-sheet.png`, fullPage: true });
    const pdf = await page.pdf({ format: 'A4', path: `${OUT}/plan-sheet.pdf` });
    const pages = pdf.toString('latin1').match(/\/Type\s*\/Page(?!s)/g)?.length ?? 0;
    assert(pages === 1, `the PDF has ${pages} pages`);
    await context.close();
  });

  await check('no console or page errors in these pages', async () => {
    assert(errors.length === 0, errors.join('\n'));
  });
}

// Alone: node tests/e2e/practice.mjs (NO_BUILD=1 to reuse dist-web).
if (import.meta.url === `file://${process.argv[1]}`) {
  const { buildWeb, checkRunner, launchBrowser, serveWeb } = await import('./serve.mjs');
  if (!process.env.NO_BUILD) await buildWeb();
  const server = await serveWeb();
  const browser = await launchBrowser();
  const tally = checkRunner();
  try {
    await practiceChecks(browser, server.url, tally.check);
  } finally {
    await browser.close();
    await server.close();
    tally.summary('practice');
  }
}
