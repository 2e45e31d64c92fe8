import type { Config } from 'tailwindcss';
import plugin from 'tailwindcss/plugin';

/**
 * Edgecase palette: cool neutrals for chrome, one deep teal-blue for actions,
 * and one sequential risk ramp. Components use the semantic names below
 * (bg-surface, text-muted, bg-brand, ...), never raw hex values, so light and
 * dark themes swap by CSS variables alone.
 *
 * WCAG 2.2 AA contrast, computed with the WCAG relative-luminance formula
 * (tests/client/palette-contrast.test.tsx recomputes every pair and fails
 * below the threshold: 4.5 for text, 3 for borders of controls and focus rings).
 *
 *   light                          dark
 *   text on surface      16.49     text on surface      14.20
 *   text on canvas       15.22     text on canvas       15.42
 *   text on raised       14.27     text on raised       12.83
 *   muted on surface      7.29     muted on surface      7.79
 *   muted on canvas       6.73     muted on canvas       8.46
 *   muted on raised       6.31     muted on raised       7.04
 *   link on surface       7.46     link on surface       9.02
 *   link on raised        6.45     link on raised        8.15
 *   danger on surface     6.54     danger on surface     7.54
 *   ok on surface         6.53     ok on surface         9.05
 *   warn on surface       6.33     warn on surface       9.52
 *   brand-ink on brand    7.46     brand-ink on brand    7.35
 *   brand-ink on hover    9.71     brand-ink on hover    9.07
 *   control on surface    3.62     control on surface    3.90   (input borders, 3:1)
 *   focus on canvas       6.88     focus on canvas       9.80   (focus ring, 3:1)
 *
 *   risk step   colour    ink      ratio   (relative luminance falls monotonically,
 *   1           #FBF1D3   text     14.63    so the order reads without hue)
 *   2           #F7D889   text     11.89
 *   3           #F0B05A   text      8.69
 *   4           #DB7F3C   text      5.59
 *   5           #B9503A   white     4.92
 *   6           #86294A   white     8.64
 *   7           #4E1A4C   white    13.32
 */

export const themeTokens = {
  light: {
    canvas: '#F4F6F8',
    surface: '#FFFFFF',
    raised: '#EBEFF3',
    border: '#C9D2DB',
    control: '#7B8895',
    text: '#15202B',
    muted: '#4A5866',
    link: '#0B5C78',
    brand: '#0B5C78',
    'brand-hover': '#094A61',
    'brand-ink': '#FFFFFF',
    danger: '#B3261E',
    ok: '#1D6B3A',
    warn: '#8A5300',
    focus: '#0B5C78',
  },
  dark: {
    canvas: '#0D1318',
    surface: '#141C23',
    raised: '#1B252E',
    border: '#2E3B47',
    control: '#6B7A88',
    text: '#E4EAF0',
    muted: '#A3B0BD',
    link: '#7CC6E0',
    brand: '#5CB8D6',
    'brand-hover': '#7FCAE2',
    'brand-ink': '#07212C',
    danger: '#FF8A80',
    ok: '#6FCF97',
    warn: '#F2B65C',
    focus: '#7CC6E0',
  },
} as const;

export type ThemeToken = keyof (typeof themeTokens)['light'];

/** Seven steps, light to dark; step n is `risk-n`, its text colour `on-risk-n`. */
export const riskScale = ['#FBF1D3', '#F7D889', '#F0B05A', '#DB7F3C', '#B9503A', '#86294A', '#4E1A4C'] as const;
export const riskInk = ['#15202B', '#15202B', '#15202B', '#15202B', '#FFFFFF', '#FFFFFF', '#FFFFFF'] as const;

/** Pairs the contrast test checks: [foreground, background, minimum ratio]. */
export const contrastPairs: ReadonlyArray<readonly [ThemeToken, ThemeToken, number]> = [
  ['text', 'surface', 4.5],
  ['text', 'canvas', 4.5],
  ['text', 'raised', 4.5],
  ['muted', 'surface', 4.5],
  ['muted', 'canvas', 4.5],
  ['muted', 'raised', 4.5],
  ['link', 'surface', 4.5],
  ['link', 'canvas', 4.5],
  ['link', 'raised', 4.5],
  ['danger', 'surface', 4.5],
  ['danger', 'canvas', 4.5],
  ['ok', 'surface', 4.5],
  ['ok', 'canvas', 4.5],
  ['warn', 'surface', 4.5],
  ['warn', 'canvas', 4.5],
  ['brand-ink', 'brand', 4.5],
  ['brand-ink', 'brand-hover', 4.5],
  ['control', 'surface', 3],
  ['focus', 'canvas', 3],
  ['focus', 'surface', 3],
];

const cssVars = (tokens: Record<string, string>) =>
  Object.fromEntries(Object.entries(tokens).map(([name, value]) => [`--ec-${name}`, value]));

const semanticColors = Object.fromEntries(
  Object.keys(themeTokens.light).map((name) => [name, `var(--ec-${name})`]),
);

const riskColors = Object.fromEntries(riskScale.map((hex, i) => [`risk-${i + 1}`, hex]));
const riskInkColors = Object.fromEntries(riskInk.map((hex, i) => [`on-risk-${i + 1}`, hex]));

const fallbackSans = ['ui-sans-serif', 'system-ui', 'Segoe UI', 'Roboto', 'Helvetica Neue', 'Arial', 'sans-serif'];
const fallbackMono = ['ui-monospace', 'SFMono-Regular', 'Menlo', 'Consolas', 'monospace'];

export default {
  // The theme provider puts `dark` or `light` on <html>; without a stored choice
  // it follows prefers-color-scheme (see the media block in the base styles below).
  darkMode: 'class',
  theme: {
    extend: {
      colors: { ...semanticColors, ...riskColors, ...riskInkColors },
      fontFamily: {
        sans: ['"IBM Plex Sans"', ...fallbackSans],
        mono: ['"IBM Plex Mono"', ...fallbackMono],
      },
    },
  },
  plugins: [
    plugin(({ addBase }) => {
      addBase({
        ':root': cssVars(themeTokens.light),
        // Before the theme provider runs (and whenever the choice is "system"),
        // the operating system's preference decides.
        '@media (prefers-color-scheme: dark)': { ':root:not(.light)': cssVars(themeTokens.dark) },
        ':root.dark': cssVars(themeTokens.dark),
      });
    }),
  ],
} satisfies Config;
