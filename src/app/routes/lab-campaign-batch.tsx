import { useParams } from 'react-router-dom';
import { BatchForm } from '../../features/batches/components/batch-form.tsx';
import { useLab } from '../lab-context.ts';

export function Component() {
  const { membership } = useLab();
  const { campaignId = '' } = useParams();
  return <BatchForm labId={membership.labId} campaignId={campaignId} />;
}

export { RouteError as ErrorBoundary } from './route-error.tsx';
