import { Umzug, SequelizeStorage } from 'umzug';
import type { Sequelize, QueryInterface } from 'sequelize';
import { migrations } from './migrations/index';

/** Schema changes run through Umzug, in order, recorded in `schema_migrations`; never `sync()`. */
export function createMigrator(sequelize: Sequelize) {
  return new Umzug<QueryInterface>({
    migrations: migrations.map((m) => ({
      name: m.name,
      up: ({ context }) => m.up(context, sequelize),
      down: ({ context }) => m.down(context, sequelize),
    })),
    context: sequelize.getQueryInterface(),
    storage: new SequelizeStorage({ sequelize, tableName: 'schema_migrations' }),
    logger: undefined,
  });
}

export interface Migration {
  name: string;
  up(qi: QueryInterface, sequelize: Sequelize): Promise<void>;
  down(qi: QueryInterface, sequelize: Sequelize): Promise<void>;
}
