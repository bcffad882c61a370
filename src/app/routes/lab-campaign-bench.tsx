import { useParams } from 'react-router-dom';
import { BenchDisplay } from '../../features/bench/components/bench-display.tsx';
import { RequireAuth } from '../require-auth.tsx';
import { useLabEvents } from '../use-lab-events.ts';
import { NotFoundPage } from './not-found.tsx';

/** Full screen, outside the lab's frame: the display beside the launcher. */
export function Component() {
  const { labId = '', campaignId = '' } = useParams();
  return (
    <RequireAuth>
      {(me) => {
        const membership = me.memberships.find((m) => m.labId === labId);
        if (!membership) return <NotFoundPage message="This lab does not exist, or you are not a member of it." />;
        return <LiveBench labId={labId} campaignId={campaignId} labName={membership.labName} />;
      }}
    </RequireAuth>
  );
}

/** The display, listening to the lab's event stream so a finished shot shows without waiting for the next poll. */
function LiveBench({ labId, campaignId, labName }: { labId: string; campaignId: string; labName: string }) {
  useLabEvents(labId);
  return <BenchDisplay labId={labId} campaignId={campaignId} labName={labName} />;
}

export { RouteError as ErrorBoundary } from './route-error.tsx';
