#!/usr/bin/env node
// The installed command: runs the TypeScript command line through tsx, so no build step is needed.
import { register } from 'tsx/esm/api';

register();
await import('../src/node/cli.ts');
