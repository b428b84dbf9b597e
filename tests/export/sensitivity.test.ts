/**
 * Coefficient sensitivity in a board's number format (src/export/sensitivity.ts).
 * References: the pole of a section with poles near z = 1 satisfies (w_p / fs)^2 ~ 1 + a1 + a2
 * (expand |1 - z_p|^2 for z_p = e^{(-sigma + j w) / fs}; exact to first order in w_p / fs), so the
 * held pole frequency follows from the held coefficients by hand; a cookbook high-pass of 20 Hz,
 * Q 0.707 has its poles (mapped by s = fs ln z) at 20 Hz and Q 0.707 to 1e-4 at these rates
 * (the bilinear transform's warping at 20 Hz is (w/2)^2 / 3 ~ 1e-8).
 */
import { describe, expect, it } from 'vitest';
import { readFileSync, readdirSync } from 'node:fs';
import { join } from 'node:path';
import { runCli, type CliIo } from '../../src/cli/run';
import { designBand } from '../../src/design/cookbook';
import { findBuiltInProfile } from '../../src/export/profiles';
import { heldSection, planSensitivity, poleFrequencyAndQ, sectionSensitivity } from '../../src/export/sensitivity';

const hp20 = (fs: number) => ({ ...designBand({ id: 'h', type: 'highPass', frequency: 20, q: 0.707, enabled: true }, fs)[0], from: 'o/h' });

describe('coefficient sensitivity', () => {
  it('the exact poles of a 20 Hz high-pass sit at 20 Hz, Q 0.707', () => {
    for (const fs of [48000, 192000]) {
      const s = hp20(fs);
      const p = poleFrequencyAndQ(s.a1, s.a2, fs);
      expect(p.frequencyHz).toBeCloseTo(20, 3);
      expect(p.q).toBeCloseTo(0.707, 3);
    }
  });

  it('Q5.23 at 192 kHz moves the pole of a 20 Hz high-pass by several per cent (from 1 + a1 + a2 of the held coefficients) and asks for double precision', () => {
    const fs = 192000;
    const q523 = findBuiltInProfile('q5.23')!;
    const s = hp20(fs);
    const held = heldSection(s, q523);
    // One LSB of Q5.23 is 2^-23; every held coefficient is a whole number of them.
    for (const k of ['b0', 'b1', 'b2', 'a1', 'a2'] as const) expect(Number.isInteger(held[k] * 2 ** 23)).toBe(true);
    const byHand = (fs * Math.sqrt(1 + held.a1 + held.a2)) / (2 * Math.PI);
    const r = sectionSensitivity(s, q523, fs);
    expect(r.heldPoleFrequencyHz / byHand).toBeCloseTo(1, 3);
    expect(Math.abs(r.frequencyErrorPercent)).toBeGreaterThan(1);
    expect(r.form).toBe('double-precision');
    // At 48 kHz the same band is held within 1 %, and Q2.30 holds it at 192 kHz: error feedback only (poles at r > 0.999).
    expect(sectionSensitivity(hp20(48000), q523, 48000).form).toBe('direct');
    const q230 = sectionSensitivity(s, findBuiltInProfile('q2.30-halved')!, fs);
    expect(Math.abs(q230.frequencyErrorPercent)).toBeLessThan(0.1);
    expect(q230.form).toBe('error-feedback');
    // Exact doubles hold it exactly.
    expect(sectionSensitivity(s, findBuiltInProfile('float')!, fs).frequencyErrorPercent).toBe(0);
  });

  it('check names the band and the form under the plan profile, and saturation is left to the export', () => {
    const plan = (key: string) =>
      JSON.stringify({
        format: 'biquadrant.plan',
        version: 3,
        name: 'sub at 192 kHz (invented)',
        sampleRate: 192000,
        input: { bands: [] },
        outputs: [{ id: 'sub', name: 'Sub', gainDb: 0, delayMs: 0, invert: false, mute: false, highPass: null, lowPass: null, bands: [{ id: 'hp', type: 'highPass', frequency: 20, q: 0.707 }] }],
        profile: findBuiltInProfile(key),
      });
    const io = (t: string): CliIo => ({ readText: () => t });
    const r = runCli(['check', 'p.bqplan'], io(plan('q5.23')));
    expect(r.stdout).toMatch(/warning: band hp: in "Q5.23 in 32-bit words" its pole frequency moves \+\d+\.\d\d% .*double-precision coefficients/);
    expect(runCli(['check', 'p.bqplan'], io(plan('q1.31-negated'))).stdout).not.toMatch(/pole frequency moves/);
    expect(runCli(['check', 'p.bqplan'], io(plan('float'))).stdout).not.toMatch(/pole frequency moves/);
  });

  it('planSensitivity lists each band and edge once', () => {
    const plan = {
      format: 'biquadrant.plan' as const,
      version: 3,
      name: 'x',
      sampleRate: 96000,
      input: { bands: [{ id: 'i', type: 'peaking' as const, frequency: 50, gainDb: 3, q: 4, enabled: true }] },
      outputs: ['a', 'b'].map((id) => ({ id, name: id, gainDb: 0, delayMs: 0, invert: false, mute: false, highPass: { family: 'butterworth' as const, order: 4, frequency: 30 }, lowPass: null, bands: [] })),
    };
    const list = planSensitivity(plan, findBuiltInProfile('q5.23')!);
    expect(list.map((x) => (x.target.kind === 'band' ? x.target.bandId : `${x.target.outputId}/${x.target.edge}`))).toEqual(['i', 'a/highPass', 'b/highPass']);
  });
});

describe('1 - cos w0 is computed as 2 sin^2(w0/2) in src/design', () => {
  it('no design module subtracts a cosine from 1', () => {
    const dir = join(__dirname, '..', '..', 'src', 'design');
    for (const f of readdirSync(dir)) {
      // Code only: comments may name the identity.
      const code = readFileSync(join(dir, f), 'utf8').replace(/\/\*[\s\S]*?\*\//g, '').replace(/\/\/.*$/gm, '');
      expect(code, f).not.toMatch(/1\s*-\s*(Math\.)?cos/i);
      expect(code.length).toBeGreaterThan(100);
    }
  });
});
