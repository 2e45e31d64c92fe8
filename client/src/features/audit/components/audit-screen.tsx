import { useState } from 'react';
import { useSearchParams } from 'react-router';
import { AUDIT_OUTCOMES, type AuditItem } from '@shared/api/audit';
import { Button } from '@/components/ui/button';
import { PanelBoundary } from '@/components/ui/panel-boundary';
import { NowPanel, ScreenHeader } from '@/components/ui/screen-header';
import { LoadingLine } from '@/components/ui/spinner';
import { TextField } from '@/components/ui/text-field';
import { cn } from '@/lib/cn';
import { formatDateTime } from '@/lib/time';
import { auditExportHref, useAudit } from '../api/get-audit';
import { useAuditFacets } from '../api/get-audit-facets';
import { useVerifyAuditChain } from '../api/verify-audit-chain';
import { filtersFromSearch, type AuditFilters } from '../utils/audit-search';

const OUTCOME_LOOK: Record<AuditItem['outcome'], string> = { success: 'text-text', failure: 'text-danger font-medium', denied: 'text-warn font-medium' };

/** datetime-local speaks local wall time; the API speaks UTC instants. */
const toLocalInput = (iso: string | undefined) => {
  if (!iso) return '';
  const d = new Date(iso);
  if (Number.isNaN(d.getTime())) return '';
  return new Date(d.getTime() - d.getTimezoneOffset() * 60_000).toISOString().slice(0, 16);
};
const fromLocalInput = (v: string) => (v ? new Date(v).toISOString() : '');

function Filters({ filters, onApply }: { filters: AuditFilters; onApply: (f: AuditFilters) => void }) {
  const facets = useAuditFacets();
  const [draft, setDraft] = useState<AuditFilters>(filters);
  const set = (k: keyof AuditFilters, v: string) => setDraft({ ...draft, [k]: v || undefined });
  const select = 'h-9 rounded border border-control bg-surface px-2 text-sm font-normal';
  return (
    <form
      aria-label="Filter the audit log"
      className="flex flex-wrap items-end gap-2 rounded border border-border bg-surface p-3"
      onSubmit={(e) => {
        e.preventDefault();
        onApply({ ...draft, page: undefined });
      }}
    >
      <label className="flex flex-col gap-1 text-sm font-medium">
        Person
        <select className={select} value={draft.actorId ?? ''} onChange={(e) => set('actorId', e.target.value)}>
          <option value="">Anyone</option>
          {facets.data?.people.map((p) => (
            <option key={p.id} value={p.id}>
              {p.label}
            </option>
          ))}
        </select>
      </label>
      <label className="flex flex-col gap-1 text-sm font-medium">
        Action
        <select className={select} value={draft.action ?? ''} onChange={(e) => set('action', e.target.value)}>
          <option value="">Any action</option>
          {[...new Set(facets.data?.actions.map((a) => `${a.split('.')[0]}.`))].map((family) => (
            <option key={family} value={family}>
              every {family}…
            </option>
          ))}
          {facets.data?.actions.map((a) => (
            <option key={a} value={a}>
              {a}
            </option>
          ))}
        </select>
      </label>
      <label className="flex flex-col gap-1 text-sm font-medium">
        Record type
        <select className={select} value={draft.targetType ?? ''} onChange={(e) => set('targetType', e.target.value)}>
          <option value="">Any</option>
          {facets.data?.targetTypes.map((t) => (
            <option key={t} value={t}>
              {t}
            </option>
          ))}
        </select>
      </label>
      <TextField className="w-28" label="Record id" value={draft.targetId ?? ''} onChange={(e) => set('targetId', e.target.value.trim())} />
      <label className="flex flex-col gap-1 text-sm font-medium">
        Outcome
        <select className={select} value={draft.outcome ?? ''} onChange={(e) => set('outcome', e.target.value)}>
          <option value="">Any</option>
          {AUDIT_OUTCOMES.map((o) => (
            <option key={o} value={o}>
              {o}
            </option>
          ))}
        </select>
      </label>
      <TextField className="w-52" label="From" type="datetime-local" value={toLocalInput(draft.from)} onChange={(e) => set('from', fromLocalInput(e.target.value))} />
      <TextField className="w-52" label="To" type="datetime-local" value={toLocalInput(draft.to)} onChange={(e) => set('to', fromLocalInput(e.target.value))} />
      <Button type="submit" variant="primary">
        Apply filters
      </Button>
      <Button
        onClick={() => {
          setDraft({});
          onApply({});
        }}
      >
        Clear
      </Button>
    </form>
  );
}

function Details({ d }: { d: Record<string, unknown> | null }) {
  if (!d) return <span className="text-muted">–</span>;
  const text = JSON.stringify(d, null, 1);
  if (text.length <= 80) return <code className="font-mono text-xs break-all">{JSON.stringify(d)}</code>;
  return (
    <details>
      <summary className="cursor-pointer text-xs text-link">{Object.keys(d).slice(0, 4).join(', ')}…</summary>
      <pre className="mt-1 max-w-lg overflow-x-auto font-mono text-xs whitespace-pre-wrap">{text}</pre>
    </details>
  );
}

function ChainCheck() {
  const verify = useVerifyAuditChain();
  const r = verify.data;
  return (
    <div className="flex flex-wrap items-center gap-3">
      <Button disabled={verify.isPending} onClick={() => verify.mutate()}>
        {verify.isPending ? 'Verifying…' : 'Verify chain'}
      </Button>
      <span role="status" className="text-sm">
        {r &&
          (r.ok ? (
            <span className="text-ok">
              Intact: all {r.checked.toLocaleString('en')} rows match their hashes (checked {formatDateTime(r.verifiedAt, { seconds: true })}).
            </span>
          ) : (
            <span className="font-medium text-danger">
              Broken at row #{r.firstBadId}: {r.reason}. {r.checked.toLocaleString('en')} rows before it verified.
            </span>
          ))}
        {verify.isError && <span className="text-danger">{verify.error.message}</span>}
      </span>
    </div>
  );
}

/** Audit: who did what and when, filtered, paged, exported; and a check that nothing was edited. */
export function AuditScreen() {
  const [params, setParams] = useSearchParams();
  const filters = filtersFromSearch(params);
  const page = useAudit(filters);
  const pageNo = Number(filters.page ?? 1);
  const pages = page.data ? Math.max(1, Math.ceil(page.data.total / page.data.pageSize)) : 1;
  const apply = (f: AuditFilters) => setParams(Object.fromEntries(Object.entries(f).filter(([, v]) => v)) as Record<string, string>);
  return (
    <div className="flex flex-col gap-4">
      <title>Audit · Edgecase</title>
      <ScreenHeader title="Audit">
        <NowPanel>
          <p>
            {page.data ? `${page.data.total.toLocaleString('en')} entries match.` : 'Loading…'} The log is append-only (the database refuses edits) and each
            row carries the hash of the one before: verify the chain to see that no row was changed.
          </p>
          <div className="mt-2">
            <ChainCheck />
          </div>
        </NowPanel>
      </ScreenHeader>
      <Filters key={params.toString()} filters={filters} onApply={apply} />
      <div className="flex items-center gap-3 text-sm">
        <a className="text-link underline underline-offset-2" href={auditExportHref(filters)} download>
          Export these entries as CSV
        </a>
        <span className="text-xs text-muted">Oldest first, at most 50,000 rows; cells a spreadsheet would run as a formula start with '.</span>
      </div>
      <PanelBoundary title="Audit entries">
        {page.isPending ? (
          <LoadingLine />
        ) : page.isError ? (
          <p role="alert" className="text-sm text-danger">
            The audit log could not be loaded: {page.error.message}
          </p>
        ) : (
          <div className="overflow-x-auto rounded border border-border bg-surface">
            <table className="w-full text-sm">
              <caption className="sr-only">Audit entries, newest first</caption>
              <thead className="border-b border-border text-left text-xs text-muted">
                <tr>
                  <th scope="col" className="px-3 py-2 font-medium">#</th>
                  <th scope="col" className="px-3 py-2 font-medium">When</th>
                  <th scope="col" className="px-3 py-2 font-medium">Who</th>
                  <th scope="col" className="px-3 py-2 font-medium">Action</th>
                  <th scope="col" className="px-3 py-2 font-medium">Record</th>
                  <th scope="col" className="px-3 py-2 font-medium">Outcome</th>
                  <th scope="col" className="px-3 py-2 font-medium">Details</th>
                </tr>
              </thead>
              <tbody className="divide-y divide-border">
                {page.data.items.map((r) => (
                  <tr key={r.id}>
                    <td className="px-3 py-1.5 font-mono text-xs text-muted">{r.id}</td>
                    <td className="px-3 py-1.5 whitespace-nowrap tabular-nums" title={r.occurredAt}>
                      {formatDateTime(r.occurredAt, { seconds: true })}
                    </td>
                    <td className="px-3 py-1.5">
                      {r.actorLabel ?? <span className="text-muted">{r.actorType}</span>}
                      {r.ip && <span className="block text-xs text-muted">{r.ip}</span>}
                    </td>
                    <td className="px-3 py-1.5 font-mono text-xs">{r.action}</td>
                    <td className="px-3 py-1.5 text-xs">{r.targetType ? `${r.targetType} ${r.targetId ?? ''}` : '–'}</td>
                    <td className={cn('px-3 py-1.5', OUTCOME_LOOK[r.outcome])}>{r.outcome}</td>
                    <td className="px-3 py-1.5">
                      <Details d={r.details} />
                    </td>
                  </tr>
                ))}
                {page.data.items.length === 0 && (
                  <tr>
                    <td colSpan={7} className="px-3 py-3 text-center text-muted">
                      Nothing matches these filters.
                    </td>
                  </tr>
                )}
              </tbody>
            </table>
          </div>
        )}
      </PanelBoundary>
      {pages > 1 && (
        <nav aria-label="Audit pages" className="flex items-center gap-2 text-sm">
          <Button size="sm" disabled={pageNo <= 1} onClick={() => apply({ ...filters, page: String(pageNo - 1) })}>
            Newer
          </Button>
          <span>
            Page {pageNo} of {pages}
          </span>
          <Button size="sm" disabled={pageNo >= pages} onClick={() => apply({ ...filters, page: String(pageNo + 1) })}>
            Older
          </Button>
        </nav>
      )}
    </div>
  );
}
