/**
 * bindRows (server/src/db/bind-rows.ts): a multi-row VALUES list as numbered bind parameters. The
 * product's own helper (no outside reference applies): the integration tests run its statements
 * against the real MariaDB; here, the numbering, the order of the values and the conversions.
 */
import { describe, expect, it } from 'vitest';
import { bindRows } from '../../server/src/db/bind-rows';

describe('bindRows', () => {
  it('numbers the parameters row by row from $1, in the order of the values', () => {
    expect(bindRows([
      ['a', 1],
      ['b', 2],
    ])).toEqual({ sql: '($1, $2), ($3, $4)', bind: ['a', 1, 'b', 2] });
  });

  it('can start after parameters the statement already uses', () => {
    expect(bindRows([[true, null]], 3)).toEqual({ sql: '($3, $4)', bind: [true, null] });
  });

  it('writes dates as UTC DATETIME literals and undefined as NULL', () => {
    const { bind } = bindRows([[new Date('2026-11-30T14:03:00.125Z'), undefined]]);
    expect(bind).toEqual(['2026-11-30 14:03:00.125', null]);
  });

  it('gives an empty list for no rows', () => {
    expect(bindRows([])).toEqual({ sql: '', bind: [] });
  });
});
