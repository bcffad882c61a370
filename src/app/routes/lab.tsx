import { RequireAuth } from '../require-auth.tsx';
import { LabShell } from '../lab-shell.tsx';

export function Component() {
  return <RequireAuth>{(me) => <LabShell me={me} />}</RequireAuth>;
}

export { RouteError as ErrorBoundary } from './route-error.tsx';
