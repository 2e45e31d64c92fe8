import { trainModel, type Model } from '@shared/model/index';

/**
 * A small model trained on invented rows: large amounts lean fraud. A fixture
 * for the console's panels, not a check value; expected numbers come from
 * scoreRow on the same rows.
 */
export function smallModel(): Model {
  const amounts = [12, 25, 40, 60, 80, 95, 120, 150, 180, 220, 260, 310, 380, 450, 520, 610, 700, 820, 950, 1200];
  const rows = amounts.flatMap((amount, i) => [
    // A few labels against the trend keep the scores away from 0 and 1.
    { amount, channel: 'pos', fraud: amount > 500 !== (i % 4 === 1) },
    { amount: amount + 7, channel: 'ecommerce', fraud: amount > 400 !== (i % 5 === 2) },
  ]);
  const { model } = trainModel(
    {
      features: [
        { name: 'amount', kind: 'numeric' },
        { name: 'channel', kind: 'categorical' },
      ],
      columns: { amount: Float64Array.from(rows.map((r) => r.amount)), channel: rows.map((r) => r.channel) },
      labels: Int8Array.from(rows.map((r) => (r.fraud ? 1 : -1))),
    },
    { rounds: 6, exact: true, minCategoryCount: 1 },
  );
  return model;
}
