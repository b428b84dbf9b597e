#!/usr/bin/env node
// `npm start`: build the desktop app and run it in Electron. Arguments after `--` are passed on,
// so `npm start -- assets/two-way-monitor.bqplan` opens that plan.
//
// Electron's npm package ships without its binary: `require('electron')` returns the binary's
// path once it is installed, and otherwise tries to download it (Electron >= 42 fetches it on
// first use, or with `npx install-electron`). Where the download is switched off
// (ELECTRON_SKIP_BINARY_DOWNLOAD) or blocked, this script says so and points to the browser mode.
import { spawn, spawnSync } from 'node:child_process';
import { existsSync } from 'node:fs';
import { createRequire } from 'node:module';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';

const repo = join(dirname(fileURLToPath(import.meta.url)), '..');
const require = createRequire(join(repo, 'package.json'));

function truthy(v) {
  return v !== undefined && v !== '' && v !== '0' && v.toLowerCase() !== 'false';
}

function noBinary(reason) {
  process.stderr.write(
    [
      'Biquadrant: no Electron binary on this machine, so the desktop app cannot start.',
      `  (${reason})`,
      '  On a normal machine Electron downloads its binary on first use (or with `npx install-electron`);',
      '  here ELECTRON_SKIP_BINARY_DOWNLOAD is set or the download is blocked.',
      '',
      '  The same app runs in a browser:  npm run web   then open http://127.0.0.1:5178',
      '',
    ].join('\n'),
  );
  process.exit(1);
}

/** The Electron binary's path, or null with the reason. Never downloads when told not to. */
function findElectron() {
  let pkgDir;
  try {
    pkgDir = dirname(require.resolve('electron/package.json'));
  } catch {
    return { path: null, reason: 'the electron package is not installed: run npm install' };
  }
  // ELECTRON_OVERRIDE_DIST_PATH: a binary unpacked elsewhere (electron's own index.js honours it).
  const installed = existsSync(join(pkgDir, 'path.txt')) || Boolean(process.env.ELECTRON_OVERRIDE_DIST_PATH);
  if (!installed && truthy(process.env.ELECTRON_SKIP_BINARY_DOWNLOAD)) {
    return { path: null, reason: 'ELECTRON_SKIP_BINARY_DOWNLOAD is set and no binary is installed' };
  }
  if (!installed) {
    // What require('electron') would do, but quietly and with a time limit.
    process.stdout.write('Fetching the Electron binary (npx install-electron)...\n');
    const r = spawnSync(process.execPath, [join(pkgDir, 'install.js')], { stdio: ['ignore', 'inherit', 'pipe'], timeout: 10 * 60 * 1000 });
    if (r.status !== 0) {
      const first = String(r.stderr ?? '').split('\n').find((l) => l.trim()) ?? `exit ${r.status ?? r.signal}`;
      return { path: null, reason: `the download failed: ${first.trim()}` };
    }
  }
  let path;
  try {
    path = require('electron');
  } catch (e) {
    return { path: null, reason: `require('electron') failed: ${e instanceof Error ? e.message.split('\n')[0] : String(e)}` };
  }
  if (typeof path !== 'string' || !existsSync(path)) return { path: null, reason: `the binary is missing at ${String(path)}` };
  return { path, reason: '' };
}

const electron = findElectron();
if (!electron.path) noBinary(electron.reason);

const build = spawnSync(process.execPath, [join(repo, 'node_modules', 'electron-vite', 'bin', 'electron-vite.js'), 'build'], {
  cwd: repo,
  stdio: 'inherit',
});
if (build.status !== 0) process.exit(build.status ?? 1);

// `.` runs the package's "main" (out/main/index.js); the rest are the user's arguments.
const child = spawn(electron.path, ['.', ...process.argv.slice(2)], { cwd: repo, stdio: 'inherit' });
for (const signal of ['SIGINT', 'SIGTERM']) process.on(signal, () => child.kill(signal));
child.on('exit', (code, signal) => process.exit(code ?? (signal ? 1 : 0)));
