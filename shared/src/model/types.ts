/**
 * Shapes shared by the engine's modules.
 *
 * Columns are the training/batch format: one array per feature, all of the
 * same length n. Numeric features are Float64Array with NaN for a missing
 * value; categorical features are arrays of string | null (null = missing).
 * A row is the single-transaction format used by the scorer and explainer.
 */

export type FeatureKind = 'numeric' | 'categorical';

/** What the caller says about a feature before binning. */
export interface FeatureSpec {
  name: string;
  kind: FeatureKind;
}

export type NumericColumn = Float64Array;
export type CategoricalColumn = ReadonlyArray<string | null>;
export type FeatureColumn = NumericColumn | CategoricalColumn;

/** Feature columns by feature name; every column has length n. */
export type FeatureColumns = Record<string, FeatureColumn>;

/** One transaction: `{ [featureName]: number | string | null | undefined }`; null/undefined/NaN/'' mean missing. */
export type Row = Record<string, number | string | null | undefined>;

/** A labelled set: columns plus labels y_i in {-1, +1} (+1 = confirmed fraud), Int8Array of length n. */
export interface LabelledSet {
  columns: FeatureColumns;
  labels: Int8Array;
}

/** Input of `trainModel`: the feature list, the training set and an optional validation set. */
export interface TrainingData extends LabelledSet {
  features: FeatureSpec[];
  validation?: LabelledSet;
}

/** Bin codes of one feature for n rows: Uint8 in quantile mode, Uint16/Uint32 in exact mode. */
export type CodeArray = Uint8Array | Uint16Array | Uint32Array;
