import { NavLink, Outlet, useNavigate, useParams, Link } from 'react-router-dom';
import { ROLE_LABELS } from '../../shared/contracts/roles.ts';
import type { MeView } from '../../shared/contracts/auth.ts';
import { Wordmark } from '../components/ui/logo.tsx';
import { Badge, Button } from '../components/ui/primitives.tsx';
import { useSignOut } from '../features/auth/api/sign-out.ts';
import { NotFoundPage } from './routes/not-found.tsx';
import { sectionsFor } from './navigation.ts';
import { useLabEvents } from './use-lab-events.ts';

export function TopBar({ me, labId }: { me: MeView; labId?: string }) {
  const navigate = useNavigate();
  const signOut = useSignOut();
  return (
    <header className="bg-harbour-800 text-white">
      <div className="mx-auto flex max-w-7xl flex-wrap items-center gap-4 px-4 py-3 sm:px-6">
        <Link to="/" aria-label="Gatepost home"><Wordmark inverted /></Link>
        {me.memberships.length > 0 && (
          <label className="flex items-center gap-2 text-sm text-harbour-200">
            <span className="sr-only sm:not-sr-only">Lab</span>
            <select
              aria-label="Lab"
              value={labId ?? ''}
              onChange={(e) => navigate(`/labs/${e.target.value}/campaigns`)}
              className="rounded-md border-0 bg-harbour-700 py-1.5 pl-2 pr-8 text-sm text-white ring-1 ring-harbour-600 focus:ring-signal-400"
            >
              {!labId && <option value="">Choose a lab</option>}
              {me.memberships.map((m) => <option key={m.labId} value={m.labId}>{m.labName}</option>)}
            </select>
          </label>
        )}
        <div className="ml-auto flex items-center gap-3 text-sm">
          <span className="hidden text-harbour-100 md:inline" data-testid="signed-in-as">{me.user.name}</span>
          <Link to="/account" className="rounded px-2 py-1 text-harbour-100 hover:bg-harbour-700">Account</Link>
          <Link to="/account/tokens" className="rounded px-2 py-1 text-harbour-100 hover:bg-harbour-700">API tokens</Link>
          <Button
            variant="secondary"
            className="!py-1.5"
            disabled={signOut.isPending}
            onClick={() => signOut.mutate(undefined, { onSuccess: () => navigate('/sign-in', { replace: true }) })}
          >
            Sign out
          </Button>
        </div>
        {signOut.isError && (
          <p role="alert" className="basis-full text-right text-sm text-red-200">
            Sign-out failed: {signOut.error.message}
          </p>
        )}
      </div>
    </header>
  );
}

/** The frame of every lab page: top bar, the role's sections, and the page. */
export function LabShell({ me }: { me: MeView }) {
  const { labId } = useParams();
  const membership = me.memberships.find((m) => m.labId === labId);
  useLabEvents(membership ? labId : undefined);
  if (!membership) {
    return (
      <div className="min-h-screen">
        <TopBar me={me} />
        <NotFoundPage message="This lab does not exist, or you are not a member of it." />
      </div>
    );
  }
  const sections = sectionsFor(membership.role);
  return (
    <div className="min-h-screen">
      <TopBar me={me} labId={labId} />
      <div className="mx-auto flex max-w-7xl flex-col gap-6 px-4 py-6 sm:px-6 md:flex-row">
        <nav aria-label="Lab sections" className="md:w-56 md:shrink-0">
          <div className="mb-3 hidden md:block">
            <p className="text-xs font-medium uppercase tracking-wide text-harbour-500">{membership.labName}</p>
            <p className="mt-1"><Badge tone="signal">{ROLE_LABELS[membership.role]}</Badge></p>
          </div>
          <ul className="flex gap-1 overflow-x-auto md:flex-col">
            {sections.map((s) => (
              <li key={s.to}>
                <NavLink
                  to={`/labs/${labId}/${s.to}`}
                  className={({ isActive }) =>
                    `block whitespace-nowrap rounded-md px-3 py-2 text-sm font-medium ${isActive ? 'bg-white text-harbour-900 shadow-sm ring-1 ring-harbour-100' : 'text-harbour-600 hover:bg-harbour-100'}`
                  }
                >
                  {s.label}
                </NavLink>
              </li>
            ))}
          </ul>
        </nav>
        <main className="min-w-0 flex-1">
          <Outlet context={{ me, membership }} />
        </main>
      </div>
    </div>
  );
}
