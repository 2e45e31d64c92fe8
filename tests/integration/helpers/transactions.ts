import { luhnCheckDigit } from '../../../shared/src/card/luhn';

let counter = 0;

/** A Luhn-valid 16-digit number under the 99 prefix (ISO/IEC 7812 major industry identifier 9: national use). */
export function testPan(seed: number): string {
  const body = `990099${String(seed).padStart(9, '0')}`;
  return body + luhnCheckDigit(body);
}

export function txn(over: Record<string, unknown> = {}, panSeed = 1) {
  counter += 1;
  return {
    id: `it-${Date.now().toString(36)}-${counter}`,
    occurredAt: new Date().toISOString(),
    amount: '25.00',
    currency: 'USD',
    card: { number: testPan(panSeed), cardholderId: `ch-${panSeed}` },
    merchant: { id: 'm-1', name: 'Test Merchant One', mcc: '5411', country: 'US' },
    cardPresent: true,
    ...over,
  };
}
