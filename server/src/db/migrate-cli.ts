import { loadConfig } from '../config/index';
import { openDatabase } from './database';
import { createMigrator } from './migrator';
import { seedDemo } from './seed-demo';
import { seedDemoHistory } from '../demo/seed-history';
import { createRedis } from '../lib/redis';

/**
 * `tsx server/src/db/migrate-cli.ts [--seed-demo [--no-history]] [--down]`:
 * applies pending migrations (or reverts the last with --down), then optionally
 * seeds the demo: staff accounts, the demo API key and (unless --no-history)
 * the invented transaction history with the first champion trained on it.
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
      if (!args.has('--no-history')) {
        const redis = createRedis(c, { name: 'seed' });
        try {
          const started = Date.now();
          const h = await seedDemoHistory(db, redis, c, {
            days: c.DEMO_HISTORY_DAYS,
            cardholders: c.DEMO_CARDHOLDERS,
            labelDelayDays: c.LABEL_DELAY_DAYS,
            dailyCapacity: c.DEMO_DAILY_CAPACITY,
            log: (line) => console.log(line),
          });
          console.log(h.rows ? `demo history: ${h.rows} transactions in ${((Date.now() - started) / 1000).toFixed(1)} s` : 'demo history: already present');
        } finally {
          redis.disconnect();
        }
      }
    }
  } finally {
    await db.close();
  }
}

main().catch((err) => {
  console.error(`migration failed: ${(err as Error).message}`);
  process.exit(1);
});
