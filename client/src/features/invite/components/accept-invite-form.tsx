import { zodResolver } from '@hookform/resolvers/zod';
import { useForm } from 'react-hook-form';
import { Link } from 'react-router';
import { z } from 'zod';
import { acceptInviteSchema, NEW_PASSWORD_MIN } from '@shared/api/admin';
import { ROLE_LABELS } from '@shared/auth/roles';
import { Button } from '@/components/ui/button';
import { LoadingLine } from '@/components/ui/spinner';
import { TextField } from '@/components/ui/text-field';
import { useAcceptInvite } from '../api/accept-invite';
import { useInvite } from '../api/lookup-invite';

const formSchema = z
  .object({ password: acceptInviteSchema.shape.password, repeat: z.string() })
  .refine((v) => v.password === v.repeat, { path: ['repeat'], message: 'The two entries differ' });
type Form = z.infer<typeof formSchema>;

/** Choose a password for an invited account. The link works once; afterwards the person signs in as usual. */
export function AcceptInviteForm({ token }: { token: string }) {
  const invite = useInvite(token);
  const accept = useAcceptInvite();
  const form = useForm<Form>({ resolver: zodResolver(formSchema), defaultValues: { password: '', repeat: '' } });

  if (token.length < 20) return <p role="alert" className="text-sm text-danger">This link is incomplete. Open it from the e-mail again.</p>;
  if (invite.isPending) return <LoadingLine label="Checking the link…" />;
  if (invite.isError)
    return (
      <p role="alert" className="text-sm text-danger">
        {invite.error.message}
      </p>
    );
  if (accept.isSuccess)
    return (
      <div role="status" className="flex flex-col gap-2 text-sm">
        <p>Your password is set. Sign in with {accept.data.email}.</p>
        <Link to="/sign-in" className="text-link underline underline-offset-2">
          Go to sign-in
        </Link>
      </div>
    );
  const err = form.formState.errors;
  return (
    <form className="flex flex-col gap-3" noValidate onSubmit={form.handleSubmit((v) => accept.mutate({ token, password: v.password }))}>
      <p className="text-sm">
        {invite.data.displayName}, you are joining as {ROLE_LABELS[invite.data.role]} ({invite.data.email}).
      </p>
      <input type="email" autoComplete="username" value={invite.data.email} readOnly hidden />
      <TextField
        label="New password"
        type="password"
        autoComplete="new-password"
        aria-describedby="password-rule"
        {...form.register('password')}
        error={err.password?.message}
      />
      <p id="password-rule" className="-mt-2 text-xs text-muted">
        At least {NEW_PASSWORD_MIN} characters; a few words you can remember work well.
      </p>
      <TextField label="The same again" type="password" autoComplete="new-password" {...form.register('repeat')} error={err.repeat?.message} />
      {accept.isError && (
        <p role="alert" className="text-sm text-danger">
          {accept.error.message}
        </p>
      )}
      <Button type="submit" variant="primary" disabled={accept.isPending}>
        Set password
      </Button>
    </form>
  );
}
