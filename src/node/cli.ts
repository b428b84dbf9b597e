/** Node adapter of the command line: process.argv and the file system in, stdout/stderr and the exit code out. */
import { readFileSync } from 'node:fs';
import { runCli } from '../cli/run';

const result = runCli(process.argv.slice(2), {
  readText: (path) => readFileSync(path, 'utf8'),
  readBytes: (path) => new Uint8Array(readFileSync(path)),
});
if (result.stdout) process.stdout.write(result.stdout);
if (result.stderr) process.stderr.write(result.stderr);
process.exitCode = result.code;
