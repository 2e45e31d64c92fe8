import { zodResolver } from '@hookform/resolvers/zod';
import { useForm } from 'react-hook-form';
import { z } from 'zod';
import { slaPolicySchema, type SupervisionSettingsResponse } from '@shared/api/supervision';
import { Button } from '@/components/ui/button';
import { LoadingLine } from '@/components/ui/spinner';
import { TextField } from '@/components/ui/text-field';
import { isApiError } from '@/lib/api-client';
import { useSettings } from '../api/get-settings';
import { useSaveApprovalLimit } from '../api/save-approval-limit';
import { useSaveSlaPolicy } from '../api/save-sla-policy';

const percent = z.number({ error: 'Enter a number' }).min(0, 'From 0 %').max(100, 'Up to 100 %');
const minutes = z.number({ error: 'Enter whole minutes' }).int('Whole minutes').min(1, 'At least 1 minute').max(43_200, 'At most 30 days');

/** The form in the units people think in (percent, minutes); the API's own schema checks the converted values too. */
const slaFormSchema = z
  .object({ urgentMinutes: minutes, highMinutes: minutes, standardMinutes: minutes, urgentFrom: percent, highFrom: percent })
  .superRefine((v, ctx) => {
    const result = slaPolicySchema.safeParse(toPolicy(v));
    if (result.success) return;
    for (const issue of result.error.issues) {
      const path = issue.path.join('.') === 'priorityBands.high' ? 'highFrom' : 'highMinutes';
      ctx.addIssue({ code: 'custom', path: [path], message: issue.message });
    }
  });
type SlaForm = z.infer<typeof slaFormSchema>;

function toPolicy(v: SlaForm) {
  return {
    slaMinutes: { urgent: v.urgentMinutes, high: v.highMinutes, standard: v.standardMinutes },
    priorityBands: { urgent: v.urgentFrom / 100, high: v.highFrom / 100 },
  };
}

function SlaPolicyForm({ settings }: { settings: SupervisionSettingsResponse }) {
  const save = useSaveSlaPolicy();
  const { sla } = settings;
  const form = useForm<SlaForm>({
    resolver: zodResolver(slaFormSchema),
    defaultValues: {
      urgentMinutes: sla.slaMinutes.urgent,
      highMinutes: sla.slaMinutes.high,
      standardMinutes: sla.slaMinutes.standard,
      urgentFrom: Math.round(sla.priorityBands.urgent * 1000) / 10,
      highFrom: Math.round(sla.priorityBands.high * 1000) / 10,
    },
  });
  const err = form.formState.errors;
  const num = { valueAsNumber: true } as const;
  return (
    <form
      aria-labelledby="sla-heading"
      className="flex flex-col gap-3 rounded border border-border bg-surface p-3"
      onSubmit={form.handleSubmit((v) => save.mutate(toPolicy(v), { onSuccess: () => form.reset(v) }))}
    >
      <h2 id="sla-heading" className="text-sm font-semibold text-text">
        SLA per priority
      </h2>
      <p className="text-xs text-muted">
        A case's priority comes from its highest fraud probability; its deadline is its opening time plus the minutes of that priority. New deadlines apply to
        cases opened from now on; open cases keep theirs. Past-deadline cases are marked on the board and in the Queue.
      </p>
      <div className="grid grid-cols-1 gap-3 sm:grid-cols-3">
        <TextField label="Urgent: minutes" type="number" min={1} {...form.register('urgentMinutes', num)} error={err.urgentMinutes?.message} />
        <TextField label="High: minutes" type="number" min={1} {...form.register('highMinutes', num)} error={err.highMinutes?.message} />
        <TextField label="Standard: minutes" type="number" min={1} {...form.register('standardMinutes', num)} error={err.standardMinutes?.message} />
        <TextField label="Urgent from probability (%)" type="number" step={0.1} {...form.register('urgentFrom', num)} error={err.urgentFrom?.message} />
        <TextField label="High from probability (%)" type="number" step={0.1} {...form.register('highFrom', num)} error={err.highFrom?.message} />
        <p className="self-end pb-2 text-xs text-muted">Below the high band: standard.</p>
      </div>
      {save.isError && (
        <p role="alert" className="text-xs text-danger">
          {save.error.message}
          {isApiError(save.error) && save.error.fields?.map((f) => ` ${f.path}: ${f.message}.`)}
        </p>
      )}
      <div className="flex items-center gap-3">
        <Button type="submit" variant="primary" disabled={save.isPending || !form.formState.isDirty}>
          Save SLA policy
        </Button>
        {save.isSuccess && !form.formState.isDirty && (
          <p role="status" className="text-xs text-ok">
            Saved. New cases get these deadlines.
          </p>
        )}
      </div>
    </form>
  );
}

const limitFormSchema = z.object({ on: z.boolean(), limit: z.number({ error: 'Enter an amount' }).min(0, 'Not below 0') });
type LimitForm = z.infer<typeof limitFormSchema>;

function ApprovalLimitForm({ settings }: { settings: SupervisionSettingsResponse }) {
  const save = useSaveApprovalLimit();
  const form = useForm<LimitForm>({
    resolver: zodResolver(limitFormSchema),
    defaultValues: { on: settings.approvalLimit !== null, limit: settings.approvalLimit ?? 10_000 },
  });
  const on = form.watch('on');
  return (
    <form
      aria-labelledby="four-eyes-heading"
      className="flex flex-col gap-3 rounded border border-border bg-surface p-3"
      onSubmit={form.handleSubmit((v) => save.mutate(v.on ? v.limit : null, { onSuccess: () => form.reset(v) }))}
    >
      <h2 id="four-eyes-heading" className="text-sm font-semibold text-text">
        Four-eyes approval
      </h2>
      <p className="text-xs text-muted">
        A disposition of a case with more than this at risk waits for a supervisor other than the one who proposed it; its labels count only once approved.
        The amount is in each case's own currency (no conversion).
      </p>
      <label className="flex items-center gap-2 text-sm">
        <input type="checkbox" {...form.register('on')} />
        Ask for a second person's approval
      </label>
      <TextField
        className="w-56"
        label="Above this amount at risk"
        type="number"
        step={0.01}
        min={0}
        disabled={!on}
        {...form.register('limit', { valueAsNumber: true })}
        error={form.formState.errors.limit?.message}
      />
      {save.isError && (
        <p role="alert" className="text-xs text-danger">
          {save.error.message}
        </p>
      )}
      <div className="flex items-center gap-3">
        <Button type="submit" variant="primary" disabled={save.isPending || !form.formState.isDirty}>
          Save approval limit
        </Button>
        {save.isSuccess && !form.formState.isDirty && (
          <p role="status" className="text-xs text-ok">
            Saved.
          </p>
        )}
      </div>
    </form>
  );
}

/** SLA minutes and priority bands, and the four-eyes limit. */
export function PolicyPanel() {
  const settings = useSettings();
  if (settings.isPending) return <LoadingLine />;
  if (settings.isError) return <p role="alert" className="text-sm text-danger">The settings could not be loaded: {settings.error.message}</p>;
  return (
    <div className="grid grid-cols-1 gap-4 lg:grid-cols-2">
      <SlaPolicyForm settings={settings.data} />
      <ApprovalLimitForm settings={settings.data} />
    </div>
  );
}
