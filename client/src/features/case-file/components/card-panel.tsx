import { useState } from 'react';
import { cardActionSchema, type CaseDetail } from '@shared/api/cases';
import { Button } from '@/components/ui/button';
import { CardFragment } from '@/components/ui/card-fragment';
import { CautionNote } from '@/components/ui/caution-note';
import { Dialog } from '@/components/ui/dialog';
import { useSetCardStatus } from '../api/set-card-status';
import { TextForm } from './text-form';

/** Block or unblock the card, with a reason, after a confirmation that repeats the caution. */
export function CardPanel({ detail }: { detail: CaseDetail }) {
  const { id, card } = detail.case;
  const setStatus = useSetCardStatus(id);
  const [confirming, setConfirming] = useState(false);
  const action = card.status === 'blocked' ? 'unblock' : 'block';
  const verb = action === 'block' ? 'Block card' : 'Unblock card';

  return (
    <div className="flex flex-col gap-2">
      <p className="flex items-center gap-2 text-sm">
        <CardFragment bin={card.bin} last4={card.last4} />
        <span className={card.status === 'blocked' ? 'font-semibold text-text' : 'text-muted'}>
          {card.status === 'blocked' ? 'Blocked: no new payments go through' : 'Active'}
        </span>
      </p>
      <Button size="sm" className="self-start" onClick={() => setConfirming(true)}>
        {verb}…
      </Button>
      {confirming && (
        <Dialog title={`${verb} ${card.bin} ••• ${card.last4}?`} onClose={() => setConfirming(false)}>
          <div className="flex flex-col gap-3">
            <p className="text-sm text-text">
              {action === 'block'
                ? 'Blocking stops every new payment on this card until someone unblocks it. The cardholder is not told by this action.'
                : 'Unblocking lets payments on this card go through again.'}
            </p>
            <CautionNote />
            <TextForm
              label="Reason"
              hint="Recorded in the case timeline and the audit trail."
              schema={cardActionSchema.shape.reason}
              submitLabel={verb}
              submitVariant="primary"
              pendingLabel={action === 'block' ? 'Blocking…' : 'Unblocking…'}
              rows={2}
              onSubmit={async (reason) => {
                await setStatus.mutateAsync({ action, reason });
                setConfirming(false);
              }}
              extraButtons={
                <Button size="sm" variant="ghost" onClick={() => setConfirming(false)}>
                  Cancel
                </Button>
              }
            />
          </div>
        </Dialog>
      )}
    </div>
  );
}
