import { useQueryClient } from '@tanstack/react-query';
import { useRef, useState } from 'react';
import { Link, useLocation, useNavigate } from 'react-router';
import { DISPOSITION_LABELS, FRAUD_TYPE_LABELS, type QueueAlertEvent, type QueueCaseChangedEvent } from '@shared/api/cases';
import { QUEUE_ALERT_EVENT, QUEUE_CASE_CHANGED_EVENT } from '@shared/api/realtime';
import { KeyHint } from '@/components/ui/key-hint';
import { formatProbability } from '@/lib/format';
import { useHotkey } from '@/lib/hotkeys';
import { formatMoney } from '@/lib/money';
import { useSocketEvent } from '@/lib/socket';
import { formatDateTime, useServerNow } from '@/lib/time';
import { useClaimCase } from '../api/claim-case';
import { getCaseQueryOptions, useCase } from '../api/get-case';
import { CardActivityPanel } from './card-activity-panel';
import { CardPanel } from './card-panel';
import { CaseHeader, CaseWorkActions } from './case-header';
import { ContactPanel } from './contact-panel';
import { DispositionForm } from './disposition-form';
import { EscalatePanel } from './escalate-panel';
import { EvidencePanel } from './evidence-panel';
import { NotesPanel } from './notes-panel';
import { Panel } from './panel';
import { ReasonsPanel } from './reasons-panel';
import { TimelinePanel } from './timeline-panel';
import { WhatIfPanel } from './what-if-panel';

/** What the Queue hands over when it opens a case: where to come back to, and a line to show on arrival. */
export type CaseFileState = { queueSearch?: string; flash?: string } | null;

export function CaseFileScreen({ caseId, meId }: { caseId: number; meId: number }) {
  const { data: detail, dataUpdatedAt } = useCase(caseId);
  const now = useServerNow(detail.serverTime, dataUpdatedAt);
  const queryClient = useQueryClient();
  const navigate = useNavigate();
  const state = useLocation().state as CaseFileState;
  const queueSearch = state?.queueSearch ?? '';
  const queuePath = queueSearch ? `/queue?${queueSearch}` : '/queue';
  const claim = useClaimCase(caseId);
  const dispositionForm = useRef<HTMLFormElement>(null);
  const noteBox = useRef<HTMLTextAreaElement | null>(null);

  const alerts = [...detail.alerts].sort((a, b) => b.probability - a.probability);
  const [alertId, setAlertId] = useState(alerts[0]?.alertId);
  const alertIndex = Math.max(0, alerts.findIndex((a) => a.alertId === alertId));
  const alert = alerts[alertIndex];

  // Someone else acting on this case (or a new alert joining it) makes this page stale: fetch it again.
  const refreshIfThis = (event: QueueCaseChangedEvent | QueueAlertEvent) => {
    if (event?.caseId === caseId) void queryClient.invalidateQueries({ queryKey: getCaseQueryOptions(caseId).queryKey });
  };
  useSocketEvent<[QueueCaseChangedEvent]>(QUEUE_CASE_CHANGED_EVENT, refreshIfThis);
  useSocketEvent<[QueueAlertEvent]>(QUEUE_ALERT_EVENT, refreshIfThis);

  const group = 'Case file';
  const mine = detail.case.assignee?.id === meId;
  useHotkey('c', () => !mine && detail.case.status !== 'closed' && !claim.isPending && claim.mutate(undefined), {
    description: 'Claim this case',
    group,
  });
  useHotkey('b', () => navigate(queuePath), { description: 'Back to the queue', group });
  useHotkey(']', () => alerts.length && setAlertId(alerts[(alertIndex + 1) % alerts.length].alertId), { description: 'Next alert of this case', group });
  useHotkey('[', () => alerts.length && setAlertId(alerts[(alertIndex - 1 + alerts.length) % alerts.length].alertId), {
    description: 'Previous alert of this case',
    group,
  });
  useHotkey('n', () => noteBox.current?.focus(), { description: 'Write a note', group });
  useHotkey(
    'Ctrl+Enter',
    (event) => {
      const form = event.target instanceof Element ? event.target.closest('form') : null;
      (form ?? dispositionForm.current)?.requestSubmit();
    },
    { description: 'Save the form you are in (otherwise the disposition)', group },
  );

  const alertSwitcher =
    alerts.length > 1 ? (
      <label className="inline-flex items-center gap-1.5 text-xs text-muted">
        <KeyHint keys="[" />
        <span className="sr-only">Alert</span>
        <select
          value={alert?.alertId}
          onChange={(event) => setAlertId(Number(event.target.value))}
          className="h-7 max-w-72 rounded border border-control bg-surface px-1 text-xs text-text"
        >
          {alerts.map((a, i) => (
            <option key={a.alertId} value={a.alertId}>
              {`Alert ${i + 1} of ${alerts.length}: ${formatProbability(a.probability)}, ${formatMoney(a.amount)}, ${formatDateTime(a.occurredAt)}`}
            </option>
          ))}
        </select>
        <KeyHint keys="]" />
      </label>
    ) : null;

  return (
    <div className="flex flex-col gap-3">
      <title>{`Case ${caseId} · Edgecase`}</title>
      <nav aria-label="Case file" className="flex flex-wrap items-center gap-3 text-sm">
        <Link to={queuePath} className="inline-flex items-center gap-1.5 text-link underline-offset-2 hover:underline">
          ← Back to the queue <KeyHint keys="b" />
        </Link>
        {state?.flash && (
          <p role="status" className="text-sm text-text">
            {state.flash}
          </p>
        )}
      </nav>

      <CaseHeader detail={detail} now={now} meId={meId} actions={<CaseWorkActions detail={detail} meId={meId} claim={claim} />} />

      <div className="grid items-start gap-3 xl:grid-cols-[minmax(0,1fr)_27rem]">
        <div className="flex min-w-0 flex-col gap-3">
          {alert ? (
            <>
              <Panel title="Why it scored high" actions={alertSwitcher}>
                <ReasonsPanel alert={alert} />
              </Panel>
              <Panel title="What-if">
                <WhatIfPanel alert={alert} />
              </Panel>
            </>
          ) : (
            <p className="rounded border border-border bg-surface p-3 text-sm text-muted">This case has no alerts to explain.</p>
          )}
          <Panel title="Card activity">
            <CardActivityPanel activity={detail.activity} related={detail.related} />
          </Panel>
          <Panel title="Timeline">
            <TimelinePanel timeline={detail.timeline} />
          </Panel>
        </div>
        <div className="flex min-w-0 flex-col gap-3">
          <Panel title="Disposition">
            <DispositionForm
              key={caseId}
              detail={detail}
              formRef={dispositionForm}
              onSaved={(result, values) => {
                const label = DISPOSITION_LABELS[values.disposition].toLowerCase();
                const type = values.fraudType ? ` (${FRAUD_TYPE_LABELS[values.fraudType].toLowerCase()})` : '';
                const waiting = result.case.status === 'awaiting_approval' ? ', waiting for approval' : '';
                const flash = `Case ${caseId} saved as ${label}${type}${waiting}.`;
                navigate(result.nextCaseId ? `/cases/${result.nextCaseId}` : queuePath, { state: { queueSearch, flash } satisfies CaseFileState });
              }}
            />
          </Panel>
          <Panel title="Card">
            <CardPanel detail={detail} />
          </Panel>
          <Panel title="Notes">
            <NotesPanel caseId={caseId} notes={detail.notes} textareaRef={(el) => (noteBox.current = el)} />
          </Panel>
          <Panel title="Contact cardholder">
            <ContactPanel detail={detail} />
          </Panel>
          <Panel title="Evidence">
            <EvidencePanel caseId={caseId} evidence={detail.evidence} />
          </Panel>
          <Panel title="Escalate">
            <EscalatePanel detail={detail} />
          </Panel>
        </div>
      </div>
    </div>
  );
}
