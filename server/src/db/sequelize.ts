import { Sequelize } from 'sequelize';
import type { Config } from '../config/index';
import { logger } from '../lib/logger';

/**
 * A SQL statement as it may be logged: Sequelize writes replacement values
 * into the text, and those are session ids, tokens, e-mail addresses and
 * whatever people typed. Quoted literals become '?' (SQL's '' and MariaDB's
 * backslash escapes inside them included); the statement's shape stays.
 */
export function withoutLiterals(sql: string): string {
  return sql.replace(/'(?:[^'\\]|\\.|'')*'/g, "'?'");
}

/** One Sequelize instance per process, on the mariadb driver. */
export function createSequelize(c: Config): Sequelize {
  return new Sequelize(c.DB_NAME, c.DB_USER, c.DB_PASSWORD, {
    host: c.DB_HOST,
    port: c.DB_PORT,
    dialect: 'mariadb',
    // Checked before any work: the statement of a 500-row insert is long, and the level is rarely trace.
    logging: (sql) => {
      const log = logger();
      if (log.isLevelEnabled('trace')) log.trace({ sql: withoutLiterals(sql).slice(0, 500) }, 'sql');
    },
    pool: { max: c.DB_POOL_MAX, min: 0, acquire: 10_000, idle: 10_000 },
    dialectOptions: { connectTimeout: 5_000 },
    // Dates travel and are stored as UTC.
    timezone: '+00:00',
    define: { underscored: true, timestamps: true },
  });
}
