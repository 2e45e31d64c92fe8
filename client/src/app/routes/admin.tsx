import { NowPanel, ScreenHeader } from '@/components/ui/screen-header';

export function AdminRoute() {
  return (
    <div className="flex flex-col gap-4">
      <title>Admin · Edgecase</title>
      <ScreenHeader title="Admin">
        <NowPanel>
          Not connected to accounts yet. This will show locked accounts and API keys that have not been used or
          are due for rotation.
        </NowPanel>
      </ScreenHeader>
      <p className="max-w-prose text-sm text-muted">
        Coming here: staff accounts and their roles, deactivation (which ends the person's sessions at once), and
        API keys for the upstream systems that send transactions.
      </p>
    </div>
  );
}
