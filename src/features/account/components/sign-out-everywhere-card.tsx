import { useState } from 'react';
import { useNavigate } from 'react-router-dom';
import { Button, Card, ErrorNote } from '../../../components/ui/primitives.tsx';
import { useSignOutEverywhere } from '../api/account.ts';

/** Ends every browser session of the account, this one too; API tokens only when asked. */
export function SignOutEverywhereCard() {
  const signOutAll = useSignOutEverywhere();
  const navigate = useNavigate();
  const [alsoRevokeTokens, setAlsoRevokeTokens] = useState(false);
  return (
    <Card title="Sign out everywhere">
      <p className="text-sm text-harbour-600">
        Signs out every browser where you are signed in to Gatepost, this one included: a lab PC you forgot, a lost
        laptop. You then sign in again here.
      </p>
      <label className="mt-3 flex items-start gap-2 text-sm text-harbour-700">
        <input type="checkbox" className="mt-0.5" checked={alsoRevokeTokens} onChange={(e) => setAlsoRevokeTokens(e.target.checked)} />
        <span>Also revoke my personal API tokens (otherwise scripts using them keep working).</span>
      </label>
      {signOutAll.isError && <div className="mt-3"><ErrorNote error={signOutAll.error} /></div>}
      <Button
        variant="danger"
        className="mt-4"
        disabled={signOutAll.isPending}
        onClick={() => signOutAll.mutate({ alsoRevokeTokens }, { onSuccess: () => navigate('/sign-in?signed-out=everywhere', { replace: true }) })}
      >
        {signOutAll.isPending ? 'Signing out…' : 'Sign out everywhere'}
      </Button>
    </Card>
  );
}
