import { NowPanel, ScreenHeader } from '@/components/ui/screen-header';

export function AuditRoute() {
  return (
    <div className="flex flex-col gap-4">
      <title>Audit · Edgecase</title>
      <ScreenHeader title="Audit">
        <NowPanel>
          Not connected to the audit trail yet. This will show sensitive changes since you last looked: threshold
          changes, model promotions, role changes.
        </NowPanel>
      </ScreenHeader>
      <p className="max-w-prose text-sm text-muted">
        Coming here: who did what and when: sign-ins, claims, dispositions, reassignments, approvals, threshold
        changes, model promotions and account changes, filterable by person, case and time, and exportable.
      </p>
    </div>
  );
}
