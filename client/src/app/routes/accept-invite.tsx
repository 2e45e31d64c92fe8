import { useSearchParams } from 'react-router';
import { Wordmark } from '@/components/ui/wordmark';
import { AcceptInviteForm } from '@/features/invite/components/accept-invite-form';

/** The page an invitation e-mail links to: public, outside the signed-in layout. */
export function AcceptInviteRoute() {
  const [params] = useSearchParams();
  return (
    <div className="flex min-h-screen items-start justify-center bg-canvas px-4 pt-[12vh]">
      <title>Set your password · Edgecase</title>
      <main className="flex w-full max-w-sm flex-col gap-4">
        <Wordmark className="text-xl" />
        <div className="rounded border border-border bg-surface p-4">
          <h1 className="mb-3 text-base font-semibold text-text">Set your password</h1>
          <AcceptInviteForm token={params.get('token') ?? ''} />
        </div>
      </main>
    </div>
  );
}
