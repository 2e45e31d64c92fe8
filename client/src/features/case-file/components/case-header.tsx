import type { ReactNode } from 'react';
import { CASE_STATUS_LABELS, DISPOSITION_LABELS, type CaseDetail } from '@shared/api/cases';
import { Button } from '@/components/ui/button';
import { CardFragment } from '@/components/ui/card-fragment';
import { KeyHint } from '@/components/ui/key-hint';
import { MarginBar } from '@/components/ui/margin-bar';
import { RiskBadge } from '@/components/ui/risk-badge';
import { SlaCountdown } from '@/components/ui/sla-countdown';
import { claimConflictHolder, claimConflictMessage } from '@/lib/claim-conflict';
import { formatMoney } from '@/lib/money';
import { formatDateTime } from '@/lib/time';
import { useChangeStatus } from '../api/change-status';
import type { useClaimCase } from '../api/claim-case';
import { useReleaseCase } from '../api/release-case';
import { RecommendedAction } from './recommended-action';

function Fact({ label, children }: { label: string; children: ReactNode }) {
  return (
    <div className="flex flex-col gap-0.5">
      <dt className="text-xs text-muted">{label}</dt>
      <dd className="text-sm text-text">{children}</dd>
    </div>
  );
}

function errorText(error: unknown): string {
  const holder = claimConflictHolder(error);
  if (holder !== undefined) return claimConflictMessage(holder);
  return error instanceof Error ? error.message : 'The server refused the change.';
}

/** Who holds the case and what they can do with it: claim, release, wait on the cardholder. */
export function CaseWorkActions({
  detail,
  meId,
  claim,
}: {
  detail: CaseDetail;
  meId: number;
  /** Owned by the screen, which also binds it to the c key. */
  claim: ReturnType<typeof useClaimCase>;
}) {
  const c = detail.case;
  const release = useReleaseCase(c.id);
  const status = useChangeStatus(c.id);
  const mine = c.assignee?.id === meId;
  const closed = c.status === 'closed';
  const failed = [claim, release, status].find((m) => m.isError);

  return (
    <div className="flex flex-wrap items-center gap-2">
      {!closed && !mine && (
        <Button size="sm" variant="primary" onClick={() => claim.mutate(undefined)} disabled={claim.isPending}>
          {claim.isPending ? 'Claiming…' : c.assignee ? `Claim (held by ${c.assignee.displayName})` : 'Claim'} <KeyHint keys="c" className="[&_kbd]:text-text" />
        </Button>
      )}
      {!closed && mine && (
        <>
          {c.status === 'waiting_cardholder' ? (
            <Button size="sm" onClick={() => status.mutate('claimed')} disabled={status.isPending}>
              Cardholder answered: back to claimed
            </Button>
          ) : (
            <Button size="sm" onClick={() => status.mutate('waiting_cardholder')} disabled={status.isPending || c.status !== 'claimed'}>
              Wait on cardholder
            </Button>
          )}
          <Button size="sm" variant="ghost" onClick={() => release.mutate(undefined)} disabled={release.isPending}>
            Release to the queue
          </Button>
        </>
      )}
      {failed && (
        <p role="alert" className="text-xs font-medium text-danger">
          {errorText(failed.error)}
        </p>
      )}
    </div>
  );
}

export function CaseHeader({ detail, now, meId, actions }: { detail: CaseDetail; now: number; meId: number; actions: ReactNode }) {
  const c = detail.case;
  return (
    <header className="flex flex-col gap-3 rounded border border-border bg-surface p-3">
      <div className="flex flex-wrap items-baseline justify-between gap-3">
        <h1 className="text-lg font-semibold text-text">
          Case file <span className="font-mono">{c.id}</span>
          <span className="ml-3 text-sm font-normal text-muted">
            {CASE_STATUS_LABELS[c.status] ?? c.status}
            {c.disposition && ` · ${DISPOSITION_LABELS[c.disposition]}`}
            {c.closedAt && ` · closed ${formatDateTime(c.closedAt)}`}
          </span>
        </h1>
        {actions}
      </div>
      <dl className="grid grid-cols-[repeat(auto-fill,minmax(11rem,1fr))] gap-x-5 gap-y-3">
        <Fact label="Fraud probability (highest alert)">
          <span className="inline-flex flex-wrap items-center gap-2">
            <RiskBadge probability={c.probability} />
            <MarginBar margin={c.normalizedMargin} />
          </span>
        </Fact>
        <div className="min-w-52">
          <RecommendedAction action={detail.recommendedAction} />
        </div>
        <Fact label="Amount at risk">
          <span className="font-mono tabular-nums">{formatMoney(c.amountAtRisk)}</span>
        </Fact>
        <Fact label="SLA">{c.status === 'closed' ? <span className="text-muted">Closed</span> : <SlaCountdown dueAt={c.slaDueAt} now={now} />}</Fact>
        <Fact label="Assignee">
          {c.assignee ? (c.assignee.id === meId ? `You (${c.assignee.displayName})` : c.assignee.displayName) : <span className="text-muted">Unassigned</span>}
        </Fact>
        <Fact label="Team">
          {c.team ? <span title={`Routed to ${c.team.name}`}>{c.team.name}</span> : <span className="text-muted">Shared queue</span>}
        </Fact>
        <Fact label="Card">
          <span className="inline-flex items-center gap-2">
            <CardFragment bin={c.card.bin} last4={c.card.last4} />
            <span className={c.card.status === 'blocked' ? 'font-semibold' : 'text-muted'}>{c.card.status === 'blocked' ? 'Blocked' : 'Active'}</span>
          </span>
        </Fact>
        <Fact label="Cardholder">
          <span className="font-mono text-xs">{c.cardholder.ref}</span>
          {c.cardholder.name && <span className="ml-1.5">{c.cardholder.name}</span>}
        </Fact>
        <Fact label="Alerts">
          <span className="tabular-nums">{c.alertCount}</span>
          <span className="ml-1.5 text-xs text-muted">first {formatDateTime(c.firstAlertAt)}</span>
        </Fact>
      </dl>
    </header>
  );
}
