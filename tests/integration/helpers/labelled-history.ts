import { createHash, randomUUID } from 'node:crypto';
import { QueryTypes } from 'sequelize';
import { FEATURES } from '../../../shared/src/features/definitions';
import type { Row } from '../../../shared/src/model/index';
import type { Database } from '../../../server/src/db/database';

/**
 * Invented, seeded labelled history for training tests (fixture only):
 * historical transactions with stored features and labels, spread evenly over
 * [from, to). Fraud leans on large amounts, card-testing bursts and the
 * ecommerce channel; fraud labels arrive `labelDelayDays` after the
 * transaction, a third of the legitimate rows carry an explicit label and the
 * rest are unlabelled (presumed legitimate by the data set builder).
 * Returns the external ids in time order.
 */
export async function seedLabelledHistory(
  db: Database,
  o: { from: Date; to: Date; rows: number; seed: number; prefix: string; labelDelayDays?: number },
): Promise<string[]> {
  let s = o.seed >>> 0 || 1;
  const rand = () => (s = (s * 16807) % 2147483647) / 2147483647;
  const now = new Date();
  const panHash = createHash('sha256').update(`fixture-card-${o.prefix}`).digest('hex');
  await db.sequelize.query(
    "INSERT INTO cards (pan_hash, bin, last4, cardholder_ref, status, created_at, updated_at) VALUES (?, '990099', '0001', ?, 'active', ?, ?) ON DUPLICATE KEY UPDATE id = id",
    { replacements: [panHash, `ch-${o.prefix}`, now, now], type: QueryTypes.INSERT },
  );
  const [{ id: cardId }] = await db.sequelize.query<{ id: number }>('SELECT id FROM cards WHERE pan_hash = ?', { replacements: [panHash], type: QueryTypes.SELECT });
  const span = o.to.getTime() - o.from.getTime();
  const ids: string[] = [];
  const channels = ['pos', 'ecommerce', 'contactless'];
  for (let start = 0; start < o.rows; start += 500) {
    const batch = randomUUID();
    const chunk = Array.from({ length: Math.min(500, o.rows - start) }, (_, k) => {
      const i = start + k;
      const occurredAt = new Date(o.from.getTime() + Math.floor((i * span) / o.rows));
      const amount = Math.round(rand() * 300000) / 100;
      const small = rand() < 0.04 ? 4 + Math.floor(rand() * 6) : 0;
      const channel = channels[Math.floor(rand() * 3)];
      const risk = (amount > 2200 ? 0.45 : 0) + (small > 0 ? 0.5 : 0) + (channel === 'ecommerce' ? 0.08 : 0);
      const fraud = rand() < 0.03 + risk;
      const features: Row = Object.fromEntries(FEATURES.map((f) => [f.name, f.kind === 'numeric' ? Math.floor(rand() * 5) : 'x']));
      Object.assign(features, { amount, small_count_1h: small, channel, mcc: fraud && rand() < 0.3 ? '7995' : '5411', hour_utc: occurredAt.getUTCHours() });
      const externalId = `${o.prefix}-${i}`;
      ids.push(externalId);
      return { externalId, occurredAt, amount, channel, features, fraud, labelled: fraud || rand() < 0.33 };
    });
    await db.sequelize.query(
      `INSERT INTO transactions (external_id, source, ingest_batch, card_id, occurred_at, received_at, amount_minor, currency, currency_exponent,
         merchant_ref, merchant_name, mcc, merchant_country, card_present, channel, status)
       VALUES ${chunk.map(() => "(?, 'seed', ?, ?, ?, ?, ?, 'USD', 2, 'm-fixture', 'Fixture Merchant', ?, 'US', ?, ?, 'historical')").join(', ')}`,
      {
        replacements: chunk.flatMap((c) => [c.externalId, batch, cardId, c.occurredAt, now, Math.round(c.amount * 100), c.features.mcc, c.channel === 'ecommerce' ? 0 : 1, c.channel]),
        type: QueryTypes.INSERT,
      },
    );
    const stored = await db.sequelize.query<{ id: number; external_id: string }>('SELECT id, external_id FROM transactions WHERE ingest_batch = ?', {
      replacements: [batch],
      type: QueryTypes.SELECT,
    });
    const idOf = new Map(stored.map((r) => [r.external_id, Number(r.id)]));
    await db.sequelize.query(`INSERT INTO transaction_features (transaction_id, features, computed_at) VALUES ${chunk.map(() => '(?, ?, ?)').join(', ')}`, {
      replacements: chunk.flatMap((c) => [idOf.get(c.externalId), JSON.stringify(c.features), now]),
      type: QueryTypes.INSERT,
    });
    const labelled = chunk.filter((c) => c.labelled);
    if (labelled.length > 0) {
      await db.sequelize.query(
        `INSERT INTO labels (transaction_id, label, fraud_type, source, reported_at, created_at) VALUES ${labelled.map(() => "(?, ?, ?, 'seed', ?, ?)").join(', ')}`,
        {
          replacements: labelled.flatMap((c) => [
            idOf.get(c.externalId),
            c.fraud ? 'fraud' : 'legitimate',
            c.fraud ? 'card_not_present' : null,
            new Date(c.occurredAt.getTime() + (c.fraud ? (o.labelDelayDays ?? 12) : 1) * 86_400_000),
            now,
          ]),
          type: QueryTypes.INSERT,
        },
      );
    }
  }
  return ids;
}
