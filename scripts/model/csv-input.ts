/**
 * CSV input for the model CLI: a header row, one row per transaction. Label
 * 1 or +1 is fraud, 0 or -1 legitimate. Every other column is a feature
 * unless ignored; numeric unless listed as categorical. Empty cells (and NA,
 * NaN, null) are missing values. Every problem names the line and column.
 */
import { readFileSync } from 'node:fs';
import { parse } from 'csv-parse/sync';
import type { FeatureColumns, FeatureSpec } from '../../shared/src/model/types';

/** Bad input: the CLI prints the message and exits with code 2. */
export class InputError extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'InputError';
  }
}

const MISSING = new Set(['', 'na', 'nan', 'null']);

export function isMissingCell(cell: string): boolean {
  return MISSING.has(cell.trim().toLowerCase());
}

export interface CsvTable {
  file: string;
  header: string[];
  /** Data rows (header excluded); line numbers are index + 2. */
  rows: string[][];
}

export function readCsv(file: string): CsvTable {
  let text: string;
  try {
    text = readFileSync(file, 'utf8');
  } catch (e) {
    throw new InputError(`Cannot read ${file}: ${(e as Error).message}`);
  }
  if (text.trim() === '') throw new InputError(`${file} is empty: a header row and at least one data row are needed`);
  let records: string[][];
  try {
    records = parse(text, { skip_empty_lines: true, bom: true, relax_column_count: false }) as string[][];
  } catch (e) {
    throw new InputError(`${file} is not valid CSV: ${(e as Error).message}`);
  }
  const [header, ...rows] = records;
  if (!header || header.length === 0) throw new InputError(`${file} has no header row`);
  const seen = new Set<string>();
  for (const h of header) {
    if (h.trim() === '') throw new InputError(`${file}: the header has an empty column name`);
    if (seen.has(h)) throw new InputError(`${file}: column "${h}" appears twice in the header`);
    seen.add(h);
  }
  if (rows.length === 0) throw new InputError(`${file} has a header but no data rows`);
  return { file, header, rows };
}

function columnIndex(t: CsvTable, name: string, role: string): number {
  const j = t.header.indexOf(name);
  if (j < 0) throw new InputError(`${t.file}: unknown ${role} column "${name}" (columns: ${t.header.join(', ')})`);
  return j;
}

/** Labels from a column: 1/+1 fraud, 0/-1 legitimate. */
export function readLabels(t: CsvTable, label: string): Int8Array {
  const j = columnIndex(t, label, 'label');
  return Int8Array.from(t.rows, (r, i) => {
    const v = r[j].trim();
    if (v === '1' || v === '+1') return 1;
    if (v === '0' || v === '-1') return -1;
    throw new InputError(
      `${t.file} line ${i + 2}, column "${label}": label ${JSON.stringify(r[j])} is not 1/+1 (fraud) or 0/-1 (legitimate)`,
    );
  });
}

/** Feature specs from the header: every column but the label and ignored ones. */
export function featureSpecs(t: CsvTable, label: string | null, ignore: string[], categorical: string[]): FeatureSpec[] {
  for (const c of [...ignore, ...categorical]) columnIndex(t, c, c && ignore.includes(c) ? 'ignored' : 'categorical');
  const specs = t.header
    .filter((h) => h !== label && !ignore.includes(h))
    .map((name) => ({ name, kind: categorical.includes(name) ? ('categorical' as const) : ('numeric' as const) }));
  if (specs.length === 0) throw new InputError(`${t.file}: no feature columns left after the label and ignored columns`);
  return specs;
}

/** Feature columns; `specs` must all be present in the file. */
export function readColumns(t: CsvTable, specs: FeatureSpec[]): FeatureColumns {
  const cols: FeatureColumns = {};
  for (const s of specs) {
    const j = t.header.indexOf(s.name);
    if (j < 0) throw new InputError(`${t.file}: the model's feature column "${s.name}" is missing`);
    if (s.kind === 'categorical') {
      cols[s.name] = t.rows.map((r) => (isMissingCell(r[j]) ? null : r[j].trim()));
      continue;
    }
    const col = new Float64Array(t.rows.length);
    for (let i = 0; i < t.rows.length; i++) {
      const cell = t.rows[i][j];
      if (isMissingCell(cell)) {
        col[i] = NaN;
        continue;
      }
      const v = Number(cell.trim());
      if (!Number.isFinite(v)) {
        throw new InputError(
          `${t.file} line ${i + 2}, column "${s.name}": ${JSON.stringify(cell)} is not a number ` +
            `(list the column in --categorical if it holds categories)`,
        );
      }
      col[i] = v;
    }
    cols[s.name] = col;
  }
  return cols;
}

/** Rows [from, to) of columns and labels. */
export function sliceSet(columns: FeatureColumns, labels: Int8Array, from: number, to: number): { columns: FeatureColumns; labels: Int8Array } {
  const out: FeatureColumns = {};
  for (const [k, c] of Object.entries(columns)) out[k] = c.slice(from, to);
  return { columns: out, labels: labels.slice(from, to) };
}
