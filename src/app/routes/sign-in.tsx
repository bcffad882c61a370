import { useState, type FormEvent } from 'react';
import { Link, Navigate, useNavigate, useSearchParams } from 'react-router-dom';
import { loginBody } from '../../../shared/contracts/auth.ts';
import { Wordmark } from '../../components/ui/logo.tsx';
import { Button, ErrorNote, TextField } from '../../components/ui/primitives.tsx';
import { useMe } from '../../features/auth/api/me.ts';
import { useSignIn } from '../../features/auth/api/sign-in.ts';

/** Only same-site paths are followed after sign-in, never another origin. */
const safeNext = (next: string | null) => (next && next.startsWith('/') && !next.startsWith('//') ? next : '/');

export function Component() {
  const [params] = useSearchParams();
  const navigate = useNavigate();
  const me = useMe();
  const signIn = useSignIn();
  const [email, setEmail] = useState('');
  const [password, setPassword] = useState('');
  const [fieldErrors, setFieldErrors] = useState<Record<string, string>>({});
  const next = safeNext(params.get('next'));

  if (me.data) return <Navigate to={next} replace />;

  const submit = (e: FormEvent) => {
    e.preventDefault();
    const parsed = loginBody.safeParse({ email, password });
    if (!parsed.success) {
      setFieldErrors(Object.fromEntries(parsed.error.issues.map((i) => [String(i.path[0]), i.message])));
      return;
    }
    setFieldErrors({});
    signIn.mutate(parsed.data, { onSuccess: () => navigate(next, { replace: true }) });
  };

  return (
    <div className="grid min-h-screen lg:grid-cols-[1fr_1.1fr]">
      <div className="flex items-center justify-center px-6 py-12">
        <div className="w-full max-w-sm">
          <Wordmark />
          <h1 className="mt-8 text-2xl font-semibold tracking-tight">Sign in</h1>
          <p className="mt-1 text-sm text-harbour-500">Use the account your lab admin invited you with.</p>
          {params.get('reset') === 'done' && (
            <p role="status" className="mt-4 rounded-md bg-emerald-50 px-3 py-2 text-sm text-emerald-900 ring-1 ring-emerald-200">
              Your new password is set and every browser was signed out. Sign in with the new password.
            </p>
          )}
          {params.get('signed-out') === 'everywhere' && (
            <p role="status" className="mt-4 rounded-md bg-emerald-50 px-3 py-2 text-sm text-emerald-900 ring-1 ring-emerald-200">
              You are signed out of every browser.
            </p>
          )}
          <form className="mt-8 space-y-4" onSubmit={submit} noValidate>
            <TextField label="E-mail" type="email" autoComplete="username" value={email} onChange={(e) => setEmail(e.target.value)} error={fieldErrors.email} required />
            <TextField label="Password" type="password" autoComplete="current-password" value={password} onChange={(e) => setPassword(e.target.value)} error={fieldErrors.password} required />
            <p className="-mt-2 text-right text-sm"><Link to="/forgot-password" className="text-harbour-700 underline">Forgot password?</Link></p>
            {signIn.isError && <ErrorNote error={signIn.error} />}
            <Button type="submit" className="w-full" disabled={signIn.isPending}>{signIn.isPending ? 'Signing in…' : 'Sign in'}</Button>
          </form>
        </div>
      </div>
      <aside className="relative hidden overflow-hidden bg-harbour-800 lg:block" aria-hidden="true">
        <svg className="absolute inset-0 h-full w-full" viewBox="0 0 600 800" preserveAspectRatio="xMidYMid slice">
          <defs>
            <pattern id="grid" width="40" height="40" patternUnits="userSpaceOnUse">
              <path d="M40 0H0V40" fill="none" stroke="#244863" strokeWidth="1" />
            </pattern>
          </defs>
          <rect width="600" height="800" fill="url(#grid)" />
          <path d="M40 420 H150 L158 520 H232 L240 420 H330 L338 520 H412 L420 420 H560" fill="none" stroke="#98b4cb" strokeWidth="3" />
          <path d="M40 300 H560" stroke="#f2a541" strokeWidth="2" strokeDasharray="6 6" />
          <circle cx="286" cy="300" r="14" fill="#f2a541" />
        </svg>
        <div className="absolute bottom-12 left-12 right-12 text-harbour-100">
          <p className="text-xl font-medium text-white">From scope file to signed-off speed.</p>
          <p className="mt-2 max-w-md text-sm text-harbour-200">
            Gate crossings, pulse widths, time of flight and its uncertainty, every threshold and every version kept.
          </p>
        </div>
      </aside>
    </div>
  );
}

export { RouteError as ErrorBoundary } from './route-error.tsx';
