import type { QueryClient } from '@tanstack/react-query';
import { useState } from 'react';
import { redirect, useNavigate, useSearchParams, type LoaderFunctionArgs } from 'react-router';
import type { SessionUser } from '@shared/api/auth';
import { Wordmark } from '@/components/ui/wordmark';
import { meQueryOptions } from '@/features/auth/api/get-me';
import { DemoAccountsNote } from '@/features/auth/components/demo-accounts-note';
import { LoginForm } from '@/features/auth/components/login-form';
import { postSignInPath } from '../screens';

/** Someone already signed in has no business on this page: send them on. */
export function signInLoader(queryClient: QueryClient) {
  return async ({ request }: LoaderFunctionArgs) => {
    let user: SessionUser | null = null;
    try {
      // No retries here: the form must appear at once even when the server is struggling.
      user = await queryClient.ensureQueryData({ ...meQueryOptions(), retry: false });
    } catch {
      // Server unreachable: show the form; signing in will report the problem.
    }
    if (user) throw redirect(postSignInPath(new URL(request.url).searchParams.get('next'), user.role));
    return null;
  };
}

export function SignInRoute() {
  const navigate = useNavigate();
  const [params] = useSearchParams();
  const [prefill, setPrefill] = useState<{ email: string; password: string }>();

  return (
    <div className="flex min-h-screen items-start justify-center bg-canvas px-4 pt-[12vh]">
      <title>Sign in · Edgecase</title>
      <main className="flex w-full max-w-sm flex-col gap-4">
        <div className="flex flex-col gap-1">
          <Wordmark className="text-xl" />
          <p className="text-sm text-muted">Alert triage and case work for fraud operations staff.</p>
        </div>
        <div className="rounded border border-border bg-surface p-4">
          <h1 className="mb-3 text-base font-semibold text-text">Sign in</h1>
          <LoginForm
            prefill={prefill}
            onSignedIn={(user) => navigate(postSignInPath(params.get('next'), user.role), { replace: true })}
          />
        </div>
        <DemoAccountsNote onPick={setPrefill} />
      </main>
    </div>
  );
}
