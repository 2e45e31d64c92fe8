import { Link } from 'react-router';
import { isFinished, TRAINING_STATUS_LABELS, type TrainingRun } from '@shared/api/models';
import { Button } from '@/components/ui/button';
import { LoadingLine } from '@/components/ui/spinner';
import { cn } from '@/lib/cn';
import { isApiError } from '@/lib/api-client';
import { useCancelTraining } from '../api/cancel-training';
import { useTrainingRun } from '../api/get-training-run';
import { num } from '../utils/format';
import { useTrainingRunLive } from '../utils/use-models-live';
import { LossChart } from './charts';

function StatusLine({ run }: { run: TrainingRun }) {
  const { round, totalRounds } = run.progress;
  if (run.status === 'completed') {
    return (
      <p className="text-sm text-text">
        Finished after {round} of {totalRounds} rounds
        {round < totalRounds ? ' (validation loss stopped improving)' : ''}.{' '}
        {run.modelVersionId && (
          <Link to={`/models/versions/${run.modelVersionId}`} className="text-link underline underline-offset-2">
            Open {run.modelVersionLabel ?? 'the new version'} (now the challenger)
          </Link>
        )}
      </p>
    );
  }
  if (run.status === 'failed') return <p className="text-sm text-danger">Failed: {run.error ?? 'no reason given'}</p>;
  if (run.status === 'cancelled') return <p className="text-sm text-text">Cancelled at round {round} of {totalRounds}; nothing was registered.</p>;
  if (run.status === 'queued') return <p className="text-sm text-muted">Waiting for the training worker to pick it up.</p>;
  return (
    <p className="text-sm text-text">
      <span className="font-semibold tabular-nums">
        Round {round} of {totalRounds}
      </span>{' '}
      <span className="text-muted">· {run.progress.phase}</span>
    </p>
  );
}

/**
 * One training run as it happens: round k of T, the current training and
 * validation loss, a progress bar and the loss curve drawing as the rounds
 * arrive over the socket, and a way to cancel it.
 */
export function TrainingProgress({ runId, canCancel }: { runId: number; canCancel: boolean }) {
  useTrainingRunLive(runId);
  const { data: run, isPending, error } = useTrainingRun(runId);
  const cancel = useCancelTraining();
  if (isPending) return <LoadingLine label="Loading the run…" />;
  if (error || !run) return <p className="text-sm text-danger">This run could not be loaded.</p>;
  const { round, totalRounds, trainLoss, validationLoss } = run.progress;
  const done = isFinished(run.status);
  // Early stopping ends a run before its budget: a finished run is a full bar.
  const share = run.status === 'completed' ? 1 : totalRounds > 0 ? Math.min(1, round / totalRounds) : 0;
  return (
    <section aria-labelledby={`run-${run.id}-title`} className="flex flex-col gap-2 rounded border border-border bg-surface p-3">
      <header className="flex flex-wrap items-baseline gap-x-3 gap-y-1">
        <h3 id={`run-${run.id}-title`} className="text-sm font-semibold text-text">
          Training run #{run.id}
        </h3>
        <span className="text-xs text-muted" aria-live="polite">
          {TRAINING_STATUS_LABELS[run.status]}
          {run.cancelRequested && !done ? ' · stopping after this round' : ''}
        </span>
        {canCancel && !done && (
          <Button
            size="sm"
            className="ml-auto"
            onClick={() => cancel.mutate(run.id)}
            disabled={cancel.isPending || run.cancelRequested}
          >
            {run.cancelRequested || cancel.isPending ? 'Cancelling…' : 'Cancel run'}
          </Button>
        )}
      </header>
      <StatusLine run={run} />
      {cancel.error && (
        <p role="alert" className="text-xs text-danger">
          {isApiError(cancel.error) ? cancel.error.message : 'The run could not be cancelled.'}
        </p>
      )}
      <div
        role="progressbar"
        aria-label="Boosting rounds done"
        aria-valuemin={0}
        aria-valuemax={totalRounds}
        aria-valuenow={round}
        aria-valuetext={`Round ${round} of ${totalRounds}`}
        className="h-2 w-full overflow-hidden rounded-sm border border-control bg-raised"
      >
        <div className={cn('h-full', run.status === 'failed' ? 'bg-danger' : 'bg-brand')} style={{ width: `${(share * 100).toFixed(1)}%` }} />
      </div>
      <dl className="grid grid-cols-2 gap-x-4 text-xs sm:grid-cols-4">
        <div>
          <dt className="text-muted">Training loss</dt>
          <dd className="font-mono text-sm text-text" data-testid="train-loss">
            {num(trainLoss, 4)}
          </dd>
        </div>
        <div>
          <dt className="text-muted">Validation loss</dt>
          <dd className="font-mono text-sm text-text" data-testid="validation-loss">
            {num(validationLoss, 4)}
          </dd>
        </div>
        <div>
          <dt className="text-muted">Window</dt>
          <dd className="text-text">
            {run.params.from.slice(0, 10)} – {run.params.to.slice(0, 10)}
          </dd>
        </div>
        <div>
          <dt className="text-muted">Label delay</dt>
          <dd className="text-text">{run.params.labelDelayDays} days</dd>
        </div>
      </dl>
      {run.curve.length > 0 && <LossChart curve={run.curve} totalRounds={totalRounds} title="Loss so far" />}
    </section>
  );
}
