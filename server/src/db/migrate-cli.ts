import { loadConfig } from '../config/index';
import { openDatabase } from './database';
import { createMigrator } from './migrator';
import { seedDemo } from './seed-demo';

/**
 * `tsx server/src/db/migrate-cli.ts [--seed-demo] [--down]`: applies pending
 * migrations (or reverts the last with --down), then optionally seeds the demo.
 */
async function main() {
  const args = new Set(process.argv.slice(2));
  const c = loadConfig();
  const db = openDatabase(c);
  try {
    const migrator = createMigrator(db.sequelize);
    if (args.has('--down')) {
      const reverted = await migrator.down();
      console.log(`reverted: ${reverted.map((m) => m.name).join(', ') || 'nothing'}`);
      return;
    }
    const applied = await migrator.up();
    console.log(`migrations: ${applied.length} applied${applied.length ? ` (${applied.map((m) => m.name).join(', ')})` : ''}`);
    if (args.has('--seed-demo')) {
      const { created } = await seedDemo(db, c);
      console.log(`demo seed: ${created.length ? `created ${created.join(', ')}` : 'already present'}`);
    }
  } finally {
    await db.close();
  }
}

main().catch((err) => {
  console.error(`migration failed: ${(err as Error).message}`);
  process.exit(1);
});
