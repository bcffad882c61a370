import { useParams } from 'react-router-dom';
import { BatchResult } from '../../features/batches/components/batch-result.tsx';
import { useLab } from '../lab-context.ts';

export function Component() {
  const { membership } = useLab();
  const { batchId = '' } = useParams();
  return <BatchResult labId={membership.labId} batchId={batchId} />;
}

export { RouteError as ErrorBoundary } from './route-error.tsx';
