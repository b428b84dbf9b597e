/**
 * A profile file (`export --profile FILE`) with a bare NaN or Infinity: not JSON (RFC 8259,
 * section 6), and the command line (README, "Exit codes") exits 1 with a one-line message naming
 * the file and the field path.
 */
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import { runCli, type CliIo } from '../../src/cli/run';

const PLAN = fileURLToPath(new URL('../../assets/two-way-monitor.bqplan', import.meta.url));

function io(extra: Record<string, string>): CliIo {
  return { readText: (path) => (path in extra ? extra[path] : readFileSync(path, 'utf8')) };
}

describe('export --profile FILE with a bare non-finite number', () => {
  for (const token of ['NaN', 'Infinity', '-Infinity']) {
    it(`${token} in number.fractionBits: exit 1, one line naming the file and the path`, () => {
      const text = `{ "sectionBudget": 8, "number": { "kind": "fixed", "integerBits": 2, "fractionBits": ${token}, "wordBits": 32 } }`;
      const r = runCli(['export', PLAN, '--profile', 'board.json'], io({ 'board.json': text }));
      expect(r.code).toBe(1);
      expect(r.stdout).toBe('');
      const lines = r.stderr.trim().split('\n');
      expect(lines).toHaveLength(1);
      expect(lines[0]).toContain('board.json');
      expect(lines[0]).toContain('number.fractionBits');
      expect(lines[0]).toContain(token);
    });
  }
});
