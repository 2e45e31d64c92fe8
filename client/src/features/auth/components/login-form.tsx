import { useEffect, useId } from 'react';
import { useForm } from 'react-hook-form';
import { zodResolver } from '@hookform/resolvers/zod';
import type { z } from 'zod';
import { loginRequestSchema, type SessionUser } from '@shared/api/auth';
import { Button } from '@/components/ui/button';
import { TextField } from '@/components/ui/text-field';
import { isApiError } from '@/lib/api-client';
import { formatWait } from '@/lib/format';
import { useLogin } from '../api/login';

type LoginFields = z.input<typeof loginRequestSchema>;

// Plain-language messages; the shared schema stays the single definition of what is valid.
const loginErrorMap: z.core.$ZodErrorMap = (issue) => {
  const field = issue.path?.[0];
  const empty = issue.input === '' || issue.input === undefined;
  if (field === 'email') return empty ? 'Enter your email address.' : 'Enter a valid email address, like name@example.org.';
  if (field === 'password') return empty ? 'Enter your password.' : 'That password is too long.';
  return undefined;
};

function serverMessage(error: unknown): string {
  if (!isApiError(error)) return 'Something went wrong while signing in. Try again.';
  if (error.code === 'network_error') return error.message;
  const wait = error.retryAfterSeconds;
  if ((error.status === 423 || error.status === 429) && wait !== undefined) {
    return `${error.message} Try again in ${formatWait(wait)}.`;
  }
  if (error.status >= 500) return 'The server could not sign you in just now. Try again in a moment.';
  return error.message;
}

/** The 400 field errors that belong to a field of this form; any others are shown as a general message. */
function formFieldErrors(error: unknown): { path: keyof LoginFields; message: string }[] {
  if (!isApiError(error) || error.status !== 400) return [];
  return (error.fields ?? []).flatMap((field) =>
    field.path === 'email' || field.path === 'password' ? [{ path: field.path, message: field.message }] : [],
  );
}

export type LoginFormProps = {
  onSignedIn: (user: SessionUser) => void;
  /** Fills both fields, e.g. from the demo account list; a new object refills. */
  prefill?: { email: string; password: string };
};

export function LoginForm({ onSignedIn, prefill }: LoginFormProps) {
  const login = useLogin();
  const formId = useId();
  const {
    register,
    handleSubmit,
    setError,
    setValue,
    formState: { errors },
  } = useForm<LoginFields, unknown, z.output<typeof loginRequestSchema>>({
    resolver: zodResolver(loginRequestSchema, { error: loginErrorMap }),
    defaultValues: { email: '', password: '' },
  });

  useEffect(() => {
    if (!prefill) return;
    setValue('email', prefill.email, { shouldValidate: false });
    setValue('password', prefill.password, { shouldValidate: false });
  }, [prefill, setValue]);

  const onSubmit = handleSubmit((values) => {
    login.mutate(values, {
      onSuccess: onSignedIn,
      onError: (error) => {
        for (const field of formFieldErrors(error)) setError(field.path, { message: field.message });
      },
    });
  });

  const showServerError = login.isError && formFieldErrors(login.error).length === 0;

  return (
    <form onSubmit={onSubmit} noValidate className="flex flex-col gap-3" aria-describedby={showServerError ? `${formId}-server` : undefined}>
      <TextField
        label="Email"
        type="email"
        autoComplete="username"
        spellCheck={false}
        error={errors.email?.message}
        {...register('email')}
      />
      <TextField
        label="Password"
        type="password"
        autoComplete="current-password"
        error={errors.password?.message}
        {...register('password')}
      />
      {showServerError && (
        <p id={`${formId}-server`} role="alert" className="rounded border border-danger/40 bg-raised px-2 py-1.5 text-sm text-danger">
          {serverMessage(login.error)}
        </p>
      )}
      <Button type="submit" variant="primary" disabled={login.isPending} aria-busy={login.isPending || undefined}>
        {login.isPending ? 'Signing in…' : 'Sign in'}
      </Button>
    </form>
  );
}
