import type { ReactNode } from 'react';
import { Navigate, useLocation } from 'react-router-dom';
import { useMe } from '../features/auth/api/me.ts';
import { ErrorNote, Loading } from '../components/ui/primitives.tsx';
import type { MeView } from '../../shared/contracts/auth.ts';

/** Renders its children with the signed-in user, or sends the visitor to sign in and back here afterwards. */
export function RequireAuth({ children }: { children: (me: MeView) => ReactNode }) {
  const me = useMe();
  const location = useLocation();
  if (me.isPending) return <div className="p-8"><Loading what="Checking your session" /></div>;
  if (me.isError) return <div className="p-8"><ErrorNote error={me.error} /></div>;
  if (!me.data) {
    const next = location.pathname + location.search;
    return <Navigate to={`/sign-in${next !== '/' ? `?next=${encodeURIComponent(next)}` : ''}`} replace />;
  }
  return <>{children(me.data)}</>;
}
