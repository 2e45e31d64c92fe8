/**
 * bindRows (server/src/db/bind-rows.ts): a multi-row VALUES list with `?` placeholders and its
 * values. The product's own helper (no outside reference applies): the integration tests run its
 * statements against the real MariaDB; here, the shape, the order of the values and the conversions.
 */
import { describe, expect, it } from 'vitest';
import { bindRows } from '../../server/src/db/bind-rows';

describe('bindRows', () => {
  it('writes one group of placeholders per row and the values row by row', () => {
    expect(
      bindRows([
        ['a', 1, true],
        ['b', 2, false],
      ]),
    ).toEqual({ sql: '(?, ?, ?), (?, ?, ?)', values: ['a', 1, true, 'b', 2, false] });
  });

  it('writes dates as UTC DATETIME literals and undefined as NULL', () => {
    const { values } = bindRows([[new Date('2026-11-30T14:03:00.125Z'), undefined, null]]);
    expect(values).toEqual(['2026-11-30 14:03:00.125', null, null]);
  });

  it('gives an empty list for no rows', () => {
    expect(bindRows([])).toEqual({ sql: '', values: [] });
  });
});
