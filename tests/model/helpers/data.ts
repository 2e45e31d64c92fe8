/** Shapes the reference data for the engine. */
import type { FeatureColumns, FeatureSpec } from '../../../shared/src/model/types';
import type { BreastCancer } from './python';

/** Breast-cancer data as engine input; benign (sklearn class 1) is the +1 class. */
export function breastCancerSet(d: BreastCancer): { features: FeatureSpec[]; columns: FeatureColumns; labels: Int8Array } {
  const features = d.features.map((name) => ({ name, kind: 'numeric' as const }));
  const columns: FeatureColumns = {};
  d.features.forEach((name, j) => (columns[name] = Float64Array.from(d.columns[j])));
  const labels = Int8Array.from(d.target, (t) => (t === 1 ? 1 : -1));
  return { features, columns, labels };
}

/** Row j of a column set as a Row object. */
export function rowOf(columns: FeatureColumns, j: number): Record<string, number | string | null> {
  const row: Record<string, number | string | null> = {};
  for (const [k, c] of Object.entries(columns)) {
    const v = c[j];
    row[k] = typeof v === 'number' ? (Number.isNaN(v) ? null : v) : (v ?? null);
  }
  return row;
}

/** Rows [from, to) of a column set. */
export function sliceColumns(columns: FeatureColumns, from: number, to: number): FeatureColumns {
  const out: FeatureColumns = {};
  for (const [k, c] of Object.entries(columns)) out[k] = c instanceof Float64Array ? c.slice(from, to) : c.slice(from, to);
  return out;
}
