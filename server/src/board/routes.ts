import { needs, type RouteSpec } from '../access/route-table';
import { parseOrThrow } from '../lib/validate';
import { reassignSchema } from '@shared/api/supervision';
import { boardSummary } from './board-queries';
import { reassignCases, type BoardDeps } from './reassign-cases';

export function boardRoutes(d: BoardDeps): RouteSpec[] {
  return [
    {
      method: 'get',
      path: '/board',
      access: needs('board:read'),
      summary: 'The team board: workload per person, queue age, alert volume against capacity',
      handler: async (_req, res) => {
        res.set('Cache-Control', 'no-store');
        res.json(await boardSummary(d.db));
      },
    },
    {
      method: 'post',
      path: '/cases/reassign',
      access: needs('case:reassign'),
      summary: 'Hand one or many open cases to one person (all or nothing)',
      handler: async (req, res) => {
        const body = parseOrThrow(reassignSchema, req.body);
        res.json(await reassignCases(d, req, body));
      },
    },
  ];
}
