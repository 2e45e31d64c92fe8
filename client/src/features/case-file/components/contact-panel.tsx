import { zodResolver } from '@hookform/resolvers/zod';
import { useForm } from 'react-hook-form';
import type { z } from 'zod';
import { contactSchema, type CaseDetail, type CaseMessage } from '@shared/api/cases';
import { Button } from '@/components/ui/button';
import { TextField } from '@/components/ui/text-field';
import { TextareaField } from '@/components/ui/textarea-field';
import { cn } from '@/lib/cn';
import { formatDateTime } from '@/lib/time';
import { useContactCardholder } from '../api/contact-cardholder';
import { plainErrors, serverProblem } from '../utils/form-errors';

const STATUS_LOOK: Record<CaseMessage['status'], { word: string; className: string; mark: string }> = {
  queued: { word: 'waiting to send', className: 'text-muted', mark: '…' },
  sent: { word: 'sent', className: 'text-ok', mark: '✓' },
  failed: { word: 'not delivered', className: 'font-medium text-danger', mark: '✕' },
};

/** E-mail to the cardholder; what was sent is listed below with its delivery state. */
export function ContactPanel({ detail }: { detail: CaseDetail }) {
  const { cardholder, id } = detail.case;
  const contact = useContactCardholder(id);
  const {
    register,
    handleSubmit,
    reset,
    setError,
    formState: { errors, isSubmitting },
  } = useForm<z.input<typeof contactSchema>, unknown, z.output<typeof contactSchema>>({
    resolver: zodResolver(contactSchema, { error: plainErrors }),
    defaultValues: { subject: '', message: '' },
  });
  const noAddress = !cardholder.email;

  const submit = handleSubmit(async (values) => {
    try {
      await contact.mutateAsync(values);
      reset();
    } catch (error) {
      setError('root', { message: serverProblem(error) });
    }
  });

  const messages = [...detail.messages].sort((a, b) => Date.parse(b.createdAt) - Date.parse(a.createdAt));

  return (
    <div className="flex flex-col gap-3">
      <p className="text-xs text-muted">
        To: {noAddress ? <span className="font-medium text-text">no e-mail address on file</span> : <span className="font-mono text-text">{cardholder.email}</span>}
        {cardholder.name && ` (${cardholder.name})`}
      </p>
      <form onSubmit={submit} noValidate className="flex flex-col gap-2">
        <TextField label="Subject" error={errors.subject?.message} disabled={noAddress} {...register('subject')} />
        <TextareaField label="Message" rows={4} error={errors.message?.message} disabled={noAddress} {...register('message')} />
        {errors.root && (
          <p role="alert" className="text-xs text-danger">
            {errors.root.message}
          </p>
        )}
        <Button size="sm" type="submit" className="self-start" disabled={noAddress || isSubmitting}>
          {isSubmitting ? 'Sending…' : 'Send to cardholder'}
        </Button>
      </form>
      <section aria-label="Messages">
        <h3 className="text-xs font-semibold tracking-wide text-muted uppercase">Messages</h3>
        {messages.length === 0 ? (
          <p className="mt-1 text-xs text-muted">Nothing sent yet.</p>
        ) : (
          <ol className="mt-1 divide-y divide-border">
            {messages.map((m) => {
              const look = STATUS_LOOK[m.status];
              return (
                <li key={m.id} className="py-1.5">
                  <p className="flex flex-wrap justify-between gap-x-2 text-xs">
                    <span className="font-medium text-text">{m.subject}</span>
                    <span className={cn(look.className)}>
                      <span aria-hidden="true">{look.mark} </span>
                      {look.word}
                    </span>
                  </p>
                  <p className="text-xs text-muted">
                    to <span className="font-mono">{m.to}</span> by {m.sentBy.displayName} · <time dateTime={m.createdAt}>{formatDateTime(m.createdAt)}</time>
                  </p>
                  <p className="mt-0.5 text-sm break-words whitespace-pre-wrap text-text">{m.text}</p>
                </li>
              );
            })}
          </ol>
        )}
      </section>
    </div>
  );
}
