import { DataTypes, QueryTypes } from 'sequelize';
import type { Migration } from '../migrator';

/**
 * Teams: an investigator group is the team a case belongs to. Routing sets
 * `cases.team_id` to the group of the rule that matched (NULL: the shared
 * queue every investigator sees). The plain index serves lookups by team
 * (a deleted group hands its cases back to the shared queue); the second one
 * lets the queue's count for an investigator (open, and in the shared queue,
 * one of their teams or theirs) read the index alone, as the count of all
 * open cases does.
 */
const INDEXES: [string, string][] = [
  ['cases_team', '(team_id)'],
  ['cases_open_team_assignee', '(is_open, team_id, assignee_id)'],
];

export const m0008: Migration = {
  name: '0008-case-teams',
  async up(qi, sequelize) {
    await qi.addColumn('cases', 'team_id', { type: DataTypes.INTEGER.UNSIGNED, allowNull: true });
    for (const [name, cols] of INDEXES) await sequelize.query(`CREATE INDEX ${name} ON cases ${cols}`, { type: QueryTypes.RAW });
  },
  async down(qi, sequelize) {
    for (const [name] of INDEXES) await sequelize.query(`DROP INDEX ${name} ON cases`, { type: QueryTypes.RAW });
    await qi.removeColumn('cases', 'team_id');
  },
};
