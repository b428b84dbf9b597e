/**
 * A read-only window into the running app for the end-to-end tests and the UI benchmark:
 * the current plan, what the plots hold, where the band handles are on the page, and how long
 * drag frames took (input event to the frame after the plots were updated and painted).
 */
import type { Plan } from '../../../src/plan/types';
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
  frameTimes: [],
  plotUpdates: 0,
  drawTimes: [],
  rafTimes: [],
};

export function installTestHook(): void {
  if (typeof window !== 'undefined') window.__biquadrant = testHook;
}

/** Records the time from an input event to the frame after it was drawn (after paint). */
export function recordFrame(inputTime: number): void {
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
