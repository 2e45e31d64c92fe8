import { z } from 'zod';
import { needs, type RouteSpec } from '../access/route-table';
import { parseOrThrow } from '../lib/validate';
import type { CaseDeps } from '../cases/case-actions';
import { approvalListQuerySchema, approveSchema, rejectSchema } from '@shared/api/supervision';
import { listApprovals } from './approval-repository';
import { decideApproval } from './decide-approval';

const idParam = z.coerce.number().int().positive();

export function approvalRoutes(d: CaseDeps): RouteSpec[] {
  return [
    {
      method: 'get',
      path: '/approvals',
      access: needs('approval:decide'),
      summary: 'Dispositions waiting for (or given) a second person’s approval',
      handler: async (req, res) => {
        const q = parseOrThrow(approvalListQuerySchema, req.query, 'query string');
        res.json({ items: await listApprovals(d.db, q.status) });
      },
    },
    {
      method: 'post',
      path: '/approvals/:id/approve',
      access: needs('approval:decide'),
      summary: 'Approve a proposed disposition: the case closes and its labels count',
      handler: async (req, res) => {
        const id = parseOrThrow(idParam, req.params.id, 'approval id');
        const body = parseOrThrow(approveSchema, req.body ?? {});
        res.json(await decideApproval(d, req, id, { kind: 'approve', note: body.note }));
      },
    },
    {
      method: 'post',
      path: '/approvals/:id/reject',
      access: needs('approval:decide'),
      summary: 'Return a proposed disposition to its investigator with a note',
      handler: async (req, res) => {
        const id = parseOrThrow(idParam, req.params.id, 'approval id');
        const body = parseOrThrow(rejectSchema, req.body ?? {});
        res.json(await decideApproval(d, req, id, { kind: 'reject', note: body.note }));
      },
    },
  ];
}
