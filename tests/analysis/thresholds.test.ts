/**
 * Every threshold lives once, in src/analysis/thresholds.ts: no component, command or check keeps
 * a copy of a number that must move with it. The scan below fails when a copy comes back.
 */
import { readdirSync, readFileSync, statSync } from 'node:fs';
import { join, relative } from 'node:path';
import { describe, expect, it } from 'vitest';
import { analyzePlan } from '../../src/analysis/check';
import { AUDIO_BAND_TOP_FRACTION, HEADROOM_DANGER_DB, HEADROOM_WARN_DB, audioBandTopHz, headroomSeverity } from '../../src/analysis/thresholds';
import { readPlanValue } from '../../src/plan/read';

const ROOT = join(__dirname, '..', '..');

function sources(dir: string): string[] {
  const out: string[] = [];
  for (const name of readdirSync(dir)) {
    const p = join(dir, name);
    if (statSync(p).isDirectory()) out.push(...sources(p));
    else if (/\.(ts|svelte)$/.test(name) && !name.endsWith('kernel-wasm-bytes.ts')) out.push(p);
  }
  return out;
}

/** Code lines only: comments may explain a threshold by its value. */
function codeLines(text: string): string[] {
  return text
    .replace(/\/\*[\s\S]*?\*\//g, '')
    .replace(/<!--[\s\S]*?-->/g, '')
    .split('\n')
    .map((l) => l.replace(/\/\/.*$/, ''));
}

describe('thresholds live once', () => {
  it('no source file outside thresholds.ts writes the Nyquist margins 0.45, 0.49, 0.499, 0.999 or the pole radius 0.99999', () => {
    const copies: string[] = [];
    for (const dir of ['src', 'renderer/src', 'electron']) {
      for (const file of sources(join(ROOT, dir))) {
        if (file.endsWith(join('analysis', 'thresholds.ts'))) continue;
        codeLines(readFileSync(file, 'utf8')).forEach((line, i) => {
          if (/(^|[^0-9.])0\.(45|49|499|999|99999)(?![0-9])/.test(line)) copies.push(`${relative(ROOT, file)}:${i + 1}: ${line.trim()}`);
        });
      }
    }
    expect(copies).toEqual([]);
  });

  it('the status bar takes its headroom classes from thresholds.ts, not from literals', () => {
    const text = readFileSync(join(ROOT, 'renderer/src/components/StatusBar.svelte'), 'utf8');
    expect(text).toContain('headroomSeverity(');
    expect(text).not.toMatch(/peakDb\s*>\s*[0-9]/);
  });
});

describe('headroom severity', () => {
  it('is none up to the rounding limit, a warning above it, a danger above the danger limit', () => {
    expect(headroomSeverity(HEADROOM_WARN_DB)).toBeNull();
    expect(headroomSeverity(HEADROOM_WARN_DB * 2)).toBe('warning');
    expect(headroomSeverity(HEADROOM_DANGER_DB)).toBe('warning');
    expect(headroomSeverity(HEADROOM_DANGER_DB + 0.01)).toBe('danger');
  });

  it('the check uses the same limits: a +3 dB peak warns, a +9 dB peak is a danger', () => {
    const plan = (gainDb: number) => {
      const r = readPlanValue({
        format: 'biquadrant.plan',
        version: 1,
        name: 'boost',
        sampleRate: 48000,
        input: { bands: [] },
        outputs: [{ id: 'full', name: 'Full range', gainDb: 0, delayMs: 0, invert: false, mute: false, highPass: null, lowPass: null, bands: [{ id: 'b1', type: 'peaking', frequency: 1000, gainDb, q: 1, enabled: true }] }],
      });
      if (!r.ok) throw r.error;
      return r.plan;
    };
    expect(analyzePlan(plan(3)).warnings.find((w) => w.code === 'headroom')?.severity).toBe('warning');
    expect(analyzePlan(plan(9)).warnings.find((w) => w.code === 'headroom')?.severity).toBe('danger');
  });

  it('the audio-band top is 20 kHz at 48 kHz and 0.45 fs at 32 kHz', () => {
    expect(audioBandTopHz(48000)).toBe(20000);
    expect(audioBandTopHz(32000)).toBeCloseTo(AUDIO_BAND_TOP_FRACTION * 32000, 9);
  });
});
