import { expect, type APIRequestContext, type Page } from '@playwright/test';

export const PASSWORD = 'demo-password';
export const DEMO_KEY = 'edgecase-demo-key';

/** Luhn check digit (ISO/IEC 7812-1 Annex B). */
function luhnDigit(payload: string): string {
  let sum = 0;
  for (let i = 0; i < payload.length; i += 1) {
    let d = Number(payload[payload.length - 1 - i]);
    if (i % 2 === 0) {
      d *= 2;
      if (d > 9) d -= 9;
    }
    sum += d;
  }
  return String((10 - (sum % 10)) % 10);
}

/** A Luhn-valid number under the 99 prefix (ISO/IEC 7812 major industry identifier 9), unique per call. */
export function freshPan(): string {
  const body = `990077${String(Date.now() % 1e9).padStart(9, '0')}`;
  return body + luhnDigit(body);
}

export async function signIn(page: Page, email: string) {
  await page.goto('/sign-in');
  await page.getByLabel('Email').fill(email);
  await page.getByLabel('Password').fill(PASSWORD);
  await page.getByRole('button', { name: 'Sign in' }).click();
  await expect(page).not.toHaveURL(/sign-in/);
}

/**
 * Posts a card-testing burst through the real ingest API: tiny card-not-present
 * amounts seconds apart on a fresh card, then a large one (the pattern the demo
 * champion learnt from the invented history). Returns the large one.
 */
export async function postRiskyTransaction(request: APIRequestContext, pan = freshPan(), amount = '4890.00') {
  const base = `e2e-${Date.now().toString(36)}-${Math.random().toString(36).slice(2, 7)}`;
  const now = Date.now();
  const amounts = ['1.00', '1.00', '1.00', '0.50', amount];
  const transactions = amounts.map((a, i) => ({
    id: `${base}-${i}`,
    occurredAt: new Date(now - (amounts.length - 1 - i) * 40_000).toISOString(),
    amount: a,
    currency: 'USD',
    card: { number: pan, cardholderId: 'ch-7' },
    merchant: { id: 'm-e2e', name: 'Lumen Digital Goods', mcc: '5816', country: 'GB' },
    cardPresent: false,
    channel: 'ecommerce',
    deviceId: `dev-${base}`,
    ip: '203.0.113.77',
  }));
  const res = await request.post('/api/v1/transactions', { headers: { Authorization: `Bearer ${DEMO_KEY}` }, data: { transactions } });
  expect(res.status()).toBe(202);
  return { id: `${base}-${amounts.length - 1}`, pan, last4: pan.slice(-4) };
}
