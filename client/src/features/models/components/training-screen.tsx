import { zodResolver } from '@hookform/resolvers/zod';
import { useEffect, useId } from 'react';
import { useForm } from 'react-hook-form';
import { useSearchParams } from 'react-router';
import { z } from 'zod';
import { can, type Role } from '@shared/auth/roles';
import { isFinished, startTrainingSchema, TRAINING_STATUS_LABELS, trainingScheduleSchema, type TrainingSchedule, type TrainingScheduleView } from '@shared/api/models';
import { Button } from '@/components/ui/button';
import { KeyHint } from '@/components/ui/key-hint';
import { PanelBoundary } from '@/components/ui/panel-boundary';
import { LoadingLine } from '@/components/ui/spinner';
import { TextField } from '@/components/ui/text-field';
import { isApiError } from '@/lib/api-client';
import { cn } from '@/lib/cn';
import { useHotkey } from '@/lib/hotkeys';
import { formatDateTime } from '@/lib/time';
import { useTrainingRuns } from '../api/get-training-runs';
import { useTrainingSchedule } from '../api/get-training-schedule';
import { useSaveTrainingSchedule } from '../api/save-training-schedule';
import { useStartTraining } from '../api/start-training';
import { TrainingProgress } from './training-progress';

const int = (min: number, max: number) => z.coerce.number<string | number>().int().min(min).max(max);

const scheduleFormSchema = trainingScheduleSchema.extend({ windowDays: int(7, 400), rounds: int(5, 5000), labelDelayDays: int(0, 180) });

function ScheduleForm({ view, editable }: { view: TrainingScheduleView; editable: boolean }) {
  const id = useId();
  const save = useSaveTrainingSchedule();
  const {
    register,
    handleSubmit,
    reset,
    setError,
    formState: { errors, isSubmitting, isDirty },
  } = useForm<z.input<typeof scheduleFormSchema>, unknown, TrainingSchedule>({ resolver: zodResolver(scheduleFormSchema), defaultValues: view.schedule });
  useEffect(() => reset(view.schedule), [view.schedule, reset]);
  const submit = handleSubmit(async (values) => {
    try {
      await save.mutateAsync(values);
    } catch (err) {
      if (isApiError(err) && err.fields) for (const f of err.fields) setError(f.path as keyof TrainingSchedule, { message: f.message });
      else setError('root', { message: isApiError(err) ? err.message : 'The schedule could not be saved.' });
    }
  });
  return (
    <form onSubmit={submit} noValidate className="flex flex-col gap-3" aria-labelledby={`${id}-title`}>
      <h2 id={`${id}-title`} className="text-sm font-semibold text-text">
        Nightly retraining
      </h2>
      <p className="text-xs text-muted">
        Next run: {view.nextRunAt ? formatDateTime(view.nextRunAt) : view.schedule.enabled ? 'not registered yet (the training worker registers it when it starts)' : 'off'}
        {' · '}Last scheduled run:{' '}
        {view.lastRun ? `#${view.lastRun.id}, ${TRAINING_STATUS_LABELS[view.lastRun.status].toLowerCase()}, ${formatDateTime(view.lastRun.createdAt)}` : 'none yet'}
        {view.updatedBy ? ` · changed by ${view.updatedBy.displayName}` : ''}
      </p>
      <fieldset disabled={!editable} className="grid gap-3 sm:grid-cols-3">
        <label className="flex items-center gap-2 text-sm text-text sm:col-span-3">
          <input type="checkbox" {...register('enabled')} /> Retrain on a schedule
        </label>
        <TextField
          label="Cron pattern (minute hour day month weekday)"
          placeholder="0 2 * * *"
          error={errors.cron?.message}
          {...register('cron')}
        />
        <TextField label="Time zone (IANA)" placeholder="UTC" error={errors.timezone?.message} {...register('timezone')} />
        <TextField label="Window (days of history)" type="number" inputMode="numeric" error={errors.windowDays?.message} {...register('windowDays')} />
        <TextField label="Rounds (at most)" type="number" inputMode="numeric" error={errors.rounds?.message} {...register('rounds')} />
        <TextField label="Label delay (days)" type="number" inputMode="numeric" error={errors.labelDelayDays?.message} {...register('labelDelayDays')} />
      </fieldset>
      {errors.root && (
        <p role="alert" className="text-xs text-danger">
          {errors.root.message}
        </p>
      )}
      {editable && (
        <div className="flex items-center gap-2">
          <Button type="submit" disabled={isSubmitting || !isDirty}>
            {isSubmitting ? 'Saving…' : 'Save schedule'}
          </Button>
          {save.isSuccess && !isDirty && <span className="text-xs text-ok">Saved; the job scheduler follows it.</span>}
        </div>
      )}
    </form>
  );
}

const trainNowSchema = z.object({
  windowDays: int(7, 400),
  rounds: int(5, 5000),
  label: startTrainingSchema.shape.label.or(z.literal('').transform(() => undefined)),
  notes: z.string().trim().max(2000),
});

function TrainNow({ schedule, onStarted }: { schedule: TrainingSchedule; onStarted: (id: number) => void }) {
  const id = useId();
  const start = useStartTraining();
  const {
    register,
    handleSubmit,
    setError,
    formState: { errors, isSubmitting },
  } = useForm<z.input<typeof trainNowSchema>, unknown, z.output<typeof trainNowSchema>>({
    resolver: zodResolver(trainNowSchema),
    defaultValues: { windowDays: schedule.windowDays, rounds: schedule.rounds, label: '', notes: '' },
  });
  const submit = handleSubmit(async (v) => {
    try {
      const run = await start.mutateAsync({ windowDays: v.windowDays, rounds: v.rounds, label: v.label, notes: v.notes || undefined, labelDelayDays: schedule.labelDelayDays });
      onStarted(run.id);
    } catch (err) {
      setError('root', { message: isApiError(err) ? err.message : 'The run could not be started.' });
    }
  });
  // Only moves to the form: starting a run stays a deliberate press of the button.
  useHotkey('t', () => document.getElementById(`${id}-window`)?.focus(), { description: 'Go to Train now', group: 'Models' });
  return (
    <form onSubmit={submit} noValidate className="flex flex-col gap-3" aria-labelledby={`${id}-title`}>
      <h2 id={`${id}-title`} className="text-sm font-semibold text-text">
        Train now
      </h2>
      <div className="grid gap-3 sm:grid-cols-2">
        <TextField id={`${id}-window`} label="Window (days)" type="number" inputMode="numeric" error={errors.windowDays?.message} {...register('windowDays')} />
        <TextField label="Rounds (at most)" type="number" inputMode="numeric" error={errors.rounds?.message} {...register('rounds')} />
        <TextField label="Label (optional)" placeholder="e.g. v2-march" error={errors.label?.message} {...register('label')} />
        <TextField label="Note (optional)" error={errors.notes?.message} {...register('notes')} />
      </div>
      {errors.root && (
        <p role="alert" className="text-xs text-danger">
          {errors.root.message}
        </p>
      )}
      <div className="flex items-center gap-2">
        <Button type="submit" variant="primary" disabled={isSubmitting}>
          {isSubmitting ? 'Queuing…' : 'Train now'}
        </Button>
        <span className="text-xs text-muted">
          <KeyHint keys="t" /> goes here. The result becomes the challenger and scores in shadow.
        </span>
      </div>
    </form>
  );
}

export function TrainingScreen({ viewer }: { viewer: { id: number; role: Role } }) {
  const [search, setSearch] = useSearchParams();
  const schedule = useTrainingSchedule();
  const runs = useTrainingRuns();
  const canTrain = can(viewer.role, 'models:train');
  const chosen = Number(search.get('run')) || runs.data?.find((r) => !isFinished(r.status))?.id || runs.data?.[0]?.id || null;
  const pick = (id: number) => setSearch({ run: String(id) }, { replace: true });
  return (
    <div className="grid gap-4 xl:grid-cols-[minmax(0,2fr)_minmax(0,3fr)]">
      <div className="flex flex-col gap-4">
        <PanelBoundary title="Schedule">
          <section className="rounded border border-border bg-surface p-3">
            {schedule.isPending || !schedule.data ? <LoadingLine /> : <ScheduleForm view={schedule.data} editable={canTrain} />}
          </section>
        </PanelBoundary>
        {canTrain && schedule.data && (
          <section className="rounded border border-border bg-surface p-3">
            <TrainNow schedule={schedule.data.schedule} onStarted={pick} />
          </section>
        )}
        <section aria-labelledby="runs-heading" className="rounded border border-border bg-surface p-3">
          <h2 id="runs-heading" className="text-sm font-semibold text-text">
            Recent runs
          </h2>
          {runs.isPending ? (
            <LoadingLine />
          ) : (
            <ul className="mt-1 flex flex-col divide-y divide-border text-sm">
              {(runs.data ?? []).map((r) => (
                <li key={r.id}>
                  <button
                    type="button"
                    onClick={() => pick(r.id)}
                    aria-current={r.id === chosen ? 'true' : undefined}
                    className={cn('flex w-full flex-wrap items-baseline gap-x-2 px-1 py-1 text-left hover:bg-raised', r.id === chosen && 'bg-raised')}
                  >
                    <span className="font-medium text-text">#{r.id}</span>
                    <span className={cn('text-xs', r.status === 'failed' ? 'text-danger' : 'text-muted')}>{TRAINING_STATUS_LABELS[r.status]}</span>
                    <span className="text-xs text-muted">
                      {r.trigger === 'schedule' ? 'schedule' : (r.requestedBy?.displayName ?? '')} · {formatDateTime(r.createdAt)}
                      {r.modelVersionLabel ? ` · ${r.modelVersionLabel}` : ''}
                    </span>
                  </button>
                </li>
              ))}
              {runs.data?.length === 0 && <li className="py-1 text-muted">No runs yet.</li>}
            </ul>
          )}
        </section>
      </div>
      <div>{chosen ? <TrainingProgress key={chosen} runId={chosen} canCancel={canTrain} /> : <p className="text-sm text-muted">Start a run to watch it here.</p>}</div>
    </div>
  );
}
