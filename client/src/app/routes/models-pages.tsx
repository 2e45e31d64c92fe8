import type { QueryClient } from '@tanstack/react-query';
import { data, useParams, type LoaderFunctionArgs } from 'react-router';
import { getLabelCoverageQueryOptions } from '@/features/models/api/get-label-coverage';
import { getLabelDelayQueryOptions } from '@/features/models/api/get-label-delay';
import { getModelVersionQueryOptions } from '@/features/models/api/get-model-version';
import { getShadowQueryOptions } from '@/features/models/api/get-shadow';
import { getTrainingScheduleQueryOptions } from '@/features/models/api/get-training-schedule';
import { CompareScreen } from '@/features/models/components/compare-screen';
import { DriftScreen } from '@/features/models/components/drift-screen';
import { LabelsScreen } from '@/features/models/components/labels-screen';
import { ModelCard } from '@/features/models/components/model-card';
import { OverviewScreen } from '@/features/models/components/overview-screen';
import { TrainingScreen } from '@/features/models/components/training-screen';
import { VersionScreen } from '@/features/models/components/version-screen';
import { VersionsScreen } from '@/features/models/components/versions-screen';
import { useSessionUser } from '../session';

function versionIdOf(raw: string | undefined): number | null {
  const id = Number(raw);
  return Number.isSafeInteger(id) && id > 0 ? id : null;
}

/** Secondary data is prefetched without waiting; the version page waits for its version (a 404 shows the route error). */
export function overviewLoader(queryClient: QueryClient) {
  return () => {
    void queryClient.prefetchQuery(getShadowQueryOptions(14));
    return null;
  };
}

export function versionLoader(queryClient: QueryClient) {
  return async ({ params }: LoaderFunctionArgs) => {
    const id = versionIdOf(params.id);
    if (id === null) throw data(null, { status: 404, statusText: 'No such model version' });
    await queryClient.ensureQueryData(getModelVersionQueryOptions(id));
    return null;
  };
}

export function trainingLoader(queryClient: QueryClient) {
  return () => {
    void queryClient.prefetchQuery(getTrainingScheduleQueryOptions());
    return null;
  };
}

export function labelsLoader(queryClient: QueryClient) {
  return () => {
    void queryClient.prefetchQuery(getLabelCoverageQueryOptions(12));
    void queryClient.prefetchQuery(getLabelDelayQueryOptions(180));
    return null;
  };
}

export function OverviewPage() {
  const user = useSessionUser();
  return <OverviewScreen viewer={user} />;
}

export function VersionsPage() {
  return <VersionsScreen />;
}

export function VersionPage() {
  const id = versionIdOf(useParams().id)!;
  return <VersionScreen key={id} id={id} />;
}

export function ModelCardPage() {
  const id = versionIdOf(useParams().id)!;
  return <ModelCard key={id} id={id} />;
}

export function ComparePage() {
  return <CompareScreen />;
}

export function TrainingPage() {
  const user = useSessionUser();
  return <TrainingScreen viewer={user} />;
}

export function DriftPage() {
  const user = useSessionUser();
  return <DriftScreen viewer={user} />;
}

export function LabelsPage() {
  const user = useSessionUser();
  return <LabelsScreen viewer={user} />;
}
