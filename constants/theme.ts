/**
 * Trueround's design tokens: the one source of colour, spacing, type and shape.
 * Components take every visual value from here (lint forbids raw colours and inline styles).
 *
 * The look: ink-blue on warm paper, a copper accent for the one thing to do next,
 * hard-edged cards with a left rule, numbers in tabular figures. Contrast pairs below are
 * at least WCAG 2.1 AA (4.5:1 for text) in both schemes; see tests/app/theme.test.tsx.
 */
export type Scheme = 'light' | 'dark';

export interface Palette {
  background: string;
  surface: string;
  surfaceAlt: string;
  text: string;
  textMuted: string;
  rule: string;
  primary: string;
  onPrimary: string;
  accent: string;
  onAccent: string;
  focus: string;
  danger: string;
  onDanger: string;
  warning: string;
  ok: string;
  info: string;
  caution: string;
  onCaution: string;
  /** No paint: for borders that only show when active. */
  clear: string;
}

export const palettes: Record<Scheme, Palette> = {
  light: {
    background: '#f4f1ea',
    surface: '#ffffff',
    surfaceAlt: '#e9e4d8',
    text: '#14212b',
    textMuted: '#4a5560',
    rule: '#b9b1a0',
    primary: '#16324a',
    onPrimary: '#ffffff',
    accent: '#9a4413',
    onAccent: '#ffffff',
    focus: '#1f6fb2',
    danger: '#a1261c',
    onDanger: '#ffffff',
    warning: '#7a5200',
    ok: '#2c6a3a',
    info: '#1d4f7a',
    caution: '#f1c232',
    onCaution: '#14212b',
    clear: 'transparent',
  },
  dark: {
    background: '#0f1820',
    surface: '#17232e',
    surfaceAlt: '#213140',
    text: '#eef1f3',
    textMuted: '#a9b6c1',
    rule: '#3a4c5c',
    primary: '#8cc4ef',
    onPrimary: '#0f1820',
    accent: '#f0a36b',
    onAccent: '#0f1820',
    focus: '#8cc4ef',
    danger: '#ff8f85',
    onDanger: '#0f1820',
    warning: '#f2c45c',
    ok: '#8fd19e',
    info: '#9cc9f0',
    caution: '#f1c232',
    onCaution: '#14212b',
    clear: 'transparent',
  },
};

/** Spacing scale in density-independent pixels. */
export const space = { xxs: 2, xs: 4, sm: 8, md: 12, lg: 16, xl: 24, xxl: 32, xxxl: 48 } as const;

/** Font families shipped in assets/fonts (loaded by expo-font at start, never fetched). */
export const fonts = {
  regular: 'NotoSans-Regular',
  bold: 'NotoSans-Bold',
} as const;

export const fontFiles = {
  [fonts.regular]: require('../assets/fonts/NotoSans-Regular.ttf'),
  [fonts.bold]: require('../assets/fonts/NotoSans-Bold.ttf'),
};

/** Type scale: size / line height in dp. */
export const type = {
  caption: { fontSize: 13, lineHeight: 18 },
  body: { fontSize: 16, lineHeight: 24 },
  label: { fontSize: 14, lineHeight: 20 },
  title: { fontSize: 20, lineHeight: 28 },
  heading: { fontSize: 26, lineHeight: 34 },
  display: { fontSize: 34, lineHeight: 42 },
} as const;

export const radius = { none: 0, sm: 3, md: 6 } as const;

/** The smallest touch target on a phone (dp): gloves and sunlight. */
export const touchTarget = 48;

/** Width from which navigation stands beside the content. */
export const wideBreakpoint = 900;
