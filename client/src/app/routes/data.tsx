import { DataScreen } from '@/features/data/components/data-screen';
import { useSessionUser } from '../session';

export function DataRoute() {
  const { role } = useSessionUser();
  return (
    <>
      <title>Data · Edgecase</title>
      <DataScreen showUploader={role === 'admin'} />
    </>
  );
}
