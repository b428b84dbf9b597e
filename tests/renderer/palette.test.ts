// Output colours and the ink on them.
import { describe, expect, it } from 'vitest';
import { inkOn, OKABE_ITO, outputColor, outputDash } from '../../renderer/src/lib/palette';

/** WCAG 2 contrast ratio of two #rrggbb colours (WCAG 2.1, "contrast ratio" definition). */
function contrast(a: string, b: string): number {
  const lum = (hex: string) => {
    const c = [1, 3, 5].map((i) => parseInt(hex.slice(i, i + 2), 16) / 255).map((v) => (v <= 0.03928 ? v / 12.92 : Math.pow((v + 0.055) / 1.055, 2.4)));
    return 0.2126 * c[0] + 0.7152 * c[1] + 0.0722 * c[2];
  };
  const [x, y] = [lum(a), lum(b)].sort((p, q) => q - p);
  return (x + 0.05) / (y + 0.05);
}

describe('palette', () => {
  it('uses the seven Okabe-Ito colours (Okabe and Ito 2002) before repeating with a dash', () => {
    const first = Array.from({ length: 7 }, (_, i) => outputColor(i));
    expect(new Set(first)).toEqual(new Set(Object.values(OKABE_ITO)));
    expect(outputColor(7)).toBe(outputColor(0));
    expect(outputDash(0)).toEqual([]);
    expect(outputDash(7).length).toBeGreaterThan(0);
    // The published values (Okabe & Ito, "Color Universal Design", 2002).
    expect(OKABE_ITO).toMatchObject({ orange: '#E69F00', skyBlue: '#56B4E9', bluishGreen: '#009E73', vermillion: '#D55E00', blue: '#0072B2' });
  });

  it('handle numbers get the ink with the better contrast on every output colour', () => {
    for (const c of Object.values(OKABE_ITO)) {
      const ink = inkOn(c);
      const other = ink === '#000' ? '#ffffff' : '#000000';
      expect(contrast(c, ink === '#000' ? '#000000' : '#ffffff')).toBeGreaterThanOrEqual(contrast(c, other));
    }
    expect(inkOn('#0072B2')).toBe('#fff');
    expect(inkOn('#F0E442')).toBe('#000');
    expect(inkOn('#171a1f')).toBe('#fff');
    expect(inkOn('var(--text)')).toBe('#000');
  });
});
