import { stringify } from 'csv-stringify';
import type { Writable } from 'node:stream';

/**
 * Characters that make a spreadsheet read a cell as a formula when they lead
 * it: = + - @ tab (0x09) and carriage return (0x0D), per the OWASP "CSV
 * Injection" page; NUL as well, per OWASP ASVS 5.0 V1.2.10. Spreadsheets also
 * look past leading spaces and quotes (common practice), so a trigger behind
 * those counts too.
 */
const FORMULA_LEAD = /^[\s"']*[=+\-@\t\r\0]/;

/** A cell as text, with a leading `'` when it would otherwise start a formula. */
export function neutraliseCell(value: unknown): string {
  if (value === null || value === undefined) return '';
  const s = value instanceof Date ? value.toISOString() : String(value);
  return FORMULA_LEAD.test(s) ? `'${s}` : s;
}

/**
 * Writes rows as CSV to `out`: a header line, every field quoted and inner
 * quotes doubled (RFC 4180 2.6-2.7), every cell neutralised. Rows come from
 * an async iterator so large exports stream instead of sitting in memory.
 */
export async function writeCsv(out: Writable, header: string[], rows: AsyncIterable<unknown[]>): Promise<number> {
  const csv = stringify({ quoted: true, record_delimiter: '\r\n' });
  csv.pipe(out);
  const write = (record: string[]) =>
    new Promise<void>((resolve, reject) => {
      if (csv.write(record)) resolve();
      else csv.once('drain', resolve).once('error', reject);
    });
  await write(header.map(neutraliseCell));
  let n = 0;
  for await (const row of rows) {
    await write(row.map(neutraliseCell));
    n += 1;
  }
  await new Promise<void>((resolve, reject) => {
    out.once('finish', resolve).once('error', reject);
    csv.end();
  });
  return n;
}
