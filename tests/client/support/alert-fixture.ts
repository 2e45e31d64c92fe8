import type { AlertDetail } from '@shared/api/cases';

/** An invented alert; tests override what they look at. */
export function alertDetail(overrides: Partial<AlertDetail> = {}): AlertDetail {
  return {
    alertId: 31,
    transactionId: 3100,
    externalId: 'fh-txn-3100',
    occurredAt: '2031-05-06T09:50:00.000Z',
    amount: { minor: 12_000, currency: 'EUR', exponent: 2 },
    merchant: { id: 'm-77', name: 'Kettle & Pine Grocers', mcc: '5411', mccLabel: 'Grocery stores, supermarkets', country: 'GB' },
    channel: 'pos',
    cardPresent: true,
    deviceId: null,
    ip: null,
    location: null,
    probability: 0.62,
    normalizedMargin: 0.2,
    margin: 0.3,
    reasons: [
      { feature: 'amount', value: 1240, contribution: 0.38, text: 'amount 1,240.00 > 610.00: +0.38' },
      { feature: 'channel', value: 'pos', contribution: -0.12, text: 'channel = pos: -0.12' },
    ],
    features: { amount: 120, channel: 'pos' },
    model: { id: 5, label: 'v5 (champion)' },
    ...overrides,
  };
}
