import { QueryTypes, type Transaction } from 'sequelize';
import { z } from 'zod';
import type { Database } from '../db/database';

/**
 * Team policy kept beside the alerting settings: the number of cases the team
 * can work a day (the threshold was set from it) and the four-eyes limit: a
 * disposition of a case with more than `approvalLimit` at risk (major units of
 * the case's currency, not converted) waits for a second person's approval.
 */
export const supervisionSettingsSchema = z.object({
  dailyCapacity: z.number().int().min(1).nullable().default(null),
  approvalLimit: z.number().min(0).nullable().default(10_000),
});
export type SupervisionSettings = z.infer<typeof supervisionSettingsSchema>;

const KEY = 'supervision';

export async function readSupervisionSettings(db: Database, t?: Transaction): Promise<SupervisionSettings> {
  const rows = await db.sequelize.query<{ value: string }>('SELECT value FROM settings WHERE `key` = ?', {
    replacements: [KEY],
    type: QueryTypes.SELECT,
    transaction: t,
  });
  return supervisionSettingsSchema.parse(rows[0] ? JSON.parse(rows[0].value) : {});
}

export async function writeSupervisionSettings(db: Database, s: SupervisionSettings, userId: number | null): Promise<void> {
  await db.sequelize.query(
    'INSERT INTO settings (`key`, value, updated_by, updated_at) VALUES (?, ?, ?, UTC_TIMESTAMP(3)) ON DUPLICATE KEY UPDATE value = VALUES(value), updated_by = VALUES(updated_by), updated_at = VALUES(updated_at)',
    { replacements: [KEY, JSON.stringify(supervisionSettingsSchema.parse(s)), userId], type: QueryTypes.INSERT },
  );
}

/** The approval limit in a currency's minor units, or null when four-eyes is off. */
export function approvalLimitMinor(s: SupervisionSettings, exponent: number): number | null {
  return s.approvalLimit === null ? null : Math.round(s.approvalLimit * 10 ** exponent);
}

export async function settingUpdatedAt(db: Database, key: string): Promise<Date | null> {
  const rows = await db.sequelize.query<{ updated_at: Date }>('SELECT updated_at FROM settings WHERE `key` = ?', {
    replacements: [key],
    type: QueryTypes.SELECT,
  });
  return rows[0] ? new Date(rows[0].updated_at) : null;
}
