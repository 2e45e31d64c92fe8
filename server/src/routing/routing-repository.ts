import { QueryTypes, type Transaction } from 'sequelize';
import type { Database } from '../db/database';
import type { InvestigatorGroup, RoutingRule, RoutingRuleConditions, RoutingStrategy } from '@shared/api/supervision';

interface RuleRow {
  id: number;
  position: number;
  name: string;
  min_amount: string | number | null;
  mccs: string;
  countries: string;
  channels: string;
  group_id: number;
  enabled: number;
}

const list = (s: string) => s.split(',').filter(Boolean);

function toRule(r: RuleRow): RoutingRule {
  return {
    id: Number(r.id),
    position: Number(r.position),
    name: r.name,
    minAmount: r.min_amount === null ? null : Number(r.min_amount),
    mccs: list(r.mccs),
    countries: list(r.countries),
    channels: list(r.channels) as RoutingRule['channels'],
    groupId: Number(r.group_id),
    enabled: Boolean(r.enabled),
  };
}

export async function listRules(db: Database, t?: Transaction): Promise<RoutingRule[]> {
  const rows = await db.sequelize.query<RuleRow>(
    'SELECT id, position, name, min_amount, mccs, countries, channels, group_id, enabled FROM routing_rules ORDER BY position, id',
    { type: QueryTypes.SELECT, transaction: t },
  );
  return rows.map(toRule);
}

/** Replaces the whole ordered list in one transaction: the order is the list's order. */
export async function replaceRules(db: Database, rules: RoutingRuleConditions[], userId: number): Promise<void> {
  await db.sequelize.transaction(async (t) => {
    await db.sequelize.query('DELETE FROM routing_rules', { type: QueryTypes.DELETE, transaction: t });
    for (const [i, r] of rules.entries()) {
      await db.sequelize.query(
        `INSERT INTO routing_rules (position, name, min_amount, mccs, countries, channels, group_id, enabled, created_by, created_at, updated_at)
         VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?, UTC_TIMESTAMP(3), UTC_TIMESTAMP(3))`,
        {
          replacements: [i + 1, r.name, r.minAmount, r.mccs.join(','), r.countries.join(','), r.channels.join(','), r.groupId, r.enabled, userId],
          type: QueryTypes.INSERT,
          transaction: t,
        },
      );
    }
  });
}

export async function listGroups(db: Database): Promise<InvestigatorGroup[]> {
  const [groups, members] = await Promise.all([
    db.sequelize.query<{ id: number; name: string; strategy: RoutingStrategy }>('SELECT id, name, strategy FROM investigator_groups ORDER BY name', {
      type: QueryTypes.SELECT,
    }),
    db.sequelize.query<{ group_id: number; id: number; display_name: string; status: string }>(
      'SELECT m.group_id, u.id, u.display_name, u.status FROM investigator_group_members m JOIN users u ON u.id = m.user_id ORDER BY u.display_name',
      { type: QueryTypes.SELECT },
    ),
  ]);
  return groups.map((g) => ({
    id: Number(g.id),
    name: g.name,
    strategy: g.strategy,
    members: members
      .filter((m) => Number(m.group_id) === Number(g.id))
      .map((m) => ({ id: Number(m.id), displayName: m.display_name, active: m.status === 'active' })),
  }));
}

/** Active investigators and supervisors: who can be in a group or be handed a case. */
export async function assignablePeople(db: Database, ids?: number[]) {
  const rows = await db.sequelize.query<{ id: number; display_name: string; role: 'investigator' | 'supervisor' }>(
    `SELECT id, display_name, role FROM users WHERE status = 'active' AND role IN ('investigator', 'supervisor') ${ids ? 'AND id IN (:ids)' : ''} ORDER BY display_name`,
    { replacements: { ids: ids && ids.length ? ids : [0] }, type: QueryTypes.SELECT },
  );
  return rows.map((r) => ({ id: Number(r.id), displayName: r.display_name, role: r.role }));
}

export async function saveGroup(
  db: Database,
  id: number | null,
  g: { name: string; strategy: RoutingStrategy; memberIds: number[] },
): Promise<number> {
  return db.sequelize.transaction(async (t) => {
    let groupId = id;
    if (groupId === null) {
      const [insertId] = (await db.sequelize.query(
        'INSERT INTO investigator_groups (name, strategy, created_at, updated_at) VALUES (?, ?, UTC_TIMESTAMP(3), UTC_TIMESTAMP(3))',
        { replacements: [g.name, g.strategy], type: QueryTypes.INSERT, transaction: t },
      )) as unknown as [number];
      groupId = Number(insertId);
    } else {
      const [, affected] = (await db.sequelize.query('UPDATE investigator_groups SET name = ?, strategy = ?, updated_at = UTC_TIMESTAMP(3) WHERE id = ?', {
        replacements: [g.name, g.strategy, groupId],
        type: QueryTypes.UPDATE,
        transaction: t,
      })) as unknown as [unknown, number];
      if (affected === 0) {
        const [exists] = await db.sequelize.query<{ id: number }>('SELECT id FROM investigator_groups WHERE id = ?', {
          replacements: [groupId],
          type: QueryTypes.SELECT,
          transaction: t,
        });
        if (!exists) return -1;
      }
      await db.sequelize.query('DELETE FROM investigator_group_members WHERE group_id = ?', { replacements: [groupId], type: QueryTypes.DELETE, transaction: t });
    }
    for (const userId of new Set(g.memberIds)) {
      await db.sequelize.query('INSERT INTO investigator_group_members (group_id, user_id) VALUES (?, ?)', {
        replacements: [groupId, userId],
        type: QueryTypes.INSERT,
        transaction: t,
      });
    }
    return groupId;
  });
}

export async function deleteGroup(db: Database, id: number): Promise<'deleted' | 'missing' | 'in_use'> {
  return db.sequelize.transaction(async (t) => {
    const [used] = await db.sequelize.query<{ n: number }>('SELECT COUNT(*) AS n FROM routing_rules WHERE group_id = ?', {
      replacements: [id],
      type: QueryTypes.SELECT,
      transaction: t,
    });
    if (Number(used.n) > 0) return 'in_use';
    await db.sequelize.query('DELETE FROM investigator_group_members WHERE group_id = ?', { replacements: [id], type: QueryTypes.DELETE, transaction: t });
    // The group was its cases' team: without it they would be visible to supervisors only. They go back to the shared queue.
    await db.sequelize.query('UPDATE cases SET team_id = NULL WHERE team_id = ?', { replacements: [id], type: QueryTypes.UPDATE, transaction: t });
    // BULKDELETE: Sequelize then returns the number of rows deleted.
    const affected = (await db.sequelize.query('DELETE FROM investigator_groups WHERE id = ?', {
      replacements: [id],
      type: QueryTypes.BULKDELETE,
      transaction: t,
    })) as unknown as number;
    return affected ? 'deleted' : 'missing';
  });
}
