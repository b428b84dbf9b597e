#!/usr/bin/env node
// The installed command: runs the built command line (out/cli, made by `npm run build:cli`; `npm
// pack` builds it first). No TypeScript is compiled at run time.
import { existsSync } from 'node:fs';

const built = new URL('../out/cli/biquadrant.mjs', import.meta.url);
if (!existsSync(built)) {
  process.stderr.write('biquadrant: the command line is not built yet; run `npm run build:cli` (or use `npm run cli` in a checkout)\n');
  process.exit(2);
}
await import(built.href);
