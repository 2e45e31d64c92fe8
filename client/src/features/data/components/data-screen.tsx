import { useRef, useState } from 'react';
import { useQueryClient } from '@tanstack/react-query';
import { BACKFILL_PROGRESS_EVENT, backfillProgressEventSchema, type BackfillImport } from '@shared/api/backfill';
import { NowPanel, ScreenHeader } from '@/components/ui/screen-header';
import { isApiError } from '@/lib/api-client';
import { useSocket, useSocketEvent } from '@/lib/socket';
import { useImport } from '../api/get-import';
import { importsQueryOptions, useImports } from '../api/get-imports';
import { UploadRefused, useUploadTransactions, type SendProgress } from '../api/upload-transactions';
import { formatCount } from '../format';
import { CsvUploadForm } from './csv-upload-form';
import { ImportProgress, type ImportPhase } from './import-progress';
import { RecentImports } from './recent-imports';

/** Names this page's upload, so its progress events are told apart from another tab's. */
function newClientRef(): string {
  if (typeof crypto !== 'undefined' && typeof crypto.randomUUID === 'function') return crypto.randomUUID();
  const bytes = crypto.getRandomValues(new Uint8Array(16));
  return Array.from(bytes, (b) => b.toString(16).padStart(2, '0')).join('');
}

type Current = { file: File; clientRef: string };

function messageOf(error: unknown): string {
  if (isApiError(error)) return error.message;
  return 'The upload failed on our side. Try again.';
}

function WhatNeedsMe({ imports }: { imports: BackfillImport[] | undefined }) {
  if (!imports) return <>Checking recent imports…</>;
  const running = imports.filter((r) => r.status === 'running').length;
  if (running > 0) return <>{running === 1 ? '1 import is running.' : `${running} imports are running.`}</>;
  const latest = imports[0];
  if (!latest) return <>No imports yet. Upload a CSV file of past transactions below.</>;
  if (latest.status === 'failed' || latest.status === 'interrupted') {
    return (
      <>
        The latest import, {latest.fileName}, {latest.status === 'failed' ? 'failed' : 'was interrupted'}
        {latest.error ? `: ${latest.error.message}` : '.'}
      </>
    );
  }
  if (latest.counts.rejected > 0 && latest.errorReportUrl) {
    return (
      <>
        The latest import, {latest.fileName}, rejected {formatCount(latest.counts.rejected)} rows.{' '}
        <a href={latest.errorReportUrl} download className="text-link underline underline-offset-2">
          Its error report
        </a>{' '}
        says which and why.
      </>
    );
  }
  return <>Nothing: no import is running and the latest one rejected no rows.</>;
}

/** The Data screen: back-fill historical transactions from CSV, follow the run, and see recent runs. */
export function DataScreen({ showUploader }: { showUploader: boolean }) {
  const queryClient = useQueryClient();
  const { status: socketStatus } = useSocket();
  const imports = useImports();
  const [current, setCurrent] = useState<Current | null>(null);
  const [sent, setSent] = useState<SendProgress | null>(null);
  const [live, setLive] = useState<BackfillImport | null>(null);
  const abort = useRef<AbortController | null>(null);
  const upload = useUploadTransactions(setSent);

  useSocketEvent<[unknown]>(BACKFILL_PROGRESS_EVENT, (raw) => {
    const parsed = backfillProgressEventSchema.safeParse(raw);
    if (!parsed.success) return;
    const { clientRef, ...run } = parsed.data;
    if (current && clientRef === current.clientRef) setLive(run);
    if (run.status !== 'running') void queryClient.invalidateQueries({ queryKey: importsQueryOptions().queryKey });
  });
  // Without the socket the counts would stand still; the run's id came with its first event.
  const polled = useImport(live?.id ?? null, { poll: upload.isPending && socketStatus !== 'connected' });

  const start = (file: File) => {
    const next = { file, clientRef: newClientRef() };
    abort.current = new AbortController();
    setCurrent(next);
    setSent(null);
    setLive(null);
    upload.mutate({ file, clientRef: next.clientRef, signal: abort.current.signal });
  };

  const refused = upload.error instanceof UploadRefused ? upload.error.run : null;
  const polledAhead = polled.data && live && polled.data.id === live.id && polled.data.counts.rowsRead > live.counts.rowsRead;
  const run = upload.data ?? refused ?? (polledAhead ? polled.data! : live);
  const phase: ImportPhase = upload.isSuccess
    ? { kind: 'finished' }
    : upload.error instanceof DOMException && upload.error.name === 'AbortError'
      ? { kind: 'cancelled' }
      : upload.isError
        ? { kind: 'failed', message: messageOf(upload.error) }
        : { kind: 'sending' };

  return (
    <div className="flex flex-col gap-4">
      <ScreenHeader title="Data">
        <NowPanel>
          <WhatNeedsMe imports={imports.data} />
        </NowPanel>
      </ScreenHeader>
      <section aria-labelledby="backfill-heading" className="flex max-w-3xl flex-col gap-2">
        <h2 id="backfill-heading" className="text-sm font-semibold text-text">
          Back-fill transactions from CSV
        </h2>
        <p className="text-sm text-muted">
          Past transactions, optionally labelled (chargebacks, confirmed legitimate), are stored as history for
          training; they are not scored or alerted.
        </p>
        <CsvUploadForm busy={upload.isPending} onStart={start} onCancel={() => abort.current?.abort()} />
      </section>
      {current && (
        <div className="max-w-3xl">
          <ImportProgress fileName={current.file.name} fileSize={current.file.size} phase={phase} sent={sent} run={run} />
        </div>
      )}
      <RecentImports
        imports={imports.data}
        loading={imports.isPending}
        error={imports.isError ? messageOf(imports.error) : null}
        showUploader={showUploader}
      />
    </div>
  );
}
