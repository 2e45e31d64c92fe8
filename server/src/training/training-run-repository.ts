import { QueryTypes } from 'sequelize';
import type { Database } from '../db/database';
import type { LossPoint, TrainingParams, TrainingProgress, TrainingRun, TrainingStatus } from '@shared/api/models';

/** A running run saves progress at least this often; one silent for longer stopped mid-run (its process ended). */
export const RUN_STALE_AFTER_MS = 3 * 60_000;

interface RunRow {
  id: number;
  status: TrainingStatus;
  trigger_kind: 'manual' | 'schedule';
  requested_by: number | null;
  requester_name: string | null;
  params: string;
  phase: string;
  round: number;
  total_rounds: number;
  train_loss: number | null;
  validation_loss: number | null;
  curve: string | null;
  model_version_id: number | null;
  model_label: string | null;
  error: string | null;
  cancel_requested_at: Date | null;
  created_at: Date;
  started_at: Date | null;
  finished_at: Date | null;
  updated_at: Date;
}

const SELECT = `SELECT r.*, u.display_name AS requester_name, v.label AS model_label
  FROM training_runs r LEFT JOIN users u ON u.id = r.requested_by LEFT JOIN model_versions v ON v.id = r.model_version_id`;

const iso = (d: Date | null) => (d ? new Date(d).toISOString() : null);

function toRun(r: RunRow, now: Date, withCurve: boolean): TrainingRun {
  const stale = r.status === 'running' && now.getTime() - new Date(r.updated_at).getTime() > RUN_STALE_AFTER_MS;
  return {
    id: Number(r.id),
    status: stale ? 'failed' : r.status,
    trigger: r.trigger_kind,
    requestedBy: r.requested_by ? { id: Number(r.requested_by), displayName: r.requester_name ?? `user ${r.requested_by}` } : null,
    params: JSON.parse(r.params) as TrainingParams,
    progress: {
      round: Number(r.round),
      totalRounds: Number(r.total_rounds),
      trainLoss: r.train_loss,
      validationLoss: r.validation_loss,
      phase: r.phase,
    },
    curve: withCurve && r.curve ? (JSON.parse(r.curve) as LossPoint[]) : [],
    modelVersionId: r.model_version_id === null ? null : Number(r.model_version_id),
    modelVersionLabel: r.model_label,
    error: stale ? 'The run stopped reporting: the training process ended before it finished.' : r.error,
    cancelRequested: r.cancel_requested_at !== null,
    createdAt: iso(r.created_at)!,
    startedAt: iso(r.started_at),
    finishedAt: iso(r.finished_at),
  };
}

export async function createRun(
  db: Database,
  o: { trigger: 'manual' | 'schedule'; requestedBy: number | null; params: TrainingParams },
): Promise<number> {
  const [id] = await db.sequelize.query(
    `INSERT INTO training_runs (status, trigger_kind, requested_by, params, phase, total_rounds, created_at, updated_at)
     VALUES ('queued', ?, ?, ?, 'waiting for the training worker', ?, UTC_TIMESTAMP(3), UTC_TIMESTAMP(3))`,
    { replacements: [o.trigger, o.requestedBy, JSON.stringify(o.params), o.params.rounds], type: QueryTypes.INSERT },
  );
  return Number(id);
}

export async function setJobId(db: Database, id: number, jobId: string): Promise<void> {
  await db.sequelize.query('UPDATE training_runs SET job_id = ? WHERE id = ?', { replacements: [jobId, id], type: QueryTypes.UPDATE });
}

export async function findRun(db: Database, id: number, now = new Date()): Promise<TrainingRun | null> {
  const [row] = await db.sequelize.query<RunRow>(`${SELECT} WHERE r.id = ?`, { replacements: [id], type: QueryTypes.SELECT });
  return row ? toRun(row, now, true) : null;
}

/** Most recent runs first, without their curves (the list does not draw them). */
export async function listRuns(db: Database, limit = 20, now = new Date()): Promise<TrainingRun[]> {
  const rows = await db.sequelize.query<RunRow>(`${SELECT} ORDER BY r.id DESC LIMIT ?`, { replacements: [limit], type: QueryTypes.SELECT });
  return rows.map((r) => toRun(r, now, false));
}

export async function lastScheduledRun(db: Database): Promise<TrainingRun | null> {
  const [row] = await db.sequelize.query<RunRow>(`${SELECT} WHERE r.trigger_kind = 'schedule' ORDER BY r.id DESC LIMIT 1`, { type: QueryTypes.SELECT });
  return row ? toRun(row, new Date(), false) : null;
}

/** queued -> running; false when the run is no longer queued (cancelled before it started, or already taken). */
export async function markRunning(db: Database, id: number): Promise<boolean> {
  const [, affected] = (await db.sequelize.query(
    "UPDATE training_runs SET status = 'running', started_at = UTC_TIMESTAMP(3), updated_at = UTC_TIMESTAMP(3) WHERE id = ? AND status = 'queued'",
    { replacements: [id], type: QueryTypes.UPDATE },
  )) as unknown as [unknown, number];
  return affected === 1;
}

/** Progress of a run that has not ended (an ended run's row is final). */
export async function saveProgress(db: Database, id: number, p: TrainingProgress, curve: LossPoint[] | null): Promise<void> {
  await db.sequelize.query(
    `UPDATE training_runs SET phase = ?, round = ?, total_rounds = ?, train_loss = ?, validation_loss = ?,
       curve = COALESCE(?, curve), updated_at = UTC_TIMESTAMP(3) WHERE id = ? AND status IN ('queued', 'running')`,
    {
      replacements: [p.phase.slice(0, 80), p.round, p.totalRounds, p.trainLoss, p.validationLoss, curve ? JSON.stringify(curve) : null, id],
      type: QueryTypes.UPDATE,
    },
  );
}

/**
 * Ends a run that has not ended yet (queued or running); true when it did. A
 * finished run is never rewritten: whichever process ends it first is what
 * the run says.
 */
export async function finishRun(
  db: Database,
  id: number,
  o: { status: 'completed' | 'failed' | 'cancelled'; modelVersionId?: number | null; error?: string | null },
): Promise<boolean> {
  const [, affected] = (await db.sequelize.query(
    `UPDATE training_runs SET status = ?, model_version_id = ?, error = ?, phase = ?, finished_at = UTC_TIMESTAMP(3), updated_at = UTC_TIMESTAMP(3)
     WHERE id = ? AND status IN ('queued', 'running')`,
    {
      replacements: [o.status, o.modelVersionId ?? null, o.error?.slice(0, 500) ?? null, o.status === 'completed' ? 'registered' : o.status, id],
      type: QueryTypes.UPDATE,
    },
  )) as unknown as [unknown, number];
  return affected === 1;
}

/**
 * Cancels a run: a queued one at once ('cancelled'), a running one by asking
 * (the worker stops after its current round). Returns what happened.
 */
export async function requestCancel(db: Database, id: number): Promise<'cancelled' | 'requested' | 'finished' | 'missing'> {
  const [, queued] = (await db.sequelize.query(
    "UPDATE training_runs SET status = 'cancelled', phase = 'cancelled', cancel_requested_at = UTC_TIMESTAMP(3), finished_at = UTC_TIMESTAMP(3), updated_at = UTC_TIMESTAMP(3) WHERE id = ? AND status = 'queued'",
    { replacements: [id], type: QueryTypes.UPDATE },
  )) as unknown as [unknown, number];
  if (queued === 1) return 'cancelled';
  const [, running] = (await db.sequelize.query(
    "UPDATE training_runs SET cancel_requested_at = COALESCE(cancel_requested_at, UTC_TIMESTAMP(3)) WHERE id = ? AND status = 'running'",
    { replacements: [id], type: QueryTypes.UPDATE },
  )) as unknown as [unknown, number];
  if (running === 1) return 'requested';
  const [row] = await db.sequelize.query<{ id: number }>('SELECT id FROM training_runs WHERE id = ?', { replacements: [id], type: QueryTypes.SELECT });
  return row ? 'finished' : 'missing';
}

/**
 * True when a running run should stop: a cancel was asked for, or the run is
 * no longer running (another process ended it: after its lock lapsed the run
 * was judged interrupted and marked failed), so it must not register anything.
 */
export async function stopRequested(db: Database, id: number): Promise<boolean> {
  const [row] = await db.sequelize.query<{ c: Date | null; status: TrainingStatus }>('SELECT cancel_requested_at AS c, status FROM training_runs WHERE id = ?', {
    replacements: [id],
    type: QueryTypes.SELECT,
  });
  return !row || Boolean(row.c) || row.status !== 'running';
}
