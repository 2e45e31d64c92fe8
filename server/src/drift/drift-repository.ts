import { QueryTypes } from 'sequelize';
import type { Database } from '../db/database';
import { psiBand } from '@shared/model/index';
import type { DriftReport } from '@shared/api/models';

interface ReportRow {
  id: number;
  model_version_id: number;
  label: string | null;
  window_from: Date;
  window_to: Date;
  rows: number;
  score_psi: number;
  max_psi: number;
  features: string;
  flagged: string;
  computed_at: Date;
}

const SELECT = 'SELECT d.*, v.label FROM drift_reports d LEFT JOIN model_versions v ON v.id = d.model_version_id';

function toReport(r: ReportRow): DriftReport {
  return {
    id: Number(r.id),
    modelVersion: { id: Number(r.model_version_id), label: r.label ?? `#${r.model_version_id}` },
    windowFrom: new Date(r.window_from).toISOString(),
    windowTo: new Date(r.window_to).toISOString(),
    rows: Number(r.rows),
    score: { psi: r.score_psi, band: psiBand(r.score_psi) },
    features: JSON.parse(r.features) as DriftReport['features'],
    maxPsi: r.max_psi,
    flagged: JSON.parse(r.flagged) as string[],
    computedAt: new Date(r.computed_at).toISOString(),
  };
}

export async function insertDriftReport(
  db: Database,
  o: { modelVersionId: number; windowFrom: Date; windowTo: Date; rows: number; scorePsi: number; features: DriftReport['features']; flagged: string[] },
): Promise<number> {
  const maxPsi = Math.max(o.scorePsi, ...o.features.map((f) => f.psi));
  const [id] = await db.sequelize.query(
    `INSERT INTO drift_reports (model_version_id, window_from, window_to, \`rows\`, score_psi, max_psi, features, flagged, computed_at)
     VALUES (?, ?, ?, ?, ?, ?, ?, ?, UTC_TIMESTAMP(3))`,
    {
      replacements: [o.modelVersionId, o.windowFrom, o.windowTo, o.rows, o.scorePsi, maxPsi, JSON.stringify(o.features), JSON.stringify(o.flagged)],
      type: QueryTypes.INSERT,
    },
  );
  return Number(id);
}

export async function findDriftReport(db: Database, id: number): Promise<DriftReport | null> {
  const [row] = await db.sequelize.query<ReportRow>(`${SELECT} WHERE d.id = ?`, { replacements: [id], type: QueryTypes.SELECT });
  return row ? toReport(row) : null;
}

/** Reports in time order (oldest first, for the chart), of one version or of all. */
export async function listDriftReports(db: Database, o: { modelVersionId: number | null; limit: number }): Promise<DriftReport[]> {
  const rows = await db.sequelize.query<ReportRow>(
    `SELECT * FROM (${SELECT} ${o.modelVersionId === null ? '' : 'WHERE d.model_version_id = :mv'} ORDER BY d.window_to DESC, d.id DESC LIMIT :limit) x
     ORDER BY x.window_to, x.id`,
    { replacements: { mv: o.modelVersionId, limit: o.limit }, type: QueryTypes.SELECT },
  );
  return rows.map(toReport);
}
