/** A margin contribution with its sign spelled out: "+0.38", "−0.12". */
export function signedContribution(x: number): string {
  return `${x > 0 ? '+' : x < 0 ? '−' : ''}${Math.abs(x).toFixed(2)}`;
}
