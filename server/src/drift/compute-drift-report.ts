import type { Redis } from 'ioredis';
import { QueryTypes } from 'sequelize';
import type { Database } from '../db/database';
import type { Config } from '../config/index';
import { PSI_FLAG, type DriftReport } from '@shared/api/models';
import type { Row } from '@shared/model/index';
import { publishEvents } from '../events/event-bus';
import type { MailQueue } from '../mail/mail-queue';
import { logger } from '../lib/logger';
import { toColumns } from '../training/build-dataset';
import { activeVersionIds, findVersion } from '../model-registry/version-repository';
import { psiNumeric, psiOfCategories } from './baseline';
import { findDriftReport, insertDriftReport } from './drift-repository';

/** The most recent live rows a report reads (a day of demo traffic is far fewer). */
const MAX_ROWS = 200_000;

export interface DriftDeps {
  db: Database;
  redis: Redis;
  config: Pick<Config, 'REDIS_PREFIX' | 'publicUrl'>;
  mail?: Pick<MailQueue, 'send'>;
}

export type DriftOutcome = { report: DriftReport } | { skipped: 'no-champion' | 'no-baseline' | 'no-traffic' };

/**
 * The daily drift report: PSI of the champion's live score and of every
 * feature over the last `hours`, against the training baseline stored with
 * the champion. Anything above the flag limit (PSI > 0.25, the usual "act"
 * band) is flagged on the Models screen and e-mailed to the data scientists.
 */
export async function computeDriftReport(d: DriftDeps, o: { now?: Date; hours?: number } = {}): Promise<DriftOutcome> {
  const to = o.now ?? new Date();
  const from = new Date(to.getTime() - (o.hours ?? 24) * 3_600_000);
  const { champion } = await activeVersionIds(d.db);
  if (champion === null) return { skipped: 'no-champion' };
  const version = await findVersion(d.db, champion);
  const baseline = version?.metrics.baseline;
  if (!version || !baseline) return { skipped: 'no-baseline' };

  const rows = await d.db.sequelize.query<{ features: string; probability: number }>(
    `SELECT f.features, s.probability FROM transaction_scores s JOIN transaction_features f ON f.transaction_id = s.transaction_id
     WHERE s.model_version_id = :champion AND s.scored_at > :from AND s.scored_at <= :to ORDER BY s.scored_at DESC LIMIT :limit`,
    { replacements: { champion, from, to, limit: MAX_ROWS }, type: QueryTypes.SELECT },
  );
  if (rows.length === 0) return { skipped: 'no-traffic' };

  const columns = toColumns(rows.map((r) => JSON.parse(r.features) as Row));
  const score = psiNumeric(baseline.score, Float64Array.from(rows, (r) => Number(r.probability)));
  const features = baseline.features.map((b) => {
    const col = columns[b.feature];
    const r =
      b.kind === 'numeric'
        ? psiNumeric(b, col instanceof Float64Array ? col : new Float64Array(rows.length).fill(NaN))
        : psiOfCategories(b, col instanceof Float64Array || col === undefined ? new Array<string | null>(rows.length).fill(null) : col);
    return { feature: b.feature, kind: b.kind, psi: r.psi, band: r.band };
  });
  const flagged = [...(score.psi > PSI_FLAG ? ['score'] : []), ...features.filter((f) => f.psi > PSI_FLAG).map((f) => f.feature)];
  const id = await insertDriftReport(d.db, {
    modelVersionId: champion,
    windowFrom: from,
    windowTo: to,
    rows: rows.length,
    scorePsi: score.psi,
    features,
    flagged,
  });
  const report = (await findDriftReport(d.db, id))!;
  await publishEvents(d.redis, d.config.REDIS_PREFIX, [{ type: 'drift.reported', reportId: id, modelVersionId: champion, flagged, at: new Date().toISOString() }]).catch(() => undefined);
  if (flagged.length > 0 && d.mail) await mailDataScientists(d, report).catch((err: Error) => logger().warn({ err: err.message, reportId: id }, 'drift mail not queued'));
  return { report };
}

async function mailDataScientists(d: DriftDeps, r: DriftReport): Promise<void> {
  const people = await d.db.sequelize.query<{ email: string }>("SELECT email FROM users WHERE role = 'data_scientist' AND status = 'active' ORDER BY id LIMIT 20", {
    type: QueryTypes.SELECT,
  });
  if (people.length === 0 || !d.mail) return;
  const psiOf = (name: string) => (name === 'score' ? r.score.psi : (r.features.find((f) => f.feature === name)?.psi ?? NaN));
  const lines = r.flagged.map((name) => `  ${name === 'score' ? 'score (probability)' : name}: PSI ${psiOf(name).toFixed(3)}`);
  await d.mail.send({
    to: people.map((p) => p.email),
    subject: `Drift above ${PSI_FLAG} on champion ${r.modelVersion.label}`,
    text: [
      `The daily drift report for champion ${r.modelVersion.label} found a population stability index above ${PSI_FLAG} (rule of thumb: act) for:`,
      '',
      ...lines,
      '',
      `Window: ${r.windowFrom} to ${r.windowTo}, ${r.rows} scored transactions, compared with the champion's training rows.`,
      'Drift says the traffic changed, not that the model is wrong: check the feature charts and the recent labels before retraining.',
      '',
      `Models screen: ${d.config.publicUrl}/models/drift`,
    ].join('\n'),
    purpose: 'drift-alert',
    related: { type: 'drift_report', id: String(r.id) },
  });
}
