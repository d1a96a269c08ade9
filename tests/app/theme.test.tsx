/**
 * The palette's text pairs meet WCAG 2.1 AA: contrast ratio ≥ 4.5:1 for body text
 * (WCAG 2.1 success criterion 1.4.3; relative luminance and contrast ratio as defined in WCAG 2.1).
 */
import { palettes, type Palette } from '@/constants/theme';

function luminance(hex: string): number {
  const n = parseInt(hex.slice(1), 16);
  const ch = [(n >> 16) & 255, (n >> 8) & 255, n & 255].map((c) => {
    const s = c / 255;
    return s <= 0.04045 ? s / 12.92 : ((s + 0.055) / 1.055) ** 2.4;
  });
  return 0.2126 * ch[0] + 0.7152 * ch[1] + 0.0722 * ch[2];
}
export function contrast(a: string, b: string): number {
  const [l1, l2] = [luminance(a), luminance(b)].sort((x, y) => y - x);
  return (l1 + 0.05) / (l2 + 0.05);
}

test('contrast formula reproduces the WCAG extremes (black on white = 21:1, equal colours = 1:1)', () => {
  expect(contrast('#000000', '#ffffff')).toBeCloseTo(21, 6);
  expect(contrast('#777777', '#777777')).toBeCloseTo(1, 9);
});

const pairs: [keyof Palette, keyof Palette][] = [
  ['text', 'background'],
  ['text', 'surface'],
  ['text', 'surfaceAlt'],
  ['textMuted', 'background'],
  ['textMuted', 'surface'],
  ['onPrimary', 'primary'],
  ['onAccent', 'accent'],
  ['onDanger', 'danger'],
  ['danger', 'surface'],
  ['danger', 'background'],
  ['ok', 'surface'],
  ['warning', 'surface'],
  ['info', 'surface'],
  ['accent', 'background'],
  ['primary', 'background'],
  ['onCaution', 'caution'],
];

describe.each(['light', 'dark'] as const)('%s scheme (WCAG 2.1 AA, 4.5:1)', (scheme) => {
  test.each(pairs)('%s on %s', (fg, bg) => {
    expect(contrast(palettes[scheme][fg], palettes[scheme][bg])).toBeGreaterThanOrEqual(4.5);
  });
});
