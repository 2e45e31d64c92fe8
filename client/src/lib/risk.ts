/**
 * Edgecase's own risk scale: seven steps over the calibrated fraud
 * probability. Each step has a colour (`risk-1` .. `risk-7` in
 * tailwind.config.ts) and a short word, because colour alone must never carry
 * the meaning.
 */
export type RiskStep = 1 | 2 | 3 | 4 | 5 | 6 | 7;

export type RiskLevel = {
  step: RiskStep;
  word: string;
  /** Lowest probability (inclusive) that lands on this step. */
  from: number;
};

/** Ordered by `from`; a probability takes the last step whose `from` it reaches. */
export const RISK_LEVELS: readonly RiskLevel[] = [
  { step: 1, word: 'very low', from: 0 },
  { step: 2, word: 'low', from: 0.05 },
  { step: 3, word: 'moderate', from: 0.15 },
  { step: 4, word: 'elevated', from: 0.3 },
  { step: 5, word: 'high', from: 0.5 },
  { step: 6, word: 'very high', from: 0.7 },
  { step: 7, word: 'extreme', from: 0.9 },
];

export function riskLevel(probability: number): RiskLevel {
  if (!Number.isFinite(probability) || probability < 0 || probability > 1) {
    throw new RangeError(`A probability lies in [0, 1]; got ${probability}.`);
  }
  let level = RISK_LEVELS[0];
  for (const candidate of RISK_LEVELS) {
    if (probability >= candidate.from) level = candidate;
  }
  return level;
}

// Full class names, written out so Tailwind's scanner finds them.
export const RISK_CLASSES: Record<RiskStep, { bg: string; ink: string }> = {
  1: { bg: 'bg-risk-1', ink: 'text-on-risk-1' },
  2: { bg: 'bg-risk-2', ink: 'text-on-risk-2' },
  3: { bg: 'bg-risk-3', ink: 'text-on-risk-3' },
  4: { bg: 'bg-risk-4', ink: 'text-on-risk-4' },
  5: { bg: 'bg-risk-5', ink: 'text-on-risk-5' },
  6: { bg: 'bg-risk-6', ink: 'text-on-risk-6' },
  7: { bg: 'bg-risk-7', ink: 'text-on-risk-7' },
};
