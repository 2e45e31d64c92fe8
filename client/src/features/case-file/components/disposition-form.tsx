import { zodResolver } from '@hookform/resolvers/zod';
import { useEffect, useId, type Ref } from 'react';
import { useForm, type Resolver } from 'react-hook-form';
import type { z } from 'zod';
import {
  DISPOSITION_LABELS,
  DISPOSITIONS,
  dispositionSchema,
  FRAUD_TYPE_LABELS,
  FRAUD_TYPES,
  type CaseDetail,
  type Disposition,
} from '@shared/api/cases';
import { Button } from '@/components/ui/button';
import { CautionNote } from '@/components/ui/caution-note';
import { KeyHint } from '@/components/ui/key-hint';
import { TextField } from '@/components/ui/text-field';
import { TextareaField } from '@/components/ui/textarea-field';
import { isApiError } from '@/lib/api-client';
import { cn } from '@/lib/cn';
import { useHotkey } from '@/lib/hotkeys';
import { useSaveDisposition, type DispositionResult, type DispositionValues } from '../api/save-disposition';
import { plainErrors, serverProblem } from '../utils/form-errors';

type Fields = z.input<typeof dispositionSchema>;

const DISPOSITION_HINTS: Record<Disposition, string> = {
  confirmed_fraud: 'The cardholder did not make or allow these payments.',
  legitimate: 'The cardholder made them: a false alarm.',
  inconclusive: 'Not enough to say either way.',
};

const KEYS: Record<Disposition, string> = { confirmed_fraud: '1', legitimate: '2', inconclusive: '3' };

const schemaResolver = zodResolver(dispositionSchema, {
  error: (issue) => {
    if (issue.path?.[0] === 'disposition') return 'Choose confirmed fraud, legitimate or inconclusive.';
    if (issue.path?.[0] === 'fraudType') return 'Choose the fraud type';
    return plainErrors(issue);
  },
});

/** Unchecked radio groups give null to the form; the schema's "no fraud type" is undefined. */
const resolver: Resolver<Fields, unknown, DispositionValues> = (values, context, options) =>
  schemaResolver({ ...values, fraudType: values.fraudType || undefined }, context, options);

const AMOUNT_FIELDS = [
  { name: 'amountConfirmed', label: 'Amount confirmed', placeholder: 'e.g. 120.50' },
  { name: 'amountRecovered', label: 'Amount recovered', placeholder: 'optional' },
] as const;

function decimals(amount: string | undefined): number {
  return amount?.split('.')[1]?.length ?? 0;
}

function Recorded({ detail }: { detail: CaseDetail }) {
  const c = detail.case;
  if (c.status === 'awaiting_approval') {
    return <p className="text-sm text-text">The disposition waits for a supervisor's four-eyes approval. Nothing more to record here.</p>;
  }
  return (
    <p className="text-sm text-text">
      Closed{c.disposition ? ` as ${DISPOSITION_LABELS[c.disposition].toLowerCase()}` : ''}. The case is read-only now.
    </p>
  );
}

/**
 * The decision: confirmed fraud (with its type), legitimate or inconclusive,
 * a reason, and the amounts. One schema checks it here and on the server.
 * 1, 2, 3 choose; Ctrl+Enter saves (bound by the screen to whichever form has focus).
 */
export function DispositionForm({
  detail,
  onSaved,
  formRef,
}: {
  detail: CaseDetail;
  onSaved: (result: DispositionResult, values: DispositionValues) => void;
  formRef?: Ref<HTMLFormElement>;
}) {
  const c = detail.case;
  const formId = useId();
  const save = useSaveDisposition(c.id);
  const {
    register,
    handleSubmit,
    setValue,
    setError,
    watch,
    formState: { errors, isSubmitted, isSubmitting },
  } = useForm<Fields, unknown, DispositionValues>({
    resolver,
    defaultValues: { reason: '', amountConfirmed: '', amountRecovered: '', version: c.version },
  });

  // A refetch after someone else's change brings a new version; the next save is checked against it.
  useEffect(() => {
    setValue('version', c.version);
  }, [c.version, setValue]);

  const chosen = watch('disposition');
  const open = c.status !== 'closed' && c.status !== 'awaiting_approval';

  const pick = (disposition: Disposition) => {
    setValue('disposition', disposition, { shouldDirty: true, shouldValidate: isSubmitted });
    if (disposition !== 'confirmed_fraud') setValue('fraudType', undefined, { shouldValidate: isSubmitted });
  };
  const group = 'Case file';
  useHotkey('1', () => pick('confirmed_fraud'), { description: 'Disposition: confirmed fraud', group, enabled: open });
  useHotkey('2', () => pick('legitimate'), { description: 'Disposition: legitimate', group, enabled: open });
  useHotkey('3', () => pick('inconclusive'), { description: 'Disposition: inconclusive', group, enabled: open });

  if (!open) return <Recorded detail={detail} />;

  const exponent = c.amountAtRisk.exponent;
  const submit = handleSubmit(async (values) => {
    let tooPrecise = false;
    for (const { name: field } of AMOUNT_FIELDS) {
      if (decimals(values[field]) > exponent) {
        setError(field, { message: `${c.amountAtRisk.currency} has ${exponent} decimal${exponent === 1 ? '' : 's'} at most.` });
        tooPrecise = true;
      }
    }
    if (tooPrecise) return;
    try {
      onSaved(await save.mutateAsync(values), values);
    } catch (error) {
      if (isApiError(error) && error.status === 409 && error.code === 'stale_case') {
        setError('root', {
          message: 'Someone changed this case after you opened it. The case file has been refreshed: check what changed, then save again.',
        });
        return;
      }
      let placed = false;
      if (isApiError(error)) {
        for (const field of error.fields ?? []) {
          if (['disposition', 'fraudType', 'reason', 'amountConfirmed', 'amountRecovered'].includes(field.path)) {
            setError(field.path as keyof Fields, { message: field.message });
            placed = true;
          }
        }
      }
      if (!placed) setError('root', { message: serverProblem(error) });
    }
  });

  const dispositionField = register('disposition', {
    onChange: (event: React.ChangeEvent<HTMLInputElement>) => {
      if (event.target.value !== 'confirmed_fraud') setValue('fraudType', undefined);
    },
  });

  return (
    <form ref={formRef} onSubmit={submit} noValidate aria-labelledby={`${formId}-title`} className="flex flex-col gap-3">
      <h3 id={`${formId}-title`} className="sr-only">
        Disposition
      </h3>
      <fieldset aria-describedby={errors.disposition ? `${formId}-disposition-error` : undefined}>
        <legend className="text-sm font-medium text-text">What is this case?</legend>
        <div className="mt-1 grid gap-1.5">
          {DISPOSITIONS.map((d) => (
            <label
              key={d}
              className={cn(
                'flex cursor-pointer items-start gap-2 rounded border px-2 py-1.5 has-[:focus-visible]:outline-2 has-[:focus-visible]:outline-focus',
                chosen === d ? 'border-text bg-raised' : 'border-border hover:bg-raised',
              )}
            >
              <input type="radio" value={d} className="mt-0.5" {...dispositionField} />
              <span className="flex flex-1 flex-col">
                <span className={cn('text-sm', chosen === d ? 'font-semibold text-text' : 'text-text')}>{DISPOSITION_LABELS[d]}</span>
                <span className="text-xs text-muted">{DISPOSITION_HINTS[d]}</span>
              </span>
              <KeyHint keys={KEYS[d]} />
            </label>
          ))}
        </div>
        {errors.disposition && (
          <p id={`${formId}-disposition-error`} className="mt-1 text-xs text-danger">
            {errors.disposition.message}
          </p>
        )}
      </fieldset>

      {chosen === 'confirmed_fraud' && (
        <fieldset aria-describedby={errors.fraudType ? `${formId}-type-error` : undefined}>
          <legend className="text-sm font-medium text-text">Fraud type</legend>
          <div className="mt-1 flex flex-wrap gap-x-3 gap-y-1">
            {FRAUD_TYPES.map((t) => (
              <label key={t} className="inline-flex items-center gap-1.5 text-sm text-text">
                <input type="radio" value={t} {...register('fraudType')} />
                {FRAUD_TYPE_LABELS[t]}
              </label>
            ))}
          </div>
          {errors.fraudType && (
            <p id={`${formId}-type-error`} className="mt-1 text-xs text-danger">
              {errors.fraudType.message}
            </p>
          )}
        </fieldset>
      )}

      <TextareaField label="Reason" hint="What you found, for the record and for whoever reviews it." rows={3} error={errors.reason?.message} {...register('reason')} />

      <div className="grid grid-cols-2 gap-2">
        {AMOUNT_FIELDS.map(({ name, label, placeholder }) => (
          <TextField
            key={name}
            label={`${label} (${c.amountAtRisk.currency})`}
            inputMode="decimal"
            placeholder={placeholder}
            className="[&_input]:font-mono"
            error={errors[name]?.message}
            {...register(name)}
          />
        ))}
      </div>

      {errors.root && (
        <p role="alert" className="rounded border border-danger/40 bg-raised px-2 py-1.5 text-sm text-danger">
          {errors.root.message}
        </p>
      )}

      <div className="flex flex-col gap-2">
        <CautionNote />
        <Button type="submit" variant="primary" disabled={isSubmitting} aria-busy={isSubmitting || undefined}>
          {isSubmitting ? 'Saving…' : 'Save and close the case'} <KeyHint keys="Ctrl+Enter" className="[&_kbd]:text-text" />
        </Button>
      </div>
    </form>
  );
}
