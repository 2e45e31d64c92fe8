import { ROLE_LABELS } from '@shared/auth/roles';
import { Button } from '@/components/ui/button';
import { useDemoInfo } from '../api/get-demo-info';

/**
 * The local demo's accounts, so a visitor can try each role. Renders nothing
 * outside the demo (the endpoint answers 404 there) or when the call fails.
 */
export function DemoAccountsNote({ onPick }: { onPick: (credentials: { email: string; password: string }) => void }) {
  const { data } = useDemoInfo();
  if (!data) return null;
  return (
    <section aria-labelledby="demo-accounts-heading" className="rounded border border-border bg-raised p-3 text-xs text-muted">
      <h2 id="demo-accounts-heading" className="font-semibold text-text">
        Demo accounts
      </h2>
      <p className="mt-1">
        Local demo with invented data. Every account uses the password{' '}
        <code className="font-mono text-text">{data.password}</code>.
      </p>
      <ul className="mt-2 flex flex-col gap-1">
        {data.accounts.map((account) => (
          <li key={account.email} className="flex items-center justify-between gap-2">
            <span>
              <span className="font-mono text-text">{account.email}</span>{' '}
              <span>({ROLE_LABELS[account.role]})</span>
            </span>
            <Button
              size="sm"
              variant="ghost"
              aria-label={`Fill in ${account.email}`}
              onClick={() => onPick({ email: account.email, password: data.password })}
            >
              Use
            </Button>
          </li>
        ))}
      </ul>
    </section>
  );
}
