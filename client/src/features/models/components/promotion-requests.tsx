import { useId, useState } from 'react';
import { PROMOTION_STATUS_LABELS, type PromotionRequest } from '@shared/api/models';
import { Button } from '@/components/ui/button';
import { TextareaField } from '@/components/ui/textarea-field';
import { isApiError } from '@/lib/api-client';
import { formatDateTime } from '@/lib/time';
import { useDecidePromotion } from '../api/decide-promotion';
import { usePromotions } from '../api/get-promotions';
import { useWithdrawPromotion } from '../api/withdraw-promotion';

/** A supervisor's decision on one pending request: approve as it is, or turn it down saying why. */
function DecisionForm({ request }: { request: PromotionRequest }) {
  const id = useId();
  const [note, setNote] = useState('');
  const decide = useDecidePromotion();
  const error = decide.error ? (isApiError(decide.error) ? decide.error.message : 'The decision could not be saved.') : null;
  const noteError = decide.error && isApiError(decide.error) ? decide.error.fields?.find((f) => f.path === 'note')?.message : undefined;
  return (
    <div className="mt-2 flex flex-col gap-2">
      <TextareaField
        id={`${id}-note`}
        label="Note"
        hint="Optional when approving; say why when turning it down."
        rows={2}
        value={note}
        error={noteError}
        onChange={(e) => setNote(e.target.value)}
      />
      {error && !noteError && (
        <p role="alert" className="text-xs text-danger">
          {error}
        </p>
      )}
      <div className="flex gap-2">
        <Button variant="primary" size="sm" disabled={decide.isPending} onClick={() => decide.mutate({ id: request.id, decision: 'approve', note })}>
          Approve {request.kind === 'rollback' ? 'rollback' : 'promotion'}
        </Button>
        <Button size="sm" disabled={decide.isPending} onClick={() => decide.mutate({ id: request.id, decision: 'reject', note })}>
          Turn down
        </Button>
      </div>
    </div>
  );
}

/**
 * Promotion and rollback requests, pending first: supervisors decide here,
 * the requester can withdraw a pending one.
 */
export function PromotionRequests({ meId, canApprove }: { meId: number; canApprove: boolean }) {
  const { data: requests, isPending } = usePromotions();
  const withdraw = useWithdrawPromotion();
  if (isPending) return <p className="text-sm text-muted">Loading requests…</p>;
  if (!requests || requests.length === 0) return <p className="text-sm text-muted">No promotion requests yet.</p>;
  return (
    <ul className="flex flex-col divide-y divide-border">
      {requests.slice(0, 12).map((r) => (
        <li key={r.id} className="py-2 text-sm">
          <p className="flex flex-wrap items-baseline gap-x-2">
            <span className="font-semibold text-text">
              #{r.id} {r.kind === 'rollback' ? 'Roll back to' : 'Promote'} {r.modelVersion.label}
            </span>
            <span className="text-xs text-muted">
              replacing {r.fromChampion?.label ?? 'no champion'} · {PROMOTION_STATUS_LABELS[r.status]} · filed by {r.requestedBy.displayName} {formatDateTime(r.requestedAt)}
            </span>
          </p>
          <p className="mt-1 max-w-prose whitespace-pre-line text-text">{r.reason}</p>
          {r.decidedBy && r.status !== 'withdrawn' && (
            <p className="mt-1 text-xs text-muted">
              {PROMOTION_STATUS_LABELS[r.status]} by {r.decidedBy.displayName} {r.decidedAt ? formatDateTime(r.decidedAt) : ''}
              {r.decisionNote ? `: ${r.decisionNote}` : ''}
            </p>
          )}
          {r.status === 'pending' && canApprove && r.requestedBy.id !== meId && <DecisionForm request={r} />}
          {r.status === 'pending' && r.requestedBy.id === meId && (
            <Button size="sm" className="mt-1" disabled={withdraw.isPending} onClick={() => withdraw.mutate(r.id)}>
              Withdraw
            </Button>
          )}
        </li>
      ))}
    </ul>
  );
}
