import { QueryTypes } from 'sequelize';
import type { Database } from '../db/database';
import type { ShadowComparison, ShadowSide } from '@shared/api/models';
import { readAlertingSettings } from '../settings/settings-repository';
import { activeVersionIds } from './version-repository';

interface Totals {
  n: number;
  labelled: number;
  fraud: number;
  champ_alerts: number;
  chal_alerts: number;
  both_alerts: number;
  champ_labelled_alerts: number;
  chal_labelled_alerts: number;
  champ_caught: number;
  chal_caught: number;
}

/**
 * The champion and the challenger on the same live transactions: every
 * transaction the champion scored since `days` ago that the challenger also
 * scored in shadow. Alerts are counted at the current threshold for both;
 * precision and recall use the labels reported since (dispositions and
 * chargebacks), over labelled transactions only. Dispositions exist only for
 * what the champion alerted, so these figures favour the champion.
 */
export async function shadowComparison(db: Database, days: number, now = new Date()): Promise<ShadowComparison> {
  const since = new Date(now.getTime() - days * 86_400_000);
  const { threshold } = await readAlertingSettings(db);
  const { champion, challenger } = await activeVersionIds(db);
  const empty: ShadowComparison = { since: since.toISOString(), threshold, transactions: 0, labelled: 0, fraud: 0, bothAlerted: 0, champion: null, challenger: null };
  if (champion === null || challenger === null) return empty;

  const [t] = await db.sequelize.query<Totals>(
    `SELECT COUNT(*) AS n,
            COUNT(l.transaction_id) AS labelled,
            COALESCE(SUM(l.fraud), 0) AS fraud,
            COALESCE(SUM(s.probability >= :thr), 0) AS champ_alerts,
            COALESCE(SUM(h.probability >= :thr), 0) AS chal_alerts,
            COALESCE(SUM(s.probability >= :thr AND h.probability >= :thr), 0) AS both_alerts,
            COALESCE(SUM(s.probability >= :thr AND l.transaction_id IS NOT NULL), 0) AS champ_labelled_alerts,
            COALESCE(SUM(h.probability >= :thr AND l.transaction_id IS NOT NULL), 0) AS chal_labelled_alerts,
            COALESCE(SUM(s.probability >= :thr AND l.fraud = 1), 0) AS champ_caught,
            COALESCE(SUM(h.probability >= :thr AND l.fraud = 1), 0) AS chal_caught
     FROM transaction_scores s
     JOIN shadow_scores h ON h.transaction_id = s.transaction_id AND h.model_version_id = :challenger
     LEFT JOIN (SELECT transaction_id, MAX(label = 'fraud') AS fraud FROM labels GROUP BY transaction_id) l ON l.transaction_id = s.transaction_id
     WHERE s.model_version_id = :champion AND s.scored_at >= :since`,
    { replacements: { thr: threshold, champion, challenger, since }, type: QueryTypes.SELECT },
  );
  const [labels] = await db.sequelize.query<{ champ: string; chal: string }>(
    'SELECT (SELECT label FROM model_versions WHERE id = :champion) AS champ, (SELECT label FROM model_versions WHERE id = :challenger) AS chal',
    { replacements: { champion, challenger }, type: QueryTypes.SELECT },
  );
  const fraud = Number(t.fraud);
  const side = (id: number, label: string, alerts: number, labelledAlerts: number, caught: number): ShadowSide => ({
    id,
    label,
    alerts,
    labelledAlerts,
    fraudCaught: caught,
    precision: labelledAlerts > 0 ? caught / labelledAlerts : null,
    recall: fraud > 0 ? caught / fraud : null,
  });
  return {
    since: since.toISOString(),
    threshold,
    transactions: Number(t.n),
    labelled: Number(t.labelled),
    fraud,
    bothAlerted: Number(t.both_alerts),
    champion: side(champion, labels.champ, Number(t.champ_alerts), Number(t.champ_labelled_alerts), Number(t.champ_caught)),
    challenger: side(challenger, labels.chal, Number(t.chal_alerts), Number(t.chal_labelled_alerts), Number(t.chal_caught)),
  };
}
