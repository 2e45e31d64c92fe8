import { zodResolver } from '@hookform/resolvers/zod';
import { useState } from 'react';
import { useForm } from 'react-hook-form';
import { inviteSchema, INVITE_TTL_HOURS, type AdminUser, type InviteInput } from '@shared/api/admin';
import { ROLE_LABELS, ROLES, type Role } from '@shared/auth/roles';
import { Button } from '@/components/ui/button';
import { Dialog } from '@/components/ui/dialog';
import { LoadingLine } from '@/components/ui/spinner';
import { TextField } from '@/components/ui/text-field';
import { formatDateTime } from '@/lib/time';
import { useChangeRole } from '../api/change-role';
import { useDeactivateUser } from '../api/deactivate-user';
import { useUsers } from '../api/get-users';
import { useInviteUser } from '../api/invite-user';
import { useResendInvite } from '../api/resend-invite';
import { useUnlockUser } from '../api/unlock-user';

const STATUS_WORDS: Record<AdminUser['status'], string> = { active: 'Active', invited: 'Invited, not yet accepted', deactivated: 'Deactivated' };

function InviteForm() {
  const invite = useInviteUser();
  const form = useForm<InviteInput>({ resolver: zodResolver(inviteSchema), defaultValues: { email: '', displayName: '', role: 'investigator' } });
  const [sentTo, setSentTo] = useState<string | null>(null);
  const err = form.formState.errors;
  return (
    <form
      aria-labelledby="invite-heading"
      noValidate
      className="flex flex-col gap-2 rounded border border-border bg-surface p-3"
      onSubmit={form.handleSubmit((v) =>
        invite.mutate(v, {
          onSuccess: () => {
            setSentTo(v.email);
            form.reset();
          },
          onError: (e) => {
            const f = (e as { fields?: { path: string; message: string }[] }).fields;
            for (const x of f ?? []) if (x.path === 'email' || x.path === 'displayName') form.setError(x.path, { message: x.message });
          },
        }),
      )}
    >
      <h2 id="invite-heading" className="text-sm font-semibold text-text">
        Invite someone
      </h2>
      <p className="text-xs text-muted">They get an e-mail with a link that works once, for {INVITE_TTL_HOURS} hours, to choose their password.</p>
      <div className="flex flex-wrap items-end gap-2">
        <TextField className="w-64" label="E-mail" type="email" autoComplete="off" {...form.register('email')} error={err.email?.message} />
        <TextField className="w-48" label="Name" {...form.register('displayName')} error={err.displayName?.message} />
        <label className="flex flex-col gap-1 text-sm font-medium">
          Role
          <select className="h-9 rounded border border-control bg-surface px-2 font-normal" {...form.register('role')}>
            {ROLES.map((r) => (
              <option key={r} value={r}>
                {ROLE_LABELS[r]}
              </option>
            ))}
          </select>
        </label>
        <Button type="submit" variant="primary" disabled={invite.isPending}>
          Send invitation
        </Button>
      </div>
      {invite.isError && (
        <p role="alert" className="text-xs text-danger">
          {invite.error.message}
        </p>
      )}
      {sentTo && !invite.isError && (
        <p role="status" className="text-xs text-ok">
          Invitation sent to {sentTo}.
        </p>
      )}
    </form>
  );
}

type Pending = { kind: 'deactivate'; user: AdminUser } | { kind: 'role'; user: AdminUser; role: Role };

function ConfirmDialog({ pending, onClose }: { pending: Pending; onClose: () => void }) {
  const deactivate = useDeactivateUser();
  const changeRole = useChangeRole();
  const m = pending.kind === 'deactivate' ? deactivate : changeRole;
  const u = pending.user;
  return (
    <Dialog title={pending.kind === 'deactivate' ? `Deactivate ${u.displayName}?` : `Make ${u.displayName} ${ROLE_LABELS[pending.role]}?`} onClose={onClose}>
      <div className="flex flex-col gap-3 text-sm">
        <p>
          {pending.kind === 'deactivate'
            ? 'Every session they have ends now, open screens included, and they cannot sign in again. Cases they hold stay with them until a supervisor reassigns them.'
            : 'Their sessions end now and they sign in again with the new role.'}
        </p>
        {m.isError && (
          <p role="alert" className="text-xs text-danger">
            {m.error.message}
          </p>
        )}
        <div className="flex justify-end gap-2">
          <Button onClick={onClose}>Cancel</Button>
          <Button
            variant="primary"
            disabled={m.isPending}
            onClick={() => (pending.kind === 'deactivate' ? deactivate.mutate(u.id, { onSuccess: onClose }) : changeRole.mutate({ id: u.id, role: pending.role }, { onSuccess: onClose }))}
          >
            {pending.kind === 'deactivate' ? 'Deactivate' : 'Change role'}
          </Button>
        </div>
      </div>
    </Dialog>
  );
}

function UserRow({ u, meId, onConfirm }: { u: AdminUser; meId: number; onConfirm: (p: Pending) => void }) {
  const unlock = useUnlockUser();
  const resend = useResendInvite();
  const me = u.id === meId;
  const locked = u.lockedUntil !== null;
  return (
    <tr>
      <th scope="row" className="px-3 py-1.5 text-left font-normal">
        <span className="font-medium">{u.displayName}</span>
        {me && <span className="ml-1 text-xs text-muted">(you)</span>}
        <span className="block text-xs text-muted">{u.email}</span>
      </th>
      <td className="px-3 py-1.5">
        <select
          aria-label={`Role of ${u.displayName}`}
          className="h-7 rounded border border-control bg-surface px-1 text-sm disabled:opacity-60"
          value={u.role}
          disabled={me || u.status === 'deactivated'}
          onChange={(e) => onConfirm({ kind: 'role', user: u, role: e.target.value as Role })}
        >
          {ROLES.map((r) => (
            <option key={r} value={r}>
              {ROLE_LABELS[r]}
            </option>
          ))}
        </select>
      </td>
      <td className="px-3 py-1.5 text-sm">
        {STATUS_WORDS[u.status]}
        {u.inviteExpiresAt && <span className="block text-xs text-muted">link valid until {formatDateTime(u.inviteExpiresAt)}</span>}
      </td>
      <td className="px-3 py-1.5 text-sm">
        {locked ? (
          <span className="font-medium text-danger">Locked until {formatDateTime(u.lockedUntil!)}</span>
        ) : u.failedLoginCount > 0 ? (
          <span className="text-muted">{u.failedLoginCount} failed</span>
        ) : (
          <span className="text-muted">–</span>
        )}
      </td>
      <td className="px-3 py-1.5 text-sm tabular-nums">{u.lastLoginAt ? formatDateTime(u.lastLoginAt) : <span className="text-muted">never</span>}</td>
      <td className="px-3 py-1.5">
        <div className="flex flex-wrap gap-1">
          {(locked || u.failedLoginCount > 0) && (
            <Button size="sm" disabled={unlock.isPending} onClick={() => unlock.mutate(u.id)} aria-label={`Unlock ${u.displayName}`}>
              Unlock
            </Button>
          )}
          {u.status === 'invited' && (
            <Button size="sm" disabled={resend.isPending} onClick={() => resend.mutate(u.id)}>
              {resend.isSuccess ? 'Link sent again' : 'Send a new link'}
            </Button>
          )}
          {u.status !== 'deactivated' && !me && (
            <Button size="sm" variant="ghost" onClick={() => onConfirm({ kind: 'deactivate', user: u })} aria-label={`Deactivate ${u.displayName}`}>
              Deactivate
            </Button>
          )}
        </div>
        {(unlock.isError || resend.isError) && (
          <p role="alert" className="text-xs text-danger">
            {(unlock.error ?? resend.error)?.message}
          </p>
        )}
      </td>
    </tr>
  );
}

/** Staff accounts: invite, set role, deactivate (sessions end at once), lift a lock-out. */
export function UsersPanel({ meId }: { meId: number }) {
  const users = useUsers();
  const [pending, setPending] = useState<Pending | null>(null);
  return (
    <div className="flex flex-col gap-3">
      <InviteForm />
      <section aria-labelledby="users-heading" className="flex flex-col gap-2">
        <h2 id="users-heading" className="text-sm font-semibold text-text">
          Staff accounts
        </h2>
        {users.isPending ? (
          <LoadingLine />
        ) : users.isError ? (
          <p role="alert" className="text-sm text-danger">
            Accounts could not be loaded: {users.error.message}
          </p>
        ) : (
          <div className="overflow-x-auto rounded border border-border bg-surface">
            <table className="w-full text-sm">
              <caption className="sr-only">Staff accounts</caption>
              <thead className="border-b border-border text-left text-xs text-muted">
                <tr>
                  <th scope="col" className="px-3 py-2 font-medium">Person</th>
                  <th scope="col" className="px-3 py-2 font-medium">Role</th>
                  <th scope="col" className="px-3 py-2 font-medium">Status</th>
                  <th scope="col" className="px-3 py-2 font-medium">Sign-in lock-out</th>
                  <th scope="col" className="px-3 py-2 font-medium">Last sign-in</th>
                  <th scope="col" className="px-3 py-2 font-medium">Actions</th>
                </tr>
              </thead>
              <tbody className="divide-y divide-border">
                {users.data.map((u) => (
                  <UserRow key={u.id} u={u} meId={meId} onConfirm={setPending} />
                ))}
              </tbody>
            </table>
          </div>
        )}
      </section>
      {pending && <ConfirmDialog pending={pending} onClose={() => setPending(null)} />}
    </div>
  );
}
