/**
 * Plan paths given to the app on its command line (`biquadrant plan.bqplan`, a double click on a
 * file on Windows and Linux, or a second launch forwarded by the single-instance lock).
 *
 * Plain Node. Electron's argv holds the executable, in development the app folder, Chromium's
 * own switches, and the user's arguments; only arguments that end in `.bqplan` and are not
 * switches count. Relative paths resolve against the launching shell's working directory.
 */
import { resolve } from 'node:path';
import { isPlanPath } from './files';

export function planPathsFromArgv(argv: readonly string[], workingDirectory: string): string[] {
  const out: string[] = [];
  for (const arg of argv.slice(1)) {
    if (typeof arg !== 'string' || arg.startsWith('-') || arg.includes('\0')) continue;
    if (!isPlanPath(arg)) continue;
    const path = resolve(workingDirectory, arg);
    if (!out.includes(path)) out.push(path);
  }
  return out;
}
