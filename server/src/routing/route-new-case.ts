import { QueryTypes, type Transaction } from 'sequelize';
import type { Database } from '../db/database';
import { firstMatchingRule, type RoutableCase } from '@shared/api/supervision';
import { listRules } from './routing-repository';

/**
 * Picks the member of a group who gets the next case.
 *
 * round_robin: members take turns in user-id order, starting after the one
 * who got the previous case; the group row is locked (FOR UPDATE) so two
 * scoring workers never hand out the same turn.
 * least_loaded: the member holding the fewest open cases right now; ties go
 * to the lowest user id.
 *
 * Only active investigators and supervisors count; a group with none of them
 * hands out nothing (the case stays in the shared queue).
 */
export async function pickGroupMember(db: Database, t: Transaction, groupId: number): Promise<number | null> {
  const [group] = await db.sequelize.query<{ strategy: 'round_robin' | 'least_loaded'; last_assigned_user_id: number | null }>(
    'SELECT strategy, last_assigned_user_id FROM investigator_groups WHERE id = ? FOR UPDATE',
    { replacements: [groupId], type: QueryTypes.SELECT, transaction: t },
  );
  if (!group) return null;
  const members = await db.sequelize.query<{ id: number; load: number }>(
    `SELECT u.id, (SELECT COUNT(*) FROM cases c WHERE c.is_open = 1 AND c.assignee_id = u.id) AS \`load\`
     FROM investigator_group_members m JOIN users u ON u.id = m.user_id
     WHERE m.group_id = ? AND u.status = 'active' AND u.role IN ('investigator', 'supervisor')
     ORDER BY u.id`,
    { replacements: [groupId], type: QueryTypes.SELECT, transaction: t },
  );
  if (members.length === 0) return null;
  let chosen: number;
  if (group.strategy === 'round_robin') {
    const last = group.last_assigned_user_id === null ? 0 : Number(group.last_assigned_user_id);
    chosen = Number((members.find((m) => Number(m.id) > last) ?? members[0]).id);
  } else {
    chosen = Number(members.reduce((best, m) => (Number(m.load) < Number(best.load) ? m : best)).id);
  }
  await db.sequelize.query('UPDATE investigator_groups SET last_assigned_user_id = ? WHERE id = ?', {
    replacements: [chosen, groupId],
    type: QueryTypes.UPDATE,
    transaction: t,
  });
  return chosen;
}

/**
 * Applies the routing rules to a case that was just opened (inside the
 * scoring transaction): the first enabled rule that matches names a group,
 * which becomes the case's team (whether or not anyone in it can take the
 * case: then it waits in that team's queue), and a member of it is picked and
 * assigned (status stays `new`: it waits in that person's queue). Returns the
 * assignee, if any.
 */
export async function routeNewCase(db: Database, t: Transaction, caseId: number, facts: RoutableCase): Promise<number | null> {
  const rules = await listRules(db, t);
  const i = firstMatchingRule(rules, facts);
  if (i < 0) return null;
  const teamId = rules[i].groupId;
  const assignee = await pickGroupMember(db, t, teamId);
  await db.sequelize.query(
    // The case was opened by this transaction: nobody holds it yet.
    'UPDATE cases SET team_id = :teamId, assignee_id = :assignee, claimed_at = IF(:assignee IS NULL, NULL, UTC_TIMESTAMP(3)) WHERE id = :caseId',
    { replacements: { teamId, assignee, caseId }, type: QueryTypes.UPDATE, transaction: t },
  );
  return assignee;
}
