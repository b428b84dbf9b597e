// Builds the web renderer (unless told not to) and serves dist-web on 127.0.0.1 with Vite's
// preview server on a free port; launches Debian's Chromium through playwright-core.
import { fileURLToPath } from 'node:url';
import { build, preview } from 'vite';
import { chromium } from 'playwright-core';

export const root = fileURLToPath(new URL('../..', import.meta.url));
const configFile = fileURLToPath(new URL('../../vite.web.config.ts', import.meta.url));

/** Builds the web app with the test hook in (renderer/src/lib/test-hook.ts): a release build has none. */
export async function buildWeb() {
  process.env.VITE_TEST_HOOK = '1';
  await build({ configFile, logLevel: 'warn' });
}

/** Starts the preview server; returns { url, close }. */
export async function serveWeb() {
  const server = await preview({ configFile, logLevel: 'warn', preview: { host: '127.0.0.1', port: 0, strictPort: false } });
  const address = server.httpServer.address();
  const url = `http://127.0.0.1:${address.port}/`;
  return { url, close: () => new Promise((r) => server.httpServer.close(() => r())) };
}

export const CHROMIUM_ARGS = [
  '--headless',
  '--no-sandbox',
  '--disable-gpu',
  '--disable-quic',
  '--no-first-run',
  '--disable-background-networking',
  '--disable-component-update',
  '--disable-sync',
];

export async function launchBrowser() {
  return chromium.launch({ executablePath: process.env.CHROMIUM || '/usr/bin/chromium', args: CHROMIUM_ARGS, headless: true });
}

/**
 * A tally of named browser checks: `check(name, fn)` runs one and prints ok or FAIL with the
 * error; `fail(e)` counts a failure outside a check (setup); `summary(label)` prints
 * "LABEL: N passed, N failed" and sets the exit code. `only` runs just the checks whose name holds it.
 */
export function checkRunner(only = process.env.ONLY) {
  let passed = 0;
  let failed = 0;
  return {
    async check(name, fn) {
      if (only && !name.includes(only)) return;
      try {
        await fn();
        passed++;
        console.log(`  ok   ${name}`);
      } catch (e) {
        failed++;
        console.log(`  FAIL ${name}\n       ${(e && e.stack) || e}`);
      }
    },
    fail(e) {
      failed++;
      console.log(`  FAIL setup\n       ${(e && e.stack) || e}`);
    },
    summary(label) {
      console.log(`${label}: ${passed} passed, ${failed} failed`);
      process.exitCode = failed > 0 ? 1 : 0;
    },
  };
}

/** Throws with `message` unless `cond` holds. */
export function assert(cond, message) {
  if (!cond) throw new Error(message);
}

/**
 * One browser session of checks, as every browser test file runs them: builds the app (unless
 * NO_BUILD), serves it, opens a page (`context` options: viewport and the like; `init(context)`
 * may add scripts before it opens) that records console errors and warnings and page errors,
 * runs `body({ page, context, browser, server, errors })`, checks that nothing was recorded, closes all and
 * prints `tally.summary(label)`.
 */
export async function browserChecks(tally, label, context, body, init = async () => {}) {
  let server;
  let browser;
  try {
    if (!process.env.NO_BUILD) await buildWeb();
    server = await serveWeb();
    browser = await launchBrowser();
    const ctx = await browser.newContext(context);
    await init(ctx);
    const page = await ctx.newPage();
    const errors = [];
    page.on('console', (m) => {
      if (m.type() === 'error' || m.type() === 'warning') errors.push(`console ${m.type()}: ${m.text()}`);
    });
    page.on('pageerror', (e) => errors.push(`page error: ${e.message}`));
    await body({ page, context: ctx, browser, server, errors });
    await tally.check('no console errors or warnings, no page errors', async () => assert(errors.length === 0, errors.join('\n')));
  } catch (e) {
    tally.fail(e);
  } finally {
    await browser?.close();
    await server?.close();
    tally.summary(label);
  }
}
