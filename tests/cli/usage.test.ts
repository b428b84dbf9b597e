/**
 * `--version`, `COMMAND --help`, and the installed command as built JavaScript.
 * The README's command table is the contract: each command it lists prints its own usage.
 */
import { spawnSync } from 'node:child_process';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { build } from 'vite';
import { describe, expect, it } from 'vitest';
import { COMMANDS, COMMAND_USAGE, runCli, USAGE } from '../../src/cli/run';

const ROOT = join(__dirname, '..', '..');
const pkg = JSON.parse(readFileSync(join(ROOT, 'package.json'), 'utf8'));
const io = { readText: () => 'not read' };

describe('--version and COMMAND --help', () => {
  it('--version prints the version it is given, exit 0', () => {
    expect(runCli(['--version'], io, { version: '9.8.7' })).toEqual({ code: 0, stdout: 'biquadrant 9.8.7\n', stderr: '' });
  });

  it('every command prints its own usage for --help (or -h) with exit 0, even without its arguments', () => {
    for (const command of Object.keys(COMMANDS)) {
      for (const flag of ['--help', '-h']) {
        const r = runCli([command, flag], io);
        expect(r.code, `${command} ${flag}`).toBe(0);
        expect(r.stderr).toBe('');
        expect(r.stdout.startsWith(`usage: biquadrant ${command}`)).toBe(true);
        expect(r.stdout).toContain(COMMAND_USAGE[command].trim());
        expect(r.stdout).not.toContain('commands:');
      }
    }
    expect(runCli(['export', 'plan.bqplan', '--format', 'c', '--help'], io).code).toBe(0);
  });

  it('the README command table lists commands that exist, each with a usage block', () => {
    const readme = readFileSync(join(ROOT, 'README.md'), 'utf8');
    const listed = [...readme.matchAll(/^\| `([a-z]+) /gm)].map((m) => m[1]);
    expect(listed.length).toBeGreaterThanOrEqual(4);
    for (const c of listed) {
      expect(COMMANDS[c], c).toBeDefined();
      expect(USAGE).toContain(COMMAND_USAGE[c]);
    }
  });

  it('an unknown command is still a usage error (not a property of an object)', () => {
    expect(runCli(['toString'], io).code).toBe(2);
    expect(runCli(['nope', '--help'], io).code).toBe(2);
  });
});

describe('the installed command runs built JavaScript', () => {
  it('package.json: tsx and esbuild are not runtime dependencies; bin/biquadrant.mjs does not load tsx', () => {
    expect(Object.keys(pkg.dependencies ?? {})).not.toContain('tsx');
    expect(Object.keys(pkg.dependencies ?? {})).not.toContain('esbuild');
    expect(readFileSync(join(ROOT, 'bin/biquadrant.mjs'), 'utf8')).not.toMatch(/tsx/);
  });

  it('npm run build:cli gives out/cli/biquadrant.mjs; bin/biquadrant.mjs runs it with plain Node', async () => {
    await build({ configFile: join(ROOT, 'vite.cli.config.ts'), logLevel: 'silent' });
    const bundle = readFileSync(join(ROOT, 'out/cli/biquadrant.mjs'), 'utf8');
    expect(bundle).not.toMatch(/from ["'](tsx|esbuild|complex\.js)/);
    const node = (...args: string[]) => spawnSync(process.execPath, [join(ROOT, 'bin/biquadrant.mjs'), ...args], { cwd: ROOT, encoding: 'utf8' });
    const version = node('--version');
    expect(version.status).toBe(0);
    expect(version.stdout).toBe(`biquadrant ${pkg.version}\n`);
    const check = node('check', 'assets/two-way-monitor.bqplan', '--format', 'json');
    expect(check.status).toBe(0);
    const plan = readFileSync(join(ROOT, 'assets/two-way-monitor.bqplan'), 'utf8');
    expect(check.stdout).toBe(runCli(['check', 'plan', '--format', 'json'], { readText: () => plan }).stdout);
    const help = node('response', '--help');
    expect(help.status).toBe(0);
    expect(help.stdout).toMatch(/^usage: biquadrant response PLAN/);
  }, 60_000);
});
