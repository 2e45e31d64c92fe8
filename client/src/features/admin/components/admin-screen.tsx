import { PanelBoundary } from '@/components/ui/panel-boundary';
import { NowPanel, ScreenHeader } from '@/components/ui/screen-header';
import { useApiKeys } from '../api/get-api-keys';
import { useUsers } from '../api/get-users';
import { ApiKeysPanel } from './api-keys-panel';
import { DemoFeedPanel } from './demo-feed-panel';
import { UsersPanel } from './users-panel';

function Now() {
  const users = useUsers();
  const keys = useApiKeys();
  if (!users.data) return <NowPanel>{users.isError ? `Accounts could not be loaded: ${users.error.message}` : 'Loading accounts…'}</NowPanel>;
  const locked = users.data.filter((u) => u.lockedUntil !== null);
  const invited = users.data.filter((u) => u.status === 'invited');
  const unused = (keys.data ?? []).filter((k) => !k.revokedAt && !k.lastUsedAt);
  return (
    <NowPanel>
      <ul className="flex flex-wrap gap-x-6 gap-y-1">
        <li>
          <span className="font-semibold tabular-nums">{locked.length}</span> locked out{locked.length ? `: ${locked.map((u) => u.displayName).join(', ')}` : ''}
        </li>
        <li>
          <span className="font-semibold tabular-nums">{invited.length}</span> {invited.length === 1 ? 'invitation' : 'invitations'} not yet accepted
        </li>
        <li>
          <span className="font-semibold tabular-nums">{unused.length}</span> API {unused.length === 1 ? 'key' : 'keys'} never used
        </li>
      </ul>
    </NowPanel>
  );
}

/** Admin: people, API keys and, in the local demo, the transaction feed. */
export function AdminScreen({ meId }: { meId: number }) {
  return (
    <div className="flex flex-col gap-4">
      <title>Admin · Edgecase</title>
      <ScreenHeader title="Admin">
        <Now />
      </ScreenHeader>
      <PanelBoundary title="Staff accounts">
        <UsersPanel meId={meId} />
      </PanelBoundary>
      <PanelBoundary title="API keys">
        <ApiKeysPanel />
      </PanelBoundary>
      <PanelBoundary title="Demo transaction feed">
        <DemoFeedPanel />
      </PanelBoundary>
    </div>
  );
}
