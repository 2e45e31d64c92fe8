import { QueryTypes } from 'sequelize';
import { z } from 'zod';
import { needs, type RouteSpec } from '../access/route-table';
import { AppError } from '../lib/app-error';
import { parseOrThrow } from '../lib/validate';
import { auditRequest } from '../audit/record-audit';
import type { Redis } from 'ioredis';
import type { Database } from '../db/database';
import type { Config } from '../config/index';
import { publishEvents } from '../events/event-bus';
import { groupInputSchema, routingPreviewSchema, routingRulesSchema, type RoutingResponse, type RoutingRuleConditions } from '@shared/api/supervision';
import { assignablePeople, deleteGroup, listGroups, listRules, replaceRules, saveGroup } from './routing-repository';
import { previewRouting } from './preview-routing';

const idParam = z.coerce.number().int().positive();

async function checkMembers(db: Database, ids: number[]) {
  const ok = new Set((await assignablePeople(db, ids)).map((p) => p.id));
  const bad = ids.filter((id) => !ok.has(id));
  if (bad.length) throw AppError.badRequest('Only active investigators and supervisors can be in a group.', [{ path: 'memberIds', message: `Not assignable: ${bad.join(', ')}` }]);
}

async function checkGroups(db: Database, rules: RoutingRuleConditions[]) {
  const ids = [...new Set(rules.map((r) => r.groupId))];
  if (ids.length === 0) return;
  const rows = await db.sequelize.query<{ id: number }>('SELECT id FROM investigator_groups WHERE id IN (:ids)', { replacements: { ids }, type: QueryTypes.SELECT });
  const known = new Set(rows.map((r) => Number(r.id)));
  const fields = rules.flatMap((r, i) => (known.has(r.groupId) ? [] : [{ path: `rules.${i}.groupId`, message: 'No such group' }]));
  if (fields.length) throw AppError.badRequest('A rule names a group that does not exist.', fields);
}

export function routingRoutes(d: { db: Database; redis: Redis; config: Config }): RouteSpec[] {
  // Groups are teams: every web server moves its sockets to the team rooms of their people's new teams.
  const teamsChanged = () => publishEvents(d.redis, d.config.REDIS_PREFIX, [{ type: 'teams.changed', at: new Date().toISOString() }]).catch(() => undefined);
  const state = async (): Promise<RoutingResponse> => {
    const [groups, rules, people] = await Promise.all([listGroups(d.db), listRules(d.db), assignablePeople(d.db)]);
    return { groups, rules, people };
  };
  return [
    {
      method: 'get',
      path: '/routing',
      access: needs('case:reassign'),
      summary: 'Investigator groups, routing rules in order, and who can be in a group',
      handler: async (_req, res) => {
        res.json(await state());
      },
    },
    {
      method: 'post',
      path: '/routing/groups',
      access: needs('case:reassign'),
      summary: 'Create a named group of investigators',
      handler: async (req, res) => {
        const body = parseOrThrow(groupInputSchema, req.body);
        await checkMembers(d.db, body.memberIds);
        const [taken] = await d.db.sequelize.query<{ id: number }>('SELECT id FROM investigator_groups WHERE name = ?', { replacements: [body.name], type: QueryTypes.SELECT });
        if (taken) throw AppError.badRequest('A group has that name already.', [{ path: 'name', message: 'Taken' }]);
        const id = await saveGroup(d.db, null, body);
        await auditRequest(d.db, req, { action: 'routing.group_create', targetType: 'group', targetId: id, outcome: 'success', details: body });
        await teamsChanged();
        res.status(201).json(await state());
      },
    },
    {
      method: 'put',
      path: '/routing/groups/:id',
      access: needs('case:reassign'),
      summary: 'Rename a group, change how it hands out cases, set its members',
      handler: async (req, res) => {
        const id = parseOrThrow(idParam, req.params.id, 'group id');
        const body = parseOrThrow(groupInputSchema, req.body);
        await checkMembers(d.db, body.memberIds);
        const [taken] = await d.db.sequelize.query<{ id: number }>('SELECT id FROM investigator_groups WHERE name = ? AND id <> ?', {
          replacements: [body.name, id],
          type: QueryTypes.SELECT,
        });
        if (taken) throw AppError.badRequest('A group has that name already.', [{ path: 'name', message: 'Taken' }]);
        if ((await saveGroup(d.db, id, body)) < 0) throw AppError.notFound('No such group.');
        await auditRequest(d.db, req, { action: 'routing.group_update', targetType: 'group', targetId: id, outcome: 'success', details: body });
        await teamsChanged();
        res.json(await state());
      },
    },
    {
      method: 'delete',
      path: '/routing/groups/:id',
      access: needs('case:reassign'),
      summary: 'Delete a group no rule uses (its cases go back to the shared queue)',
      handler: async (req, res) => {
        const id = parseOrThrow(idParam, req.params.id, 'group id');
        const outcome = await deleteGroup(d.db, id);
        if (outcome === 'missing') throw AppError.notFound('No such group.');
        if (outcome === 'in_use') throw AppError.conflict('A routing rule sends cases to this group. Change the rule first.', 'group_in_use');
        await auditRequest(d.db, req, { action: 'routing.group_delete', targetType: 'group', targetId: id, outcome: 'success' });
        await teamsChanged();
        res.json(await state());
      },
    },
    {
      method: 'put',
      path: '/routing/rules',
      access: needs('case:reassign'),
      summary: 'Replace the ordered routing rules (the first match takes a new case)',
      handler: async (req, res) => {
        const body = parseOrThrow(routingRulesSchema, req.body);
        await checkGroups(d.db, body.rules);
        const before = await listRules(d.db);
        await replaceRules(d.db, body.rules, req.user!.id);
        await auditRequest(d.db, req, {
          action: 'routing.rules',
          targetType: 'settings',
          targetId: 'routing',
          outcome: 'success',
          details: { before: before.map(({ id: _id, ...r }) => r), after: body.rules },
        });
        res.json(await state());
      },
    },
    {
      method: 'post',
      path: '/routing/preview',
      access: needs('case:reassign'),
      summary: 'How many of yesterday’s cases each rule (saved or drafted) would have taken',
      handler: async (req, res) => {
        const body = parseOrThrow(routingPreviewSchema, req.body ?? {});
        res.json(await previewRouting(d.db, body.rules ?? (await listRules(d.db))));
      },
    },
  ];
}
