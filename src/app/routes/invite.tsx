import { useState, type FormEvent } from 'react';
import { useNavigate, useParams } from 'react-router-dom';
import { newPasswordSchema } from '../../../shared/contracts/auth.ts';
import { ROLE_LABELS } from '../../../shared/contracts/roles.ts';
import { Wordmark } from '../../components/ui/logo.tsx';
import { Button, ErrorNote, Loading, TextField } from '../../components/ui/primitives.tsx';
import { useAcceptInvitation, useInvitation } from '../../features/auth/api/invitation.ts';

export function Component() {
  const { token = '' } = useParams();
  const navigate = useNavigate();
  const offer = useInvitation(token);
  const accept = useAcceptInvitation(token);
  const [name, setName] = useState('');
  const [password, setPassword] = useState('');
  const [problem, setProblem] = useState<string | undefined>();

  const submit = (e: FormEvent) => {
    e.preventDefault();
    if (!offer.data) return;
    if (!offer.data.accountExists) {
      if (!name.trim()) return setProblem('Enter your name.');
      const check = newPasswordSchema.safeParse(password);
      if (!check.success) return setProblem(check.error.issues[0].message);
    }
    setProblem(undefined);
    accept.mutate(
      { name: offer.data.accountExists ? undefined : name.trim(), password },
      { onSuccess: (me) => navigate(`/labs/${me.memberships.find((m) => m.labName === offer.data?.labName)?.labId ?? ''}/campaigns`, { replace: true }) },
    );
  };

  return (
    <div className="flex min-h-screen items-center justify-center px-6 py-12">
      <div className="w-full max-w-md rounded-lg bg-white p-8 shadow-sm ring-1 ring-harbour-100">
        <Wordmark />
        {offer.isPending && <Loading what="Opening the invitation" />}
        {offer.isError && <div className="mt-6"><ErrorNote error={offer.error} /></div>}
        {offer.data && (
          <>
            <h1 className="mt-6 text-xl font-semibold">Join {offer.data.labName}</h1>
            <p className="mt-2 text-sm text-harbour-600">
              {offer.data.invitedBy ?? 'A lab admin'} invited <strong>{offer.data.email}</strong> as{' '}
              <strong>{ROLE_LABELS[offer.data.role].toLowerCase()}</strong>.
            </p>
            <form className="mt-6 space-y-4" onSubmit={submit} noValidate>
              {!offer.data.accountExists && (
                <TextField label="Your name" autoComplete="name" value={name} onChange={(e) => setName(e.target.value)} />
              )}
              <TextField
                label={offer.data.accountExists ? 'Password of your existing account' : 'Choose a password'}
                type="password"
                autoComplete={offer.data.accountExists ? 'current-password' : 'new-password'}
                hint={offer.data.accountExists ? undefined : 'At least 10 characters.'}
                value={password}
                onChange={(e) => setPassword(e.target.value)}
              />
              {problem && <ErrorNote error={new Error(problem)} />}
              {accept.isError && <ErrorNote error={accept.error} />}
              <Button type="submit" className="w-full" disabled={accept.isPending}>
                {accept.isPending ? 'Joining…' : `Join ${offer.data.labName}`}
              </Button>
            </form>
          </>
        )}
      </div>
    </div>
  );
}

export { RouteError as ErrorBoundary } from './route-error.tsx';
