/**
 * `export --arrange suggested` with a separate gain: the gain takes back the level the scaling
 * removed, but never past the plan's +/-60 dB output gain (docs/plan-format.md), so the list still
 * imports as a plan; what it cannot take back is noted. Found by the CLI fuzzer (tests/fuzz).
 */
import { describe, expect, it } from 'vitest';
import { runCli, type CliIo } from '../../src/cli/run';
import { readPlanText } from '../../src/plan/read';

const io = (files: Record<string, string>): CliIo => ({ readText: (p) => files[p] });

describe('suggested scaling keeps the make-up gain within +/-60 dB', () => {
  it('an output at +50 dB with a +30 dB peak: gain capped, the shortfall noted, the list imports back', () => {
    const plan = {
      format: 'biquadrant.plan',
      version: 2,
      name: 'loud (invented)',
      sampleRate: 48000,
      input: { bands: [] },
      outputs: [{ id: 'a', gainDb: 50, bands: [{ id: 'p', type: 'peaking', frequency: 1000, gainDb: 30, q: 2 }] }],
    };
    const files = { 'p.bqplan': JSON.stringify(plan) };
    const exp = runCli(['export', 'p.bqplan', '--arrange', 'suggested', '--format', 'csv'], io(files));
    expect(exp.code).toBe(0);
    // +50 dB gain and 30 dB taken out by the scaling: 80 dB wanted, 59.99 dB allowed, 20.01 dB short.
    expect(exp.stderr).toMatch(/leaves the output 20\.01 dB below the design/);
    const imp = runCli(['import', 'l.csv', '--profile', 'float'], io({ 'l.csv': exp.stdout }));
    expect(imp.stderr).toBe('');
    expect(imp.code).toBe(0);
    const back = readPlanText(imp.stdout);
    expect(back.ok).toBe(true);
    if (back.ok) expect(back.plan.outputs[0].gainDb).toBeCloseTo(59.99, 9);
  });
});
