/**
 * Chart.js with only what the plot adapter uses registered (a line chart without datasets: axes,
 * ticks, titles and grid; smaller bundle, no animation code paths), and the shared pieces: the
 * log frequency ticks and theme colours.
 */
import { Chart, LineController, LineElement, LinearScale, LogarithmicScale, PointElement, type Scale } from 'chart.js';
import { formatFrequencyShort } from '$core/ui/units';
import { cssColor } from '../lib/palette';

Chart.register(LineController, LineElement, PointElement, LinearScale, LogarithmicScale);

export { Chart };

export interface Theme {
  text: string;
  muted: string;
  grid: string;
  gridMajor: string;
  surface: string;
  accent: string;
}

export function readTheme(): Theme {
  return {
    text: cssColor('--text', '#e8eaed'),
    muted: cssColor('--text-muted', '#9aa0a6'),
    grid: cssColor('--plot-grid', 'rgba(255,255,255,0.07)'),
    gridMajor: cssColor('--plot-grid-major', 'rgba(255,255,255,0.18)'),
    surface: cssColor('--surface', '#15181c'),
    accent: cssColor('--accent', '#7fd1c0'),
  };
}

/** Log-axis ticks: 1..9 per decade, finer when the window spans under a decade. */
export function frequencyTicks(min: number, max: number): { value: number; major: boolean; label: boolean }[] {
  const out: { value: number; major: boolean; label: boolean }[] = [];
  const span = Math.log10(max / min);
  const fine = span < 1.2;
  const mantissas = fine ? [1, 1.2, 1.5, 2, 2.5, 3, 4, 5, 6, 7, 8, 9] : [1, 2, 3, 4, 5, 6, 7, 8, 9];
  const labelled = fine ? new Set(mantissas) : span > 3.5 ? new Set([1, 2, 5]) : new Set([1, 2, 3, 5]);
  for (let d = Math.floor(Math.log10(min)); d <= Math.ceil(Math.log10(max)); d++) {
    for (const m of mantissas) {
      const v = m * Math.pow(10, d);
      if (v >= min * 0.9999 && v <= max * 1.0001) out.push({ value: v, major: m === 1, label: labelled.has(m) });
    }
  }
  return out;
}

const labelled = new WeakMap<Scale, Set<number>>();

/** Installs our frequency ticks on a log x scale (Chart.js `afterBuildTicks`). */
export function installFrequencyTicks(scale: Scale): void {
  const ticks = frequencyTicks(scale.min, scale.max);
  labelled.set(scale, new Set(ticks.filter((t) => t.label).map((t) => t.value)));
  scale.ticks = ticks.map((t) => ({ value: t.value, major: t.major }));
}

/** The tick label callback that goes with `installFrequencyTicks`. */
export function frequencyTickLabel(scale: Scale, value: number): string {
  return labelled.get(scale)?.has(value) ? formatFrequencyShort(value) : '';
}

/** Fixed y-axis width so the stacked plots line up. */
export const Y_AXIS_WIDTH = 54;
