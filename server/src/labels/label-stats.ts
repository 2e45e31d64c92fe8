import { QueryTypes } from 'sequelize';
import type { Database } from '../db/database';
import type { CoverageWeek, LabelDelay } from '@shared/api/models';

/** A transaction's label as it stands: fraud if any fraud label was ever reported for it. */
const CURRENT_LABEL = 'SELECT transaction_id, MAX(label = \'fraud\') AS fraud FROM labels GROUP BY transaction_id';

/**
 * Label coverage by week of the transaction (weeks start on Monday, UTC):
 * how many transactions there were, how many carry a label, and how many of
 * those are fraud or legitimate.
 */
export async function labelCoverage(db: Database, weeks: number, now = new Date()): Promise<CoverageWeek[]> {
  const since = new Date(now.getTime() - weeks * 7 * 86_400_000);
  const rows = await db.sequelize.query<{ week: string | Date; n: number; labelled: number; fraud: number }>(
    `SELECT DATE_FORMAT(DATE_SUB(DATE(t.occurred_at), INTERVAL WEEKDAY(t.occurred_at) DAY), '%Y-%m-%d') AS week,
            COUNT(*) AS n, COUNT(l.transaction_id) AS labelled, COALESCE(SUM(l.fraud), 0) AS fraud
     FROM transactions t LEFT JOIN (${CURRENT_LABEL}) l ON l.transaction_id = t.id
     WHERE t.occurred_at >= :since
     GROUP BY week ORDER BY week`,
    { replacements: { since }, type: QueryTypes.SELECT },
  );
  return rows.map((r) => {
    const n = Number(r.n);
    const labelled = Number(r.labelled);
    const fraud = Number(r.fraud);
    return { weekStart: String(r.week), transactions: n, labelled, fraud, legitimate: labelled - fraud, share: n > 0 ? labelled / n : 0 };
  });
}

/** Day bins of the delay histogram; the last one is open ("90 days or more"). */
const DELAY_EDGES = [0, 1, 2, 3, 5, 7, 10, 14, 21, 30, 45, 60, 90];

/**
 * The label delay of fraud labels reported in the last `days`: the
 * distribution of reported_at - occurred_at, split by where the label came
 * from (an investigator's disposition, a chargeback, other sources), with the
 * median and 90th percentile over all of them.
 */
export async function labelDelay(db: Database, days: number, now = new Date()): Promise<LabelDelay> {
  const since = new Date(now.getTime() - days * 86_400_000);
  const rows = await db.sequelize.query<{ d: number; source: string; n: number }>(
    `SELECT GREATEST(0, FLOOR(TIMESTAMPDIFF(SECOND, t.occurred_at, l.reported_at) / 86400)) AS d, l.source, COUNT(*) AS n
     FROM labels l JOIN transactions t ON t.id = l.transaction_id
     WHERE l.label = 'fraud' AND l.reported_at >= :since
     GROUP BY d, l.source ORDER BY d`,
    { replacements: { since }, type: QueryTypes.SELECT },
  );
  const bins = DELAY_EDGES.map((from, i) => ({ fromDays: from, toDays: DELAY_EDGES[i + 1] ?? Infinity, disposition: 0, chargeback: 0, other: 0 }));
  const byDay: { d: number; n: number }[] = [];
  let count = 0;
  for (const r of rows) {
    const d = Number(r.d);
    const n = Number(r.n);
    count += n;
    byDay.push({ d, n });
    const bin = bins.findLast((b) => d >= b.fromDays)!;
    if (r.source === 'disposition') bin.disposition += n;
    else if (r.source === 'chargeback') bin.chargeback += n;
    else bin.other += n;
  }
  byDay.sort((a, b) => a.d - b.d);
  // Whole-day quantiles: the smallest day count d with at least q of the labels at or below it.
  const quantile = (q: number) => {
    let seen = 0;
    for (const x of byDay) {
      seen += x.n;
      if (seen >= q * count) return x.d;
    }
    return null;
  };
  return {
    bins: bins.map((b) => ({ ...b, toDays: Number.isFinite(b.toDays) ? b.toDays : -1 })),
    count,
    medianDays: count > 0 ? quantile(0.5) : null,
    p90Days: count > 0 ? quantile(0.9) : null,
    since: since.toISOString(),
  };
}
