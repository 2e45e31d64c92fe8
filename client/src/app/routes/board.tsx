import { NowPanel, ScreenHeader } from '@/components/ui/screen-header';

export function BoardRoute() {
  return (
    <div className="flex flex-col gap-4">
      <title>Board · Edgecase</title>
      <ScreenHeader title="Board">
        <NowPanel>
          Not connected to the team's work yet. This will show approvals waiting for your four-eyes review, cases
          about to breach the SLA, and anyone holding more cases than they can clear.
        </NowPanel>
      </ScreenHeader>
      <p className="max-w-prose text-sm text-muted">
        Coming here: the team's workload live: who holds which cases and for how long, the SLA clock of each,
        reassigning one case or many, approving high-value decisions, and the daily alert budget that sets the
        alert threshold.
      </p>
    </div>
  );
}
