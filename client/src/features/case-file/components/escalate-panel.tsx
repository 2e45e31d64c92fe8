import { escalateSchema, type CaseDetail } from '@shared/api/cases';
import { useEscalateCase } from '../api/escalate-case';
import { TextForm } from './text-form';

/** Hand the case up, saying why. */
export function EscalatePanel({ detail }: { detail: CaseDetail }) {
  const escalate = useEscalateCase(detail.case.id);
  const { status } = detail.case;
  const closed = status === 'closed';
  return (
    <div className="flex flex-col gap-2">
      {status === 'escalated' && <p className="text-xs font-medium text-text">This case is escalated already.</p>}
      <TextForm
        label="Why escalate"
        hint="For a supervisor: what you found and what you need decided."
        schema={escalateSchema.shape.reason}
        submitLabel="Escalate"
        pendingLabel="Escalating…"
        rows={2}
        disabled={closed || status === 'escalated'}
        onSubmit={(reason) => escalate.mutateAsync(reason)}
      />
    </div>
  );
}
