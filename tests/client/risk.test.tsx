import { render, screen } from '@testing-library/react';
import { describe, expect, it } from 'vitest';
import { MarginBar } from '@/components/ui/margin-bar';
import { RiskBadge } from '@/components/ui/risk-badge';
import { formatMargin, formatProbability, formatWait } from '@/lib/format';
import { RISK_LEVELS, riskLevel } from '@/lib/risk';

describe('riskLevel', () => {
  it.each([
    [0, 1, 'very low'],
    [0.0499, 1, 'very low'],
    [0.05, 2, 'low'],
    [0.1499, 2, 'low'],
    [0.15, 3, 'moderate'],
    [0.2999, 3, 'moderate'],
    [0.3, 4, 'elevated'],
    [0.4999, 4, 'elevated'],
    [0.5, 5, 'high'],
    [0.6999, 5, 'high'],
    [0.7, 6, 'very high'],
    [0.8999, 6, 'very high'],
    [0.9, 7, 'extreme'],
    [1, 7, 'extreme'],
  ])('%f is step %i (%s)', (p, step, word) => {
    expect(riskLevel(p)).toMatchObject({ step, word });
  });

  it('never goes down as the probability rises', () => {
    let previous = 0;
    for (let i = 0; i <= 1000; i++) {
      const { step } = riskLevel(i / 1000);
      expect(step).toBeGreaterThanOrEqual(previous);
      previous = step;
    }
    expect(new Set(RISK_LEVELS.map((l) => l.word)).size).toBe(7);
  });

  it.each([-0.01, 1.01, Number.NaN, Number.POSITIVE_INFINITY])('refuses %f', (p) => {
    expect(() => riskLevel(p)).toThrow(RangeError);
  });
});

describe('formatting', () => {
  it('shows a probability with one decimal and never a false certainty', () => {
    expect(formatProbability(0.874)).toBe('87.4\u00A0%');
    expect(formatProbability(0)).toBe('0.0\u00A0%');
    expect(formatProbability(1)).toBe('100.0\u00A0%');
    expect(formatProbability(0.0001)).toBe('<\u00A00.1\u00A0%');
    expect(formatProbability(0.99996)).toBe('>\u00A099.9\u00A0%');
  });

  it('signs margins', () => {
    expect(formatMargin(0.4249)).toBe('+0.42');
    expect(formatMargin(-0.5)).toBe('−0.50');
    expect(formatMargin(-0.001)).toBe('0.00');
  });

  it('says waits in words', () => {
    expect(formatWait(1)).toBe('1 second');
    expect(formatWait(45)).toBe('45 seconds');
    expect(formatWait(60)).toBe('1 minute');
    expect(formatWait(61)).toBe('2 minutes');
    expect(formatWait(900)).toBe('15 minutes');
    expect(formatWait(3600)).toBe('1 hour');
    expect(formatWait(3900)).toBe('1 hour 5 minutes');
  });
});

describe('RiskBadge', () => {
  it('shows the number, the word and the colour step together', () => {
    render(<RiskBadge probability={0.874} />);
    const badge = screen.getByText('87.4 %').parentElement!;
    expect(badge).toHaveTextContent('87.4 %very high');
    expect(badge).toHaveAttribute('data-risk-step', '6');
    expect(badge).toHaveClass('bg-risk-6', 'text-on-risk-6');
  });
});

describe('MarginBar', () => {
  it('exposes the margin as a meter from -1 to +1, clamped', () => {
    const { rerender } = render(<MarginBar margin={0.42} />);
    const meter = screen.getByRole('meter', { name: 'Normalised margin' });
    expect(meter).toHaveAttribute('aria-valuenow', '0.42');
    expect(meter).toHaveAttribute('aria-valuetext', 'Margin +0.42, leans fraud');
    rerender(<MarginBar margin={-3} />);
    expect(screen.getByRole('meter')).toHaveAttribute('aria-valuenow', '-1');
    expect(screen.getByRole('meter')).toHaveAttribute('aria-valuetext', 'Margin −1.00, leans legitimate');
  });
});
