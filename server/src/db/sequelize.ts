import { Sequelize } from 'sequelize';
import type { Config } from '../config/index';
import { logger } from '../lib/logger';

/** One Sequelize instance per process, on the mariadb driver. */
export function createSequelize(c: Config): Sequelize {
  return new Sequelize(c.DB_NAME, c.DB_USER, c.DB_PASSWORD, {
    host: c.DB_HOST,
    port: c.DB_PORT,
    dialect: 'mariadb',
    logging: (sql) => logger().trace({ sql: sql.slice(0, 500) }, 'sql'),
    pool: { max: c.DB_POOL_MAX, min: 0, acquire: 10_000, idle: 10_000 },
    dialectOptions: { connectTimeout: 5_000 },
    // Dates travel and are stored as UTC.
    timezone: '+00:00',
    define: { underscored: true, timestamps: true },
  });
}
