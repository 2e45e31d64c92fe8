/**
 * sqlDateTime must write the literal Sequelize itself writes for a Date
 * replacement on a UTC connection (checked against Sequelize's own escape).
 */
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { createRequire } from 'node:module';
import { sqlDateTime } from '../../server/src/db/sql-date';

// Sequelize's value escaping, as used for replacements (an internal module without types).
const SqlString = createRequire(import.meta.url)('sequelize/lib/sql-string') as { escape: (v: unknown, tz: string, dialect: string) => string };

describe('sqlDateTime', () => {
  it('equals Sequelize\'s escaping of the same Date on a +00:00 connection', () => {
    fc.assert(
      fc.property(fc.date({ min: new Date('1970-01-01T00:00:00Z'), max: new Date('2099-12-31T23:59:59.999Z'), noInvalidDate: true }), (d) => {
        expect(`'${sqlDateTime(d)}'`).toBe(SqlString.escape(d, '+00:00', 'mariadb'));
      }),
      { numRuns: 2000 },
    );
  });
});
