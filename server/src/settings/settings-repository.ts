import { QueryTypes } from 'sequelize';
import { z } from 'zod';
import type { Database } from '../db/database';

/**
 * Alerting settings: a transaction whose calibrated probability is at or above
 * `threshold` raises an alert; the synchronous decision answers `decline` at or
 * above `declineBand`, `review` at or above `reviewBand`, else `approve`.
 * SLA minutes per priority band: a case's due time is its first alert plus this.
 */
export const alertingSettingsSchema = z.object({
  threshold: z.number().min(0).max(1),
  reviewBand: z.number().min(0).max(1),
  declineBand: z.number().min(0).max(1),
  slaMinutes: z
    .object({ urgent: z.number().int().min(1), high: z.number().int().min(1), standard: z.number().int().min(1) })
    .default({ urgent: 30, high: 120, standard: 480 }),
  /** Probability at or above which a case is `urgent` / `high` priority. */
  priorityBands: z.object({ urgent: z.number().min(0).max(1), high: z.number().min(0).max(1) }).default({ urgent: 0.9, high: 0.7 }),
});
export type AlertingSettings = z.infer<typeof alertingSettingsSchema>;

export async function readAlertingSettings(db: Database): Promise<AlertingSettings> {
  const rows = await db.sequelize.query<{ value: string }>("SELECT value FROM settings WHERE `key` = 'alerting'", { type: QueryTypes.SELECT });
  return alertingSettingsSchema.parse(rows[0] ? JSON.parse(rows[0].value) : { threshold: 0.5, reviewBand: 0.2, declineBand: 0.9 });
}

export async function writeAlertingSettings(db: Database, s: AlertingSettings, userId: number | null): Promise<void> {
  await db.sequelize.query(
    "INSERT INTO settings (`key`, value, updated_by, updated_at) VALUES ('alerting', ?, ?, UTC_TIMESTAMP(3)) ON DUPLICATE KEY UPDATE value = VALUES(value), updated_by = VALUES(updated_by), updated_at = VALUES(updated_at)",
    { replacements: [JSON.stringify(alertingSettingsSchema.parse(s)), userId], type: QueryTypes.INSERT },
  );
}

export function priorityFor(p: number, s: AlertingSettings): 'urgent' | 'high' | 'standard' {
  return p >= s.priorityBands.urgent ? 'urgent' : p >= s.priorityBands.high ? 'high' : 'standard';
}
