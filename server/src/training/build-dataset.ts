import { QueryTypes } from 'sequelize';
import type { Database } from '../db/database';
import { FEATURES } from '@shared/features/definitions';
import type { FeatureColumns, LabelledSet, Row } from '@shared/model/index';

export interface DatasetWindow {
  /** First transaction time included. */
  from: Date;
  /** Last transaction time included; labels are read as known at `labelsAsOf`. */
  to: Date;
  /** Labels reported after this instant are not used (defaults to now). */
  labelsAsOf?: Date;
  /**
   * Transactions with no fraud label are taken as legitimate (no chargeback
   * arrived in time). Common practice in card fraud modelling; it is only sound
   * for rows older than the label delay, so the window then ends at
   * `labelsAsOf - labelDelayDays` for both classes (keeping recent fraud labels
   * while dropping recent unlabelled rows would inflate the fraud rate).
   * Off: only explicitly labelled rows are used, over the whole window.
   */
  unlabelledAsLegitimate?: boolean;
  /** Days a chargeback may take to arrive (default 30). */
  labelDelayDays?: number;
}

export interface Dataset {
  /** The window actually used (its end moves back to the label-delay cut-off when unlabelled rows count as legitimate). */
  window?: { from: Date; to: Date };
  set: LabelledSet;
  timestamps: Float64Array;
  amounts: Float64Array;
  transactionIds: Float64Array;
  counts: { rows: number; fraud: number; labelled: number; presumedLegitimate: number };
}

interface DataRow {
  id: number;
  occurred_at: Date;
  amount: number;
  features: string;
  label: number | null;
}

/** Turns feature rows into the engine's column format (Float64Array with NaN, or string | null arrays). */
export function toColumns(rows: Row[]): FeatureColumns {
  const columns: FeatureColumns = {};
  for (const f of FEATURES) {
    if (f.kind === 'numeric') {
      const col = new Float64Array(rows.length);
      for (let i = 0; i < rows.length; i += 1) {
        const v = rows[i][f.name];
        col[i] = typeof v === 'number' && Number.isFinite(v) ? v : NaN;
      }
      columns[f.name] = col;
    } else {
      columns[f.name] = rows.map((r) => {
        const v = r[f.name];
        return v === null || v === undefined || v === '' ? null : String(v);
      });
    }
  }
  return columns;
}

/**
 * Builds a labelled data set from stored transactions and their features, in
 * time order, with the label each transaction had as of `labelsAsOf`
 * (fraud if any fraud label was reported by then).
 */
export async function buildDataset(db: Database, w: DatasetWindow): Promise<Dataset> {
  const asOf = w.labelsAsOf ?? new Date();
  const delayMs = (w.labelDelayDays ?? 30) * 86_400_000;
  const settledBefore = new Date(asOf.getTime() - delayMs);
  const presume = w.unlabelledAsLegitimate ?? true;
  const to = presume && settledBefore < w.to ? settledBefore : w.to;
  const rows = await db.sequelize.query<DataRow>(
    `SELECT t.id, t.occurred_at, t.amount_minor / POW(10, t.currency_exponent) AS amount, f.features,
            (SELECT MAX(l.label = 'fraud') FROM labels l WHERE l.transaction_id = t.id AND l.reported_at <= :asOf) AS label
     FROM transactions t JOIN transaction_features f ON f.transaction_id = t.id
     WHERE t.occurred_at >= :from AND t.occurred_at <= :to
     ORDER BY t.occurred_at, t.id`,
    { replacements: { from: w.from, to, asOf }, type: QueryTypes.SELECT },
  );
  const kept: { r: DataRow; y: 1 | -1; presumed: boolean }[] = [];
  for (const r of rows) {
    if (r.label !== null) kept.push({ r, y: Number(r.label) === 1 ? 1 : -1, presumed: false });
    else if (presume) kept.push({ r, y: -1, presumed: true });
  }
  const featureRows = kept.map((k) => JSON.parse(k.r.features) as Row);
  const labels = new Int8Array(kept.map((k) => k.y));
  return {
    window: { from: w.from, to },
    set: { columns: toColumns(featureRows), labels },
    timestamps: Float64Array.from(kept.map((k) => new Date(k.r.occurred_at).getTime())),
    amounts: Float64Array.from(kept.map((k) => Number(k.r.amount))),
    transactionIds: Float64Array.from(kept.map((k) => Number(k.r.id))),
    counts: {
      rows: kept.length,
      fraud: kept.filter((k) => k.y === 1).length,
      labelled: kept.filter((k) => !k.presumed).length,
      presumedLegitimate: kept.filter((k) => k.presumed).length,
    },
  };
}

/** Rows [start, end) of a data set, as a new labelled set (columns sliced, not copied row by row). */
export function sliceSet(d: Dataset, start: number, end: number): Dataset {
  const columns: FeatureColumns = {};
  for (const [name, col] of Object.entries(d.set.columns)) columns[name] = col instanceof Float64Array ? col.slice(start, end) : col.slice(start, end);
  const labels = d.set.labels.slice(start, end);
  let fraud = 0;
  for (const y of labels) if (y === 1) fraud += 1;
  return {
    set: { columns, labels },
    timestamps: d.timestamps.slice(start, end),
    amounts: d.amounts.slice(start, end),
    transactionIds: d.transactionIds.slice(start, end),
    counts: { rows: end - start, fraud, labelled: Number.NaN, presumedLegitimate: Number.NaN },
  };
}
