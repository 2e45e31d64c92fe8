import { QueryTypes } from 'sequelize';
import type { Database } from '../db/database';
import type { Config } from '../config/index';
import { trainingScheduleSchema, type PersonRef, type TrainingSchedule } from '@shared/api/models';

const SCHEDULE_KEY = 'training-schedule';

/** Nightly at 02:00 UTC on the last 60 days of labelled history, until someone changes it. */
export function defaultSchedule(c: Pick<Config, 'LABEL_DELAY_DAYS'>): TrainingSchedule {
  return { enabled: true, cron: '0 2 * * *', timezone: 'UTC', windowDays: 60, rounds: 200, labelDelayDays: c.LABEL_DELAY_DAYS };
}

export interface StoredSchedule {
  schedule: TrainingSchedule;
  updatedBy: PersonRef | null;
  updatedAt: string | null;
}

/** The schedule as saved (the database is its source of truth; the job scheduler in Redis follows it). */
export async function readSchedule(db: Database, c: Pick<Config, 'LABEL_DELAY_DAYS'>): Promise<StoredSchedule> {
  const [row] = await db.sequelize.query<{ value: string; updated_by: number | null; display_name: string | null; updated_at: Date }>(
    'SELECT s.value, s.updated_by, u.display_name, s.updated_at FROM settings s LEFT JOIN users u ON u.id = s.updated_by WHERE s.`key` = ?',
    { replacements: [SCHEDULE_KEY], type: QueryTypes.SELECT },
  );
  if (!row) return { schedule: defaultSchedule(c), updatedBy: null, updatedAt: null };
  const parsed = trainingScheduleSchema.safeParse(JSON.parse(row.value));
  return {
    schedule: parsed.success ? parsed.data : defaultSchedule(c),
    updatedBy: row.updated_by ? { id: Number(row.updated_by), displayName: row.display_name ?? `user ${row.updated_by}` } : null,
    updatedAt: new Date(row.updated_at).toISOString(),
  };
}

export async function writeSchedule(db: Database, s: TrainingSchedule, userId: number | null): Promise<void> {
  await db.sequelize.query(
    'INSERT INTO settings (`key`, value, updated_by, updated_at) VALUES (?, ?, ?, UTC_TIMESTAMP(3)) ON DUPLICATE KEY UPDATE value = VALUES(value), updated_by = VALUES(updated_by), updated_at = VALUES(updated_at)',
    { replacements: [SCHEDULE_KEY, JSON.stringify(trainingScheduleSchema.parse(s)), userId], type: QueryTypes.INSERT },
  );
}
