/** Node adapter of the command line: process.argv and the file system in, stdout/stderr and the exit code out. */
import { readFileSync } from 'node:fs';
import { runCli } from '../cli/run';

/**
 * The package's version, from package.json two folders up: from src/node/ under tsx, from
 * out/cli/ when built.
 */
function packageVersion(): string {
  try {
    const pkg = JSON.parse(readFileSync(new URL('../../package.json', import.meta.url), 'utf8')) as { version?: unknown };
    return typeof pkg.version === 'string' ? pkg.version : 'unknown';
  } catch {
    return 'unknown';
  }
}

const result = runCli(
  process.argv.slice(2),
  {
    readText: (path) => readFileSync(path, 'utf8'),
    readBytes: (path) => new Uint8Array(readFileSync(path)),
  },
  { version: packageVersion() },
);
if (result.stdout) process.stdout.write(result.stdout);
if (result.stderr) process.stderr.write(result.stderr);
process.exitCode = result.code;
