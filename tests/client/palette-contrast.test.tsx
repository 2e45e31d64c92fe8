import { describe, expect, it } from 'vitest';
import config, { contrastPairs, riskInk, riskScale, themeTokens } from '../../tailwind.config';

/** WCAG 2.x relative luminance of an sRGB hex colour. */
function luminance(hex: string): number {
  const [r, g, b] = [1, 3, 5].map((i) => {
    const c = parseInt(hex.slice(i, i + 2), 16) / 255;
    return c <= 0.04045 ? c / 12.92 : ((c + 0.055) / 1.055) ** 2.4;
  });
  return 0.2126 * r + 0.7152 * g + 0.0722 * b;
}

function contrast(a: string, b: string): number {
  const [hi, lo] = [luminance(a), luminance(b)].sort((x, y) => y - x);
  return (hi + 0.05) / (lo + 0.05);
}

describe('palette', () => {
  for (const theme of ['light', 'dark'] as const) {
    it.each(contrastPairs)(`${theme}: %s on %s meets %f:1`, (fg, bg, minimum) => {
      expect(contrast(themeTokens[theme][fg], themeTokens[theme][bg])).toBeGreaterThanOrEqual(minimum);
    });
  }

  it('risk steps get darker step by step and their ink passes AA text contrast', () => {
    expect(riskScale).toHaveLength(7);
    for (let i = 0; i < riskScale.length; i++) {
      expect(contrast(riskInk[i], riskScale[i])).toBeGreaterThanOrEqual(4.5);
      if (i > 0) expect(luminance(riskScale[i])).toBeLessThan(luminance(riskScale[i - 1]));
    }
  });

  it('exposes the risk steps to Tailwind as risk-1..risk-7', () => {
    const colors = config.theme.extend.colors as Record<string, string>;
    for (let step = 1; step <= 7; step++) {
      expect(colors[`risk-${step}`]).toBe(riskScale[step - 1]);
      expect(colors[`on-risk-${step}`]).toBe(riskInk[step - 1]);
    }
  });
});
