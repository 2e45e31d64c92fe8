import { z } from 'zod';
import { needs, PUBLIC, type RouteSpec } from '../access/route-table';
import { parseOrThrow } from '../lib/validate';
import { acceptInviteSchema, inviteLookupSchema, inviteSchema, roleChangeSchema } from '@shared/api/admin';
import { listUsers } from './user-admin-repository';
import { acceptInvite, changeRole, deactivateUser, inviteUser, lookupInvite, resendInvite, unlockUser, type UserAdminDeps } from './manage-users';

const idParam = z.coerce.number().int().positive();

export function userRoutes(d: UserAdminDeps): RouteSpec[] {
  const userId = (raw: unknown) => parseOrThrow(idParam, raw, 'user id');
  return [
    {
      method: 'get',
      path: '/admin/users',
      access: needs('users:manage'),
      summary: 'Every staff account with its role, status and lock-out',
      handler: async (_req, res) => {
        res.set('Cache-Control', 'no-store');
        res.json({ users: await listUsers(d.db) });
      },
    },
    {
      method: 'post',
      path: '/admin/users',
      access: needs('users:manage'),
      summary: 'Invite someone by e-mail (a one-time link to set their password)',
      handler: async (req, res) => {
        const body = parseOrThrow(inviteSchema, req.body);
        const user = await inviteUser(d, req, body);
        res.status(201).json({ user: { id: user.id, email: user.email, displayName: user.displayName, role: user.role, status: user.status } });
      },
    },
    {
      method: 'post',
      path: '/admin/users/:id/invite',
      access: needs('users:manage'),
      summary: 'Send a fresh invitation link (the previous one stops working)',
      handler: async (req, res) => {
        await resendInvite(d, req, userId(req.params.id));
        res.status(204).end();
      },
    },
    {
      method: 'patch',
      path: '/admin/users/:id',
      access: needs('users:manage'),
      summary: 'Change someone’s role (their sessions end)',
      handler: async (req, res) => {
        const id = userId(req.params.id);
        const body = parseOrThrow(roleChangeSchema, req.body);
        await changeRole(d, req, id, body.role);
        res.status(204).end();
      },
    },
    {
      method: 'post',
      path: '/admin/users/:id/deactivate',
      access: needs('users:manage'),
      summary: 'Deactivate an account: every session and socket of it ends at once',
      handler: async (req, res) => {
        res.json(await deactivateUser(d, req, userId(req.params.id)));
      },
    },
    {
      method: 'post',
      path: '/admin/users/:id/unlock',
      access: needs('users:manage'),
      summary: 'Lift a sign-in lock-out',
      handler: async (req, res) => {
        await unlockUser(d, req, userId(req.params.id));
        res.status(204).end();
      },
    },
    {
      method: 'post',
      path: '/auth/invite',
      access: PUBLIC,
      summary: 'Who an invitation link is for (without using it)',
      handler: async (req, res) => {
        const body = parseOrThrow(inviteLookupSchema, req.body);
        res.set('Cache-Control', 'no-store');
        res.json(await lookupInvite(d, body.token));
      },
    },
    {
      method: 'post',
      path: '/auth/accept-invite',
      access: PUBLIC,
      summary: 'Set the password of an invited account (the link works once)',
      handler: async (req, res) => {
        const body = parseOrThrow(acceptInviteSchema, req.body);
        res.json(await acceptInvite(d, req, body.token, body.password));
      },
    },
  ];
}
