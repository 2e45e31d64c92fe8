import { zodResolver } from '@hookform/resolvers/zod';
import { useId, useRef, useState } from 'react';
import { useForm } from 'react-hook-form';
import { z } from 'zod';
import { MODEL_ROLE_LABELS, promotionRequestSchema, type ModelVersionSummary, type PromotionRequest } from '@shared/api/models';
import { Button } from '@/components/ui/button';
import { KeyHint } from '@/components/ui/key-hint';
import { TextareaField } from '@/components/ui/textarea-field';
import { isApiError } from '@/lib/api-client';
import { useHotkey } from '@/lib/hotkeys';
import { useRequestPromotion } from '../api/request-promotion';
import { num } from '../utils/format';

const formSchema = z.object({
  modelVersionId: z.coerce.number<string>().int().positive('Choose the version to make champion'),
  reason: promotionRequestSchema.shape.reason,
});
type Fields = z.input<typeof formSchema>;
type Values = z.output<typeof formSchema>;

/**
 * A data scientist's request to make a version champion: a newer one
 * (promotion) or an earlier, retired one (rollback). The reason is written
 * for the supervisor who approves and for the audit trail; nothing changes
 * until the approval. Ctrl+Enter files it.
 */
export function PromotionForm({
  versions,
  championId,
  initialVersionId,
  onFiled,
}: {
  versions: ModelVersionSummary[];
  championId: number | null;
  initialVersionId?: number;
  onFiled?: (r: PromotionRequest) => void;
}) {
  const formId = useId();
  const formRef = useRef<HTMLFormElement>(null);
  const request = useRequestPromotion();
  const [filed, setFiled] = useState<PromotionRequest | null>(null);
  const choices = versions.filter((v) => v.id !== championId);
  const champion = versions.find((v) => v.id === championId) ?? null;
  const {
    register,
    handleSubmit,
    watch,
    setError,
    formState: { errors, isSubmitting },
  } = useForm<Fields, unknown, Values>({
    resolver: zodResolver(formSchema),
    defaultValues: { modelVersionId: initialVersionId ? String(initialVersionId) : '', reason: '' },
  });
  const chosen = versions.find((v) => String(v.id) === watch('modelVersionId')) ?? null;
  const rollback = chosen?.role === 'retired';

  const submit = handleSubmit(async (values) => {
    try {
      const r = await request.mutateAsync(values);
      setFiled(r);
      onFiled?.(r);
    } catch (err) {
      if (isApiError(err) && err.fields?.length) {
        for (const f of err.fields) if (f.path === 'reason' || f.path === 'modelVersionId') setError(f.path, { message: f.message });
      } else {
        setError('root', { message: isApiError(err) ? err.message : 'The request could not be filed. Try again.' });
      }
    }
  });
  useHotkey('Ctrl+Enter', () => formRef.current?.requestSubmit(), { description: 'File the promotion request', group: 'Models', enabled: !filed });

  if (filed) {
    return (
      <p role="status" className="text-sm text-text">
        Request #{filed.id} filed: {filed.kind === 'rollback' ? 'roll back to' : 'promote'} {filed.modelVersion.label}. It takes effect when a supervisor
        approves it.
      </p>
    );
  }

  return (
    <form ref={formRef} onSubmit={submit} noValidate className="flex flex-col gap-3" aria-describedby={`${formId}-about`}>
      <p id={`${formId}-about`} className="text-xs text-muted">
        Current champion: {champion ? `${champion.label} (PR AUC ${num(champion.headline.averagePrecision)})` : 'none'}. A supervisor approves before anything changes;
        the approval switches every scoring worker at once and is recorded in the audit log.
      </p>
      <div className="flex flex-col gap-1">
        <label htmlFor={`${formId}-version`} className="text-sm font-medium text-text">
          Version to make champion
        </label>
        <select
          id={`${formId}-version`}
          {...register('modelVersionId')}
          aria-invalid={errors.modelVersionId ? true : undefined}
          aria-describedby={errors.modelVersionId ? `${formId}-version-error` : undefined}
          className="h-9 rounded border border-control bg-surface px-2 text-sm text-text aria-[invalid=true]:border-danger"
        >
          <option value="">Choose a version…</option>
          {choices.map((v) => (
            <option key={v.id} value={v.id}>
              {v.label} · {MODEL_ROLE_LABELS[v.role].toLowerCase()} · PR AUC {num(v.headline.averagePrecision)} · ROC AUC {num(v.headline.rocAuc)}
            </option>
          ))}
        </select>
        {errors.modelVersionId && (
          <p id={`${formId}-version-error`} className="text-xs text-danger">
            {errors.modelVersionId.message}
          </p>
        )}
        {chosen && (
          <p className="text-xs text-muted" data-testid="promotion-kind">
            {rollback ? `Rollback: ${chosen.label} was champion before and comes back.` : `Promotion: ${chosen.label} replaces the champion.`}
          </p>
        )}
      </div>
      <TextareaField
        label="Reason"
        hint="What the evidence shows (comparison window, PR AUC, alerts at the threshold) and what you checked. The approver and the audit read this."
        rows={4}
        error={errors.reason?.message}
        {...register('reason')}
      />
      {errors.root && (
        <p role="alert" className="text-sm text-danger">
          {errors.root.message}
        </p>
      )}
      <div className="flex items-center gap-2">
        <Button type="submit" variant="primary" disabled={isSubmitting}>
          {isSubmitting ? 'Filing…' : rollback ? 'Ask to roll back' : 'Ask to promote'}
        </Button>
        <KeyHint keys="Ctrl+Enter" />
      </div>
    </form>
  );
}
