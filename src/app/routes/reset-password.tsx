import { useState, type FormEvent } from 'react';
import { Link, useNavigate } from 'react-router-dom';
import { passwordResetCompleteBody } from '../../../shared/contracts/auth.ts';
import { Wordmark } from '../../components/ui/logo.tsx';
import { Button, ErrorNote, Loading, TextField } from '../../components/ui/primitives.tsx';
import { ApiError } from '../../lib/api-client.ts';
import { fieldErrorsOf, useCheckPasswordReset, useCompletePasswordReset } from '../../features/account/api/account.ts';

/** The secret rides in the link's fragment (#token=…), which the browser never sends to a server or a log. */
const tokenFromHash = (hash: string) => new URLSearchParams(hash.replace(/^#/, '')).get('token') ?? '';

/** "until 14:35" today, or "until 3 Dec, 14:35" on another day, in the reader's own time zone. */
function until(iso: string): string {
  const at = new Date(iso);
  const time = at.toLocaleTimeString(undefined, { hour: '2-digit', minute: '2-digit' });
  return at.toDateString() === new Date().toDateString() ? time : `${at.toLocaleDateString(undefined, { day: 'numeric', month: 'short' })}, ${time}`;
}

/**
 * Sets a new password with the link from the reset e-mail, then sends the person to sign in with it. The link is
 * checked as the page opens, so an expired or used one is said at once, not after the new password was typed.
 */
export function Component() {
  const complete = useCompletePasswordReset();
  const navigate = useNavigate();
  const [token] = useState(() => tokenFromHash(window.location.hash));
  const check = useCheckPasswordReset(token);
  // 410: expired or used; 400: a cut-off link. Any other failure (network, 429) leaves the form: saving checks again.
  const closed = check.error instanceof ApiError && (check.error.status === 410 || check.error.status === 400) ? check.error : null;
  const [password, setPassword] = useState('');
  const [repeat, setRepeat] = useState('');
  const [fieldErrors, setFieldErrors] = useState<Record<string, string>>({});

  const submit = (e: FormEvent) => {
    e.preventDefault();
    const parsed = passwordResetCompleteBody.safeParse({ token, password });
    const errors: Record<string, string> = {};
    if (!parsed.success) for (const issue of parsed.error.issues) errors[String(issue.path[0])] ??= issue.message;
    if (!errors.password && password !== repeat) errors.repeat = 'The two passwords differ.';
    setFieldErrors(errors);
    if (!parsed.success || errors.repeat) return;
    complete.mutate(parsed.data, {
      onSuccess: () => navigate('/sign-in?reset=done', { replace: true }),
      onError: (err) => setFieldErrors(fieldErrorsOf(err)),
    });
  };

  return (
    <div className="flex min-h-screen items-center justify-center px-6 py-12">
      <div className="w-full max-w-sm">
        <Wordmark />
        <h1 className="mt-8 text-2xl font-semibold tracking-tight">Set a new password</h1>
        <p className="mt-1 text-sm text-harbour-500">Every browser signed in to your account is signed out when you save it.</p>
        {!token ? (
          <div className="mt-8"><ErrorNote error={new Error('This page needs the link from the reset e-mail. Open it again from the e-mail, or ask for a new one.')} /></div>
        ) : check.isPending ? (
          <div className="mt-8"><Loading what="Checking your link" /></div>
        ) : closed ? (
          <div className="mt-8 space-y-4">
            <ErrorNote error={closed.status === 400 ? new Error('This link is incomplete: open it again from the e-mail, or ask for a new one.') : closed} />
            <Link to="/forgot-password" className="flex w-full items-center justify-center rounded-md bg-harbour-800 px-3.5 py-2 text-sm font-medium text-white transition-colors hover:bg-harbour-700 focus-visible:outline-2 focus-visible:outline-offset-2 focus-visible:outline-signal-400">Ask for a new link</Link>
          </div>
        ) : (
          <form className="mt-8 space-y-4" onSubmit={submit} noValidate>
            {check.data && <p role="status" className="text-sm text-harbour-600">Your link works until {until(check.data.expiresAt)}, once.</p>}
            <TextField label="New password" type="password" autoComplete="new-password" value={password} onChange={(e) => setPassword(e.target.value)} error={fieldErrors.password} hint="At least 10 characters" />
            <TextField label="New password again" type="password" autoComplete="new-password" value={repeat} onChange={(e) => setRepeat(e.target.value)} error={fieldErrors.repeat} />
            {fieldErrors.token && <ErrorNote error={new Error(fieldErrors.token)} />}
            {complete.isError && Object.keys(fieldErrorsOf(complete.error)).length === 0 && <ErrorNote error={complete.error} />}
            <Button type="submit" className="w-full" disabled={complete.isPending}>{complete.isPending ? 'Saving…' : 'Save the new password'}</Button>
          </form>
        )}
        <p className="mt-6 text-sm">
          {!closed && (
            <>
              <Link to="/forgot-password" className="text-harbour-700 underline">Ask for a new link</Link>
              <span className="px-2 text-harbour-300">·</span>
            </>
          )}
          <Link to="/sign-in" className="text-harbour-700 underline">Sign in</Link>
        </p>
      </div>
    </div>
  );
}

export { RouteError as ErrorBoundary } from './route-error.tsx';
