import type { ReactNode } from 'react';
import { NavLink, useNavigate } from 'react-router';
import { can, type Role } from '@shared/auth/roles';
import { isFinished } from '@shared/api/models';
import { KeyHint } from '@/components/ui/key-hint';
import { NowPanel, ScreenHeader } from '@/components/ui/screen-header';
import { cn } from '@/lib/cn';
import { useHotkey } from '@/lib/hotkeys';
import { useDriftReports } from '../api/get-drift-reports';
import { useModels } from '../api/get-models';
import { usePromotions } from '../api/get-promotions';
import { useTrainingRuns } from '../api/get-training-runs';
import { useModelsLive } from '../utils/use-models-live';

export const MODELS_TABS = [
  { to: '/models', label: 'Overview', keys: 'm o', end: true },
  { to: '/models/versions', label: 'Versions', keys: 'm v', end: false },
  { to: '/models/compare', label: 'Compare', keys: 'm c', end: false },
  { to: '/models/training', label: 'Training', keys: 'm t', end: false },
  { to: '/models/drift', label: 'Drift', keys: 'm d', end: false },
  { to: '/models/labels', label: 'Labels', keys: 'm l', end: false },
] as const;

function TabHotkey({ to, label, keys }: { to: string; label: string; keys: string }) {
  const navigate = useNavigate();
  useHotkey(keys, () => navigate(to), { description: `Models: ${label}`, group: 'Models' });
  return null;
}

/** "What needs me now?" for the model owner and the approver: requests, runs, drift. */
function ModelsNow({ role }: { role: Role }) {
  const promotions = usePromotions();
  const runs = useTrainingRuns();
  const models = useModels();
  const drift = useDriftReports(models.data?.championId ?? null);
  const pending = promotions.data?.filter((p) => p.status === 'pending') ?? [];
  const active = runs.data?.filter((r) => !isFinished(r.status)) ?? [];
  const lastFailed = runs.data?.find((r) => isFinished(r.status))?.status === 'failed' ? runs.data.find((r) => isFinished(r.status)) : undefined;
  const latest = drift.data?.[drift.data.length - 1];
  const items: ReactNode[] = [];
  if (pending.length > 0) {
    items.push(
      <li key="p">
        <NavLink to="/models" className="text-link underline underline-offset-2">
          {pending.length} promotion request{pending.length === 1 ? '' : 's'} {can(role, 'models:approve') ? 'waiting for your approval' : 'waiting for a supervisor'}
        </NavLink>
      </li>,
    );
  }
  for (const r of active) {
    items.push(
      <li key={`r${r.id}`}>
        <NavLink to={`/models/training?run=${r.id}`} className="text-link underline underline-offset-2">
          Training run #{r.id} {r.status === 'queued' ? 'waiting to start' : `at round ${r.progress.round} of ${r.progress.totalRounds}`}
        </NavLink>
      </li>,
    );
  }
  if (lastFailed) {
    items.push(
      <li key="f">
        <NavLink to={`/models/training?run=${lastFailed.id}`} className="text-danger underline underline-offset-2">
          The last training run failed: {lastFailed.error}
        </NavLink>
      </li>,
    );
  }
  if (latest && latest.flagged.length > 0) {
    items.push(
      <li key="d">
        <NavLink to="/models/drift" className="text-danger underline underline-offset-2">
          Drift above 0.25 on {latest.flagged.join(', ')} ({latest.windowTo.slice(0, 10)})
        </NavLink>
      </li>,
    );
  }
  const challenger = models.data?.versions.find((v) => v.id === models.data?.challengerId);
  if (challenger && pending.length === 0 && can(role, 'models:promote')) {
    items.push(
      <li key="c">
        <NavLink to={`/models/compare?a=${models.data?.championId}&b=${challenger.id}`} className="text-link underline underline-offset-2">
          Challenger {challenger.label} is scoring in shadow: compare it with the champion
        </NavLink>
      </li>,
    );
  }
  return (
    <NowPanel>
      {items.length === 0 ? <p>Nothing waiting: no requests, no run in progress, no drift flag.</p> : <ul className="flex flex-col gap-0.5">{items}</ul>}
    </NowPanel>
  );
}

/** The Models area: what needs attention, the tabs, and the tab's page. */
export function ModelsLayout({ role, children }: { role: Role; children: ReactNode }) {
  useModelsLive();
  return (
    <div className="flex flex-col gap-4">
      <div className="flex flex-col gap-3 print:hidden">
        <ScreenHeader title="Models">
          <ModelsNow role={role} />
        </ScreenHeader>
        {!can(role, 'models:train') && (
          <p className="text-xs text-muted">
            Read-only for your role: you see versions, evaluations, drift and labels{can(role, 'models:approve') ? ', and you approve or turn down promotion requests' : ''};
            training and asking for promotions stay with data scientists.
          </p>
        )}
        <nav aria-label="Models sections">
          <ul className="flex flex-wrap gap-1 border-b border-border">
            {MODELS_TABS.map((t) => (
              <li key={t.to}>
                <TabHotkey to={t.to} label={t.label} keys={t.keys} />
                <NavLink
                  to={t.to}
                  end={t.end}
                  className={({ isActive }) =>
                    cn(
                      '-mb-px inline-flex h-8 items-center gap-2 border-b-2 px-2 text-sm',
                      isActive ? 'border-brand font-semibold text-text' : 'border-transparent text-muted hover:text-text',
                    )
                  }
                >
                  {t.label}
                  <KeyHint keys={t.keys} />
                </NavLink>
              </li>
            ))}
          </ul>
        </nav>
      </div>
      {children}
    </div>
  );
}
