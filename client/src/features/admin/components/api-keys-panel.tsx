import { useRef, useState } from 'react';
import { API_KEY_SCOPE_LABELS, API_KEY_SCOPE_LIST, type AdminApiKey, type ApiKeyCreated } from '@shared/api/admin';
import { Button } from '@/components/ui/button';
import { Dialog } from '@/components/ui/dialog';
import { LoadingLine } from '@/components/ui/spinner';
import { TextField } from '@/components/ui/text-field';
import { formatDateTime } from '@/lib/time';
import { useCreateApiKey } from '../api/create-api-key';
import { useApiKeys } from '../api/get-api-keys';
import { useRevokeApiKey } from '../api/revoke-api-key';

type Scope = (typeof API_KEY_SCOPE_LIST)[number];

/** The new key, shown once: copy it now, nothing shows it again. */
function NewKeyDialog({ created, onClose }: { created: ApiKeyCreated; onClose: () => void }) {
  const [copied, setCopied] = useState(false);
  const field = useRef<HTMLInputElement>(null);
  return (
    <Dialog title={`Key for ${created.apiKey.name}`} onClose={onClose} initialFocus={field}>
      <div className="flex flex-col gap-3 text-sm">
        <p>Copy it into the upstream system now. Edgecase keeps only a hash of it: this is the only time it is shown.</p>
        <input
          ref={field}
          readOnly
          aria-label="The new API key"
          className="h-9 rounded border border-control bg-raised px-2 font-mono text-xs"
          value={created.key}
          onFocus={(e) => e.currentTarget.select()}
        />
        <div className="flex justify-end gap-2">
          <Button
            onClick={() => {
              void navigator.clipboard?.writeText(created.key).then(() => setCopied(true));
            }}
          >
            {copied ? 'Copied' : 'Copy'}
          </Button>
          <Button variant="primary" onClick={onClose}>
            I have stored it
          </Button>
        </div>
      </div>
    </Dialog>
  );
}

function KeyRow({ k, onRevoke }: { k: AdminApiKey; onRevoke: (k: AdminApiKey) => void }) {
  return (
    <tr>
      <th scope="row" className="px-3 py-1.5 text-left font-normal">
        {k.name}
        <span className="ml-2 font-mono text-xs text-muted">{k.keyPrefix}…</span>
      </th>
      <td className="px-3 py-1.5 text-xs">{k.scopes.map((s) => API_KEY_SCOPE_LABELS[s as Scope] ?? s).join(', ')}</td>
      <td className="px-3 py-1.5 text-sm tabular-nums">{formatDateTime(k.createdAt)}</td>
      <td className="px-3 py-1.5 text-sm tabular-nums">{k.lastUsedAt ? formatDateTime(k.lastUsedAt) : <span className="text-muted">never</span>}</td>
      <td className="px-3 py-1.5 text-sm">
        {k.revokedAt ? (
          <span className="text-muted">Revoked {formatDateTime(k.revokedAt)}</span>
        ) : (
          <Button size="sm" variant="ghost" onClick={() => onRevoke(k)} aria-label={`Revoke ${k.name}`}>
            Revoke
          </Button>
        )}
      </td>
    </tr>
  );
}

/** API keys of the upstream systems that send transactions: list, create (shown once), revoke. */
export function ApiKeysPanel() {
  const keys = useApiKeys();
  const create = useCreateApiKey();
  const revoke = useRevokeApiKey();
  const [name, setName] = useState('');
  const [scopes, setScopes] = useState<Set<Scope>>(new Set(['transactions:write', 'transactions:read']));
  const [created, setCreated] = useState<ApiKeyCreated | null>(null);
  const [revoking, setRevoking] = useState<AdminApiKey | null>(null);
  return (
    <section aria-labelledby="keys-heading" className="flex flex-col gap-2">
      <h2 id="keys-heading" className="text-sm font-semibold text-text">
        API keys for upstream systems
      </h2>
      <form
        className="flex flex-wrap items-end gap-3 rounded border border-border bg-surface p-3"
        onSubmit={(e) => {
          e.preventDefault();
          create.mutate(
            { name: name.trim(), scopes: [...scopes] },
            {
              onSuccess: (c) => {
                setCreated(c);
                setName('');
              },
            },
          );
        }}
      >
        <TextField className="w-64" label="Name of the system" value={name} onChange={(e) => setName(e.target.value)} minLength={3} maxLength={80} required />
        <fieldset className="flex flex-wrap gap-x-3 gap-y-1">
          <legend className="text-xs text-muted">May</legend>
          {API_KEY_SCOPE_LIST.map((s) => (
            <label key={s} className="flex items-center gap-1.5 text-sm">
              <input
                type="checkbox"
                checked={scopes.has(s)}
                onChange={(e) => {
                  const next = new Set(scopes);
                  if (e.target.checked) next.add(s);
                  else next.delete(s);
                  setScopes(next);
                }}
              />
              {API_KEY_SCOPE_LABELS[s]}
            </label>
          ))}
        </fieldset>
        <Button type="submit" variant="primary" disabled={create.isPending || name.trim().length < 3 || scopes.size === 0}>
          Create key
        </Button>
        {create.isError && (
          <p role="alert" className="w-full text-xs text-danger">
            {create.error.message}
          </p>
        )}
      </form>
      {keys.isPending ? (
        <LoadingLine />
      ) : keys.isError ? (
        <p role="alert" className="text-sm text-danger">
          API keys could not be loaded: {keys.error.message}
        </p>
      ) : (
        <div className="overflow-x-auto rounded border border-border bg-surface">
          <table className="w-full text-sm">
            <caption className="sr-only">API keys</caption>
            <thead className="border-b border-border text-left text-xs text-muted">
              <tr>
                <th scope="col" className="px-3 py-2 font-medium">System</th>
                <th scope="col" className="px-3 py-2 font-medium">May</th>
                <th scope="col" className="px-3 py-2 font-medium">Created</th>
                <th scope="col" className="px-3 py-2 font-medium">Last used</th>
                <th scope="col" className="px-3 py-2 font-medium">State</th>
              </tr>
            </thead>
            <tbody className="divide-y divide-border">
              {keys.data.map((k) => (
                <KeyRow key={k.id} k={k} onRevoke={setRevoking} />
              ))}
            </tbody>
          </table>
        </div>
      )}
      {created && (
        <NewKeyDialog
          created={created}
          onClose={() => {
            setCreated(null);
            create.reset();
          }}
        />
      )}
      {revoking && (
        <Dialog title={`Revoke the key of ${revoking.name}?`} onClose={() => setRevoking(null)}>
          <div className="flex flex-col gap-3 text-sm">
            <p>The system using it is refused from its next request. A revoked key cannot be restored; create a new one instead.</p>
            {revoke.isError && (
              <p role="alert" className="text-xs text-danger">
                {revoke.error.message}
              </p>
            )}
            <div className="flex justify-end gap-2">
              <Button onClick={() => setRevoking(null)}>Cancel</Button>
              <Button variant="primary" disabled={revoke.isPending} onClick={() => revoke.mutate(revoking.id, { onSuccess: () => setRevoking(null) })}>
                Revoke
              </Button>
            </div>
          </div>
        </Dialog>
      )}
    </section>
  );
}
