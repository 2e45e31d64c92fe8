import { QueryTypes } from 'sequelize';
import type { Migration } from '../migrator';

/**
 * Indexes for the queue's sorts that mix directions, found with EXPLAIN over
 * 100,000 open cases (npm run bench -- console): the default sort (priority
 * rank descending, then the soonest due, then id) and the status sort read the
 * whole open set and sorted it on every page; with these they read one page.
 * Read backwards, the same indexes serve the ascending orders. The last four
 * digits let the queue's search find a card without scanning the cases.
 */
const INDEXES: [string, string, string][] = [
  ['cases', 'cases_open_priority_desc_due', '(is_open, priority_rank DESC, sla_due_at, id)'],
  ['cases', 'cases_open_status_id', '(is_open, status, id)'],
  ['cards', 'cards_last4', '(last4)'],
];

export const m0007: Migration = {
  name: '0007-queue-sort-indexes',
  async up(_qi, sequelize) {
    for (const [table, name, cols] of INDEXES) await sequelize.query(`CREATE INDEX ${name} ON ${table} ${cols}`, { type: QueryTypes.RAW });
  },
  async down(_qi, sequelize) {
    for (const [table, name] of INDEXES) await sequelize.query(`DROP INDEX ${name} ON ${table}`, { type: QueryTypes.RAW });
  },
};
