import { cardholderName, DEMO_SEED } from './simulator/index';

/** The invented issuer's e-mail address for a cardholder (documentation domain `.test`, RFC 2606). */
export function demoCardholderEmail(name: string, index: number): string {
  const slug = name.toLowerCase().replace(/[^a-z]+/g, '.').replace(/^\.|\.$/g, '');
  return `${slug}.${index}@cardholders.demo.test`;
}

/**
 * The demo issuer's customer directory. The seed stores the first cardholders'
 * records; the live feed adds cardholders as it runs (to keep each card's pace
 * realistic), and this names them the same way, so contact works for every
 * demo case. Demo and test modes only.
 */
export function demoCardholderContact(ref: string): { name: string; email: string } | null {
  const m = /^ch-(\d{1,7})$/.exec(ref);
  if (!m) return null;
  const index = Number(m[1]) - 1;
  const name = cardholderName(DEMO_SEED, index);
  return { name, email: demoCardholderEmail(name, index) };
}
