import { QueryTypes } from 'sequelize';
import type { Database } from '../db/database';
import { compileModel, parseModel, type CompiledScorer, type Model } from '@shared/model/index';

export type ModelRole = 'champion' | 'challenger' | 'retired' | 'candidate';

export interface LoadedModel {
  id: number;
  label: string;
  role: ModelRole;
  model: Model;
  compiled: CompiledScorer;
}

interface Row {
  id: number;
  label: string;
  role: ModelRole;
  model_json: string;
}

function load(r: Row): LoadedModel {
  const model = parseModel(JSON.parse(r.model_json));
  return { id: r.id, label: r.label, role: r.role, model, compiled: compileModel(model) };
}

/** The champion (scores and alerts) and the challenger (scores in shadow), if any. */
export async function loadActiveModels(db: Database): Promise<{ champion: LoadedModel | null; challenger: LoadedModel | null }> {
  const rows = await db.sequelize.query<Row>(
    "SELECT id, label, role, model_json FROM model_versions WHERE role IN ('champion', 'challenger') ORDER BY id DESC",
    { type: QueryTypes.SELECT },
  );
  const champion = rows.find((r) => r.role === 'champion');
  const challenger = rows.find((r) => r.role === 'challenger');
  return { champion: champion ? load(champion) : null, challenger: challenger ? load(challenger) : null };
}

/** A cheap fingerprint of which versions are active, to notice a promotion without reloading JSON. */
export async function activeModelsFingerprint(db: Database): Promise<string> {
  const rows = await db.sequelize.query<{ id: number; role: string }>(
    "SELECT id, role FROM model_versions WHERE role IN ('champion', 'challenger') ORDER BY id",
    { type: QueryTypes.SELECT },
  );
  return rows.map((r) => `${r.role}:${r.id}`).join(',');
}

export interface NewModelVersion {
  label: string;
  role: ModelRole;
  model: Model;
  params?: unknown;
  metrics?: unknown;
  dataFrom?: Date | null;
  dataTo?: Date | null;
  trainRows?: number | null;
  notes?: string | null;
  createdBy?: number | null;
}

export async function insertModelVersion(db: Database, v: NewModelVersion): Promise<number> {
  const [id] = await db.sequelize.query(
    `INSERT INTO model_versions (label, role, model_json, params, metrics, data_from, data_to, train_rows, notes, created_by, promoted_at, created_at, updated_at)
     VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, UTC_TIMESTAMP(3), UTC_TIMESTAMP(3))`,
    {
      replacements: [
        v.label,
        v.role,
        JSON.stringify(v.model),
        v.params === undefined ? null : JSON.stringify(v.params),
        v.metrics === undefined ? null : JSON.stringify(v.metrics),
        v.dataFrom ?? null,
        v.dataTo ?? null,
        v.trainRows ?? null,
        v.notes ?? null,
        v.createdBy ?? null,
        v.role === 'champion' ? new Date() : null,
      ],
      type: QueryTypes.INSERT,
    },
  );
  return Number(id);
}
