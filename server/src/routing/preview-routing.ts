import { QueryTypes } from 'sequelize';
import type { Database } from '../db/database';
import { firstMatchingRule, type RoutableCase, type RoutingPreview, type RoutingRuleConditions } from '@shared/api/supervision';

/**
 * How many of yesterday's cases (UTC day) each rule would have taken, first
 * match wins, with the same matching function the case-opening hook uses. A
 * case is judged on what it was when it opened: its first alert's amount and
 * its merchant category, country and channel (fixed at opening).
 */
export async function previewRouting(db: Database, rules: RoutingRuleConditions[], now = new Date()): Promise<RoutingPreview> {
  const end = new Date(Date.UTC(now.getUTCFullYear(), now.getUTCMonth(), now.getUTCDate()));
  const start = new Date(end.getTime() - 86_400_000);
  const rows = await db.sequelize.query<{ amount_minor: number; currency_exponent: number; mcc: string; merchant_country: string; channel: string }>(
    `SELECT t.amount_minor, c.currency_exponent, c.mcc, c.merchant_country, c.channel
     FROM cases c
     JOIN alerts a ON a.id = (SELECT MIN(a2.id) FROM alerts a2 WHERE a2.case_id = c.id)
     JOIN transactions t ON t.id = a.transaction_id
     WHERE c.created_at >= ? AND c.created_at < ?`,
    { replacements: [start, end], type: QueryTypes.SELECT },
  );
  const counts = new Array<number>(rules.length).fill(0);
  let unmatched = 0;
  for (const r of rows) {
    const facts: RoutableCase = {
      amountAtRiskMinor: Number(r.amount_minor),
      currencyExponent: Number(r.currency_exponent),
      mcc: r.mcc,
      merchantCountry: r.merchant_country,
      channel: r.channel,
    };
    const i = firstMatchingRule(rules, facts);
    if (i < 0) unmatched += 1;
    else counts[i] += 1;
  }
  return {
    day: start.toISOString().slice(0, 10),
    total: rows.length,
    perRule: rules.map((r, i) => ({ position: i + 1, name: r.name, count: counts[i] })),
    unmatched,
  };
}
