import type { QueryClient } from '@tanstack/react-query';
import { data, useParams, type LoaderFunctionArgs } from 'react-router';
import { getCaseQueryOptions } from '@/features/case-file/api/get-case';
import { CaseFileScreen } from '@/features/case-file/components/case-file-screen';
import { useSessionUser } from '../session';

function caseIdOf(raw: string | undefined): number | null {
  const id = Number(raw);
  return Number.isSafeInteger(id) && id > 0 ? id : null;
}

/** The whole case arrives before the page renders, so its panels open without a cascade of spinners. */
export function caseFileLoader(queryClient: QueryClient) {
  return async ({ params }: LoaderFunctionArgs) => {
    const id = caseIdOf(params.id);
    if (id === null) throw data(null, { status: 404, statusText: 'No such case' });
    await queryClient.ensureQueryData(getCaseQueryOptions(id));
    return null;
  };
}

export function CaseFileRoute() {
  const { id } = useParams();
  const user = useSessionUser();
  const caseId = caseIdOf(id)!;
  // A new case is a new page: no form entries or chosen alert carry over from the last one.
  return <CaseFileScreen key={caseId} caseId={caseId} meId={user.id} />;
}
