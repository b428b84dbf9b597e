/**
 * A read-only window into the running app for the end-to-end tests and the UI benchmark:
 * the current plan, what the plots hold, where the band handles are on the page, and how long
 * drag frames took (input event to the frame after the plots were updated and painted).
 *
 * Not in a release build: `TEST_HOOK` is true in development and unit tests (Vite's DEV) and in
 * builds made for the browser tests and the UI benchmark (`VITE_TEST_HOOK=1`, set by
 * tests/e2e/serve.mjs). Elsewhere it is the constant false, so the hook, `window.__biquadrant`
 * and the code that feeds it are dropped from the bundle (tests/renderer/test-hook-build.test.ts
 * checks a built bundle).
 */
import type { Plan } from '$core/plan/types';
import type { CacheStats } from './response-cache';

export interface PlottedCurve {
  id: string;
  label: string;
  color: string;
  width: number;
  /** line, ghost (a snapshot) or markers. */
  style: string;
  /** base: the still layer; overlay: redrawn every drag frame. */
  layer: string;
  y: number[];
}

export interface Plotted {
  frequencies: number[];
  range: [number, number];
  magnitude: PlottedCurve[];
  phase: PlottedCurve[];
  groupDelay: PlottedCurve[];
  phaseMode: 'wrapped' | 'unwrapped';
  /** Group-delay peaks beyond the axis (marked at its edge). */
  groupDelayClipped: { id: string; frequency: number; value: number; side: 'above' | 'below' }[];
  /** The band handles as drawn (Hz, dB). */
  handles: { id: string; frequency: number; db: number }[];
}

export interface TestHook {
  plan: () => Plan;
  dirty: () => boolean;
  plotted: () => Plotted | null;
  /** Page (client) coordinates of a band handle of the selected chain. */
  handle: (bandId: string) => { x: number; y: number } | null;
  /** Page (client) coordinates of a point (Hz, dB) of the magnitude plot. */
  magnitudePoint: (frequencyHz: number, db: number) => { x: number; y: number } | null;
  /** The Z-plane's shown window (real, imaginary), or null when that view is not open. */
  zplaneWindow: () => { x: [number, number]; y: [number, number] } | null;
  cacheStats: () => (CacheStats & { chartUpdates: number; baseDraws: number; overlayDraws: number }) | null;
  /** The Time view's gate plot of a WAV file being imported: the impulse response and the gate as drawn, or null. */
  gatePlot: () => { id: string; y: number[] }[] | null;
  /** Milliseconds per drag frame, appended as frames are painted. */
  frameTimes: number[];
  /** Count of plot updates (each redraws the three plots). */
  plotUpdates: number;
  /** Milliseconds spent in each plot update (all three plots). */
  drawTimes: number[];
  /** Milliseconds from a drag's input event to the next animation frame callback (before paint). */
  rafTimes: number[];
}

declare global {
  interface Window {
    __biquadrant?: TestHook;
  }
}

export const TEST_HOOK: boolean = import.meta.env.DEV || import.meta.env.VITE_TEST_HOOK === '1';

export const testHook: TestHook = {
  plan: () => {
    throw new Error('app not started');
  },
  dirty: () => false,
  plotted: () => null,
  handle: () => null,
  magnitudePoint: () => null,
  zplaneWindow: () => null,
  cacheStats: () => null,
  gatePlot: () => null,
  frameTimes: [],
  plotUpdates: 0,
  drawTimes: [],
  rafTimes: [],
};

export function installTestHook(): void {
  if (TEST_HOOK && typeof window !== 'undefined') window.__biquadrant = testHook;
}

/** Records the time from an input event to the frame after it was drawn (after paint). */
export function recordFrame(inputTime: number): void {
  if (!TEST_HOOK) return;
  requestAnimationFrame(() => {
    testHook.rafTimes.push(performance.now() - inputTime);
    const ch = new MessageChannel();
    ch.port1.onmessage = () => {
      testHook.frameTimes.push(performance.now() - inputTime);
      ch.port1.close();
    };
    ch.port2.postMessage(0);
  });
}
