import { Sequelize, QueryTypes } from 'sequelize';
import { loadConfig } from '../../server/src/config/index';
import { openDatabase } from '../../server/src/db/database';
import { createMigrator } from '../../server/src/db/migrator';
import { seedDemo } from '../../server/src/db/seed-demo';

/**
 * Integration tests run against the real private MariaDB started by `npm test`
 * (DB_* variables). The test database is dropped and migrated afresh once per run.
 */
export default async function setup() {
  process.env.EDGECASE_MODE = 'test';
  const c = loadConfig();
  if (!c.DB_NAME.includes('test')) throw new Error(`Refusing to wipe database ${c.DB_NAME}: its name must contain "test".`);
  const admin = new Sequelize('', c.DB_USER, c.DB_PASSWORD, { host: c.DB_HOST, port: c.DB_PORT, dialect: 'mariadb', logging: false });
  await admin.query(`DROP DATABASE IF EXISTS \`${c.DB_NAME}\``, { type: QueryTypes.RAW });
  await admin.query(`CREATE DATABASE \`${c.DB_NAME}\` CHARACTER SET utf8mb4 COLLATE utf8mb4_unicode_ci`, { type: QueryTypes.RAW });
  await admin.close();
  const db = openDatabase(c);
  await createMigrator(db.sequelize).up();
  await seedDemo(db, c);
  await db.close();
}
