import type { Sequelize } from 'sequelize';
import { QueryTypes } from 'sequelize';
import type { Config } from '../config/index';
import { createSequelize } from './sequelize';
import { registerModels, type Models } from './models/index';

export interface Database {
  sequelize: Sequelize;
  models: Models;
  /** Round-trips a trivial query; throws when the database is unreachable. */
  ping(): Promise<void>;
  close(): Promise<void>;
}

export function openDatabase(c: Config): Database {
  const sequelize = createSequelize(c);
  const models = registerModels(sequelize);
  return {
    sequelize,
    models,
    async ping() {
      await sequelize.query('SELECT 1 AS ok', { type: QueryTypes.SELECT });
    },
    async close() {
      await sequelize.close();
    },
  };
}
