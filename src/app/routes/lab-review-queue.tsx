import { can } from '../../../shared/contracts/roles.ts';
import { PageHeader } from '../../components/ui/primitives.tsx';
import { ReviewQueueView } from '../../features/reviews/components/review-queue-view.tsx';
import { useLab } from '../lab-context.ts';
import { NotFoundPage } from './not-found.tsx';

export function Component() {
  const { membership } = useLab();
  if (!can(membership.role, 'reviews:queue')) return <NotFoundPage message="The review queue is open to reviewers and admins." />;
  return (
    <>
      <PageHeader title="Review queue" subtitle="Shots sent for sign-off, oldest first. Open one to sign it off or return it with a comment." />
      <ReviewQueueView labId={membership.labId} />
    </>
  );
}

export { RouteError as ErrorBoundary } from './route-error.tsx';
