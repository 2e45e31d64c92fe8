import { can } from '@shared/auth/roles';
import { NowPanel, ScreenHeader } from '@/components/ui/screen-header';
import { useSessionUser } from '../session';

export function ModelsRoute() {
  const { role } = useSessionUser();
  const readOnly = !can(role, 'models:promote');
  return (
    <div className="flex flex-col gap-4">
      <title>Models · Edgecase</title>
      <ScreenHeader title="Models">
        <NowPanel>
          Not connected to the model registry yet. This will show a challenger waiting for review, a training run
          that failed, and drift above its limit.
        </NowPanel>
      </ScreenHeader>
      {readOnly && (
        <p className="text-xs text-muted">
          Read-only for your role: you can see versions and evaluations; training and promotion stay with data
          scientists.
        </p>
      )}
      <p className="max-w-prose text-sm text-muted">
        Coming here: the champion and challenger versions side by side, each evaluated on newer held-out data
        (precision, recall, PR AUC at the alert budget), training runs nightly or on demand, drift by feature
        (PSI), and promotion or rollback with a recorded reason.
      </p>
    </div>
  );
}
