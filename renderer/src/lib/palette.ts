/**
 * Output colours: the Okabe-Ito palette (M. Okabe and K. Ito, "Color Universal Design (CUD):
 * How to make figures and presentations that are friendly to colorblind people", 2002), without
 * its black, which the sum takes as the text colour. Past seven outputs the colours repeat with
 * a dash so curves stay apart.
 */
export const OKABE_ITO = {
  orange: '#E69F00',
  skyBlue: '#56B4E9',
  bluishGreen: '#009E73',
  yellow: '#F0E442',
  blue: '#0072B2',
  vermillion: '#D55E00',
  reddishPurple: '#CC79A7',
} as const;

/** Order chosen so neighbouring ways (woofer, mid, tweeter...) get well separated hues. */
const ORDER = [
  OKABE_ITO.orange,
  OKABE_ITO.skyBlue,
  OKABE_ITO.vermillion,
  OKABE_ITO.bluishGreen,
  OKABE_ITO.reddishPurple,
  OKABE_ITO.blue,
  OKABE_ITO.yellow,
];

export function outputColor(index: number): string {
  return ORDER[index % ORDER.length];
}

/** A dash pattern for the second round of colours (none for the first seven). */
export function outputDash(index: number): number[] {
  return index < ORDER.length ? [] : [6, 3];
}

/** Reads a CSS custom property of the document (falls back when unset, e.g. in tests). */
export function cssColor(name: string, fallback: string): string {
  if (typeof document === 'undefined') return fallback;
  const v = getComputedStyle(document.documentElement).getPropertyValue(name).trim();
  return v || fallback;
}

/** Whether a canvas can be drawn on (false in jsdom, where component tests run without a 2D context). */
export function canDraw(canvas: HTMLCanvasElement | undefined): canvas is HTMLCanvasElement {
  if (!canvas || typeof navigator === 'undefined' || /jsdom/i.test(navigator.userAgent)) return false;
  return !!canvas.getContext?.('2d');
}

/**
 * Black or white, whichever reads better on `color` (#rrggbb; anything else gets black): the
 * WCAG 2 relative luminance, with the crossover where both give the same contrast ratio.
 */
export function inkOn(color: string): string {
  const m = /^#([0-9a-f]{2})([0-9a-f]{2})([0-9a-f]{2})/i.exec(color);
  if (!m) return '#000';
  const lin = (c: string) => {
    const v = parseInt(c, 16) / 255;
    return v <= 0.03928 ? v / 12.92 : Math.pow((v + 0.055) / 1.055, 2.4);
  };
  const L = 0.2126 * lin(m[1]) + 0.7152 * lin(m[2]) + 0.0722 * lin(m[3]);
  return L > 0.179 ? '#000' : '#fff';
}
