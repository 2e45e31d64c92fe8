import { useState } from 'react';
import type { BoardPerson } from '@shared/api/supervision';
import { ROLE_LABELS } from '@shared/auth/roles';
import { Button } from '@/components/ui/button';
import { Dialog } from '@/components/ui/dialog';
import { TextareaField } from '@/components/ui/textarea-field';
import { isApiError } from '@/lib/api-client';
import { useReassignCases } from '../api/reassign-cases';

type Refused = { id: number; reason: string }[];

/** Pick one person for the selected cases; all move or none do. */
export function ReassignDialog({
  caseIds,
  people,
  onClose,
  onDone,
}: {
  caseIds: number[];
  people: BoardPerson[];
  onClose: () => void;
  onDone: (message: string) => void;
}) {
  const [assigneeId, setAssigneeId] = useState<number | ''>('');
  const [note, setNote] = useState('');
  const reassign = useReassignCases();
  const refused = isApiError(reassign.error) ? (reassign.error.details?.refused as Refused | undefined) : undefined;
  const n = caseIds.length;

  const submit = (event: React.FormEvent) => {
    event.preventDefault();
    if (assigneeId === '') return;
    reassign.mutate(
      { caseIds, assigneeId, note: note.trim() || undefined },
      { onSuccess: (r) => onDone(`${r.cases.length} ${r.cases.length === 1 ? 'case' : 'cases'} now with ${r.assignee.displayName}. They have been told by e-mail.`) },
    );
  };

  return (
    <Dialog title={`Reassign ${n} ${n === 1 ? 'case' : 'cases'}`} onClose={onClose}>
      <form className="flex flex-col gap-3" onSubmit={submit}>
        <p className="text-xs text-muted">
          Cases {caseIds.map((id) => `#${id}`).join(', ')}. All of them move, or none does.
        </p>
        <label className="flex flex-col gap-1 text-sm font-medium text-text">
          Hand to
          <select
            required
            className="h-9 rounded border border-control bg-surface px-2 text-sm font-normal"
            value={assigneeId}
            onChange={(e) => setAssigneeId(e.target.value === '' ? '' : Number(e.target.value))}
          >
            <option value="">Choose a person…</option>
            {people.map((p) => (
              <option key={p.id} value={p.id}>
                {p.displayName} ({ROLE_LABELS[p.role]}, {p.open} open{p.slaBreaches ? `, ${p.slaBreaches} past SLA` : ''})
              </option>
            ))}
          </select>
        </label>
        <TextareaField label="Note for them (optional)" rows={2} maxLength={500} value={note} onChange={(e) => setNote(e.target.value)} />
        {reassign.isError && (
          <div role="alert" className="text-xs text-danger">
            <p>{reassign.error.message}</p>
            {refused && (
              <ul className="mt-1 list-disc pl-4">
                {refused.map((r) => (
                  <li key={r.id}>
                    #{r.id}: {r.reason}
                  </li>
                ))}
              </ul>
            )}
          </div>
        )}
        <div className="flex justify-end gap-2">
          <Button onClick={onClose}>Cancel</Button>
          <Button type="submit" variant="primary" disabled={assigneeId === '' || reassign.isPending}>
            {reassign.isPending ? 'Reassigning…' : `Reassign ${n}`}
          </Button>
        </div>
      </form>
    </Dialog>
  );
}
