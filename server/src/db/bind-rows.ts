import { sqlDateTime } from './sql-date';

/**
 * A multi-row VALUES list as bind parameters (`($1, $2), ($3, $4)`) with its values, for
 * `sequelize.query(sql, { bind })`. Bound values go to the driver, which writes them into the
 * packet as it sends it; replacements are escaped one by one by Sequelize, which then rescans the
 * whole statement, and on the ingest and scoring paths that was a tenth of the CPU. Dates become
 * UTC DATETIME literals (sql-date.ts), undefined becomes NULL.
 */
export function bindRows(rows: readonly (readonly unknown[])[], firstIndex = 1): { sql: string; bind: unknown[] } {
  const bind: unknown[] = [];
  const groups: string[] = [];
  let n = firstIndex;
  for (const row of rows) {
    const marks: string[] = [];
    for (const v of row) {
      bind.push(v === undefined ? null : v instanceof Date ? sqlDateTime(v) : v);
      marks.push(`$${n++}`);
    }
    groups.push(`(${marks.join(', ')})`);
  }
  return { sql: groups.join(', '), bind };
}
