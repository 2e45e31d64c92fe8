import { useState } from 'react';
import { Link } from 'react-router';
import { DISPOSITION_LABELS, FRAUD_TYPE_LABELS, type FraudType } from '@shared/api/cases';
import type { CaseApproval } from '@shared/api/supervision';
import { Button } from '@/components/ui/button';
import { CautionNote } from '@/components/ui/caution-note';
import { Dialog } from '@/components/ui/dialog';
import { LoadingLine } from '@/components/ui/spinner';
import { RiskBadge } from '@/components/ui/risk-badge';
import { TextareaField } from '@/components/ui/textarea-field';
import { formatMoney } from '@/lib/money';
import { formatDateTime, formatSpan, useNow } from '@/lib/time';
import { useApprovals } from '../api/get-approvals';
import { useApproveProposal } from '../api/approve-proposal';
import { useReturnProposal } from '../api/return-proposal';

function ReturnDialog({ approval, onClose }: { approval: CaseApproval; onClose: () => void }) {
  const [note, setNote] = useState('');
  const send = useReturnProposal();
  const tooShort = note.trim().length < 5;
  return (
    <Dialog title={`Return case #${approval.caseId} to ${approval.proposedBy.displayName}`} onClose={onClose}>
      <form
        className="flex flex-col gap-3"
        onSubmit={(e) => {
          e.preventDefault();
          if (!tooShort) send.mutate({ id: approval.id, note: note.trim() }, { onSuccess: onClose });
        }}
      >
        <TextareaField
          label="What needs another look"
          hint="Shown on the case to the investigator. The case goes back to them, claimed."
          rows={3}
          value={note}
          onChange={(e) => setNote(e.target.value)}
          error={send.isError ? send.error.message : undefined}
        />
        <div className="flex justify-end gap-2">
          <Button onClick={onClose}>Cancel</Button>
          <Button type="submit" variant="primary" disabled={tooShort || send.isPending}>
            Return with note
          </Button>
        </div>
      </form>
    </Dialog>
  );
}

function ApprovalItem({ a, meId, now }: { a: CaseApproval; meId: number; now: number }) {
  const approve = useApproveProposal();
  const [returning, setReturning] = useState(false);
  const own = a.proposedBy.id === meId;
  return (
    <li className="flex flex-col gap-2 py-2 sm:flex-row sm:items-start sm:gap-4">
      <div className="flex min-w-0 flex-1 flex-col gap-1">
        <p className="flex flex-wrap items-center gap-2 text-sm">
          <Link to={`/cases/${a.caseId}`} className="font-mono text-link underline-offset-2 hover:underline">
            #{a.caseId}
          </Link>
          <span className="font-medium">{DISPOSITION_LABELS[a.disposition]}</span>
          {a.fraudType && <span className="text-muted">({FRAUD_TYPE_LABELS[a.fraudType as FraudType] ?? a.fraudType})</span>}
          <span className="font-mono tabular-nums">{formatMoney(a.case.amountAtRisk)} at risk</span>
          <RiskBadge probability={a.case.probability} />
        </p>
        <p className="text-xs text-muted">
          Proposed by {a.proposedBy.displayName}, waiting {formatSpan(now - Date.parse(a.createdAt))} (since {formatDateTime(a.createdAt)})
          {a.amountConfirmed && `; confirmed loss ${formatMoney(a.amountConfirmed)}`}
        </p>
        <p className="text-sm whitespace-pre-wrap">{a.reason}</p>
        {approve.isError && (
          <p role="alert" className="text-xs text-danger">
            {approve.error.message}
          </p>
        )}
      </div>
      <div className="flex flex-none items-center gap-2">
        {own ? (
          <p className="max-w-48 text-xs text-muted">Your proposal: another supervisor decides.</p>
        ) : (
          <>
            <Button size="sm" variant="primary" disabled={approve.isPending} onClick={() => approve.mutate({ id: a.id })}>
              Approve #{a.caseId}
            </Button>
            <Button size="sm" onClick={() => setReturning(true)}>
              Return…
            </Button>
          </>
        )}
      </div>
      {returning && <ReturnDialog approval={a} onClose={() => setReturning(false)} />}
    </li>
  );
}

/**
 * Decisions above the four-eyes limit wait here. Approving closes the case
 * and counts its labels; returning sends it back to the investigator with a
 * note. Nobody decides their own proposal.
 */
export function ApprovalsList({ meId }: { meId: number }) {
  const query = useApprovals('pending');
  const now = useNow(30_000);
  return (
    <section aria-labelledby="approvals-heading" className="flex flex-col gap-2 rounded border border-border bg-surface p-3">
      <h2 id="approvals-heading" className="text-sm font-semibold text-text">
        Approvals {query.data ? `(${query.data.length} waiting)` : ''}
      </h2>
      {query.isPending ? (
        <LoadingLine />
      ) : query.isError ? (
        <p role="alert" className="text-sm text-danger">
          Approvals could not be loaded: {query.error.message}
        </p>
      ) : query.data.length === 0 ? (
        <p className="text-sm text-muted">Nothing waits for a second pair of eyes.</p>
      ) : (
        <>
          <CautionNote />
          <ul className="divide-y divide-border">
            {query.data.map((a) => (
              <ApprovalItem key={a.id} a={a} meId={meId} now={now} />
            ))}
          </ul>
        </>
      )}
    </section>
  );
}
