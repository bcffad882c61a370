import { useState, type FormEvent } from 'react';
import { Link } from 'react-router-dom';
import { passwordResetRequestBody } from '../../../shared/contracts/auth.ts';
import { Wordmark } from '../../components/ui/logo.tsx';
import { Button, ErrorNote, TextField } from '../../components/ui/primitives.tsx';
import { fieldErrorsOf, useRequestPasswordReset } from '../../features/account/api/account.ts';

/** "Forgot password?": asks for the address; the answer is the same whether or not it has an account. */
export function Component() {
  const requestReset = useRequestPasswordReset();
  const [email, setEmail] = useState('');
  const [error, setError] = useState<string>();

  const submit = (e: FormEvent) => {
    e.preventDefault();
    const parsed = passwordResetRequestBody.safeParse({ email });
    if (!parsed.success) return setError(parsed.error.issues[0].message);
    setError(undefined);
    requestReset.mutate(parsed.data, { onError: (err) => setError(fieldErrorsOf(err).email) });
  };

  return (
    <div className="flex min-h-screen items-center justify-center px-6 py-12">
      <div className="w-full max-w-sm">
        <Wordmark />
        <h1 className="mt-8 text-2xl font-semibold tracking-tight">Forgot your password?</h1>
        <p className="mt-1 text-sm text-harbour-500">Type the address you sign in with. We e-mail it a link to set a new password.</p>
        {requestReset.isSuccess ? (
          <div role="status" className="mt-8 rounded-md bg-emerald-50 p-4 text-sm text-emerald-900 ring-1 ring-emerald-200">
            <p>{requestReset.data.message}</p>
            <p className="mt-2">Using the link signs you out of every browser.</p>
          </div>
        ) : (
          <form className="mt-8 space-y-4" onSubmit={submit} noValidate>
            <TextField label="E-mail" type="email" autoComplete="username" value={email} onChange={(e) => setEmail(e.target.value)} error={error} required />
            {requestReset.isError && !error && <ErrorNote error={requestReset.error} />}
            <Button type="submit" className="w-full" disabled={requestReset.isPending}>{requestReset.isPending ? 'Sending…' : 'E-mail me a link'}</Button>
          </form>
        )}
        <p className="mt-6 text-sm"><Link to="/sign-in" className="text-harbour-700 underline">Back to sign-in</Link></p>
      </div>
    </div>
  );
}

export { RouteError as ErrorBoundary } from './route-error.tsx';
