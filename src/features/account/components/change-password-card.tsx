import { useState, type FormEvent } from 'react';
import { changePasswordBody } from '../../../../shared/contracts/auth.ts';
import { Button, Card, ErrorNote, TextField } from '../../../components/ui/primitives.tsx';
import { fieldErrorsOf, useChangePassword } from '../api/account.ts';

/** Change password: the current one, a new one (same rule as sign-up) typed twice; says what happens to sessions and tokens. */
export function ChangePasswordCard() {
  const change = useChangePassword();
  const [currentPassword, setCurrent] = useState('');
  const [newPassword, setNew] = useState('');
  const [repeat, setRepeat] = useState('');
  const [alsoRevokeTokens, setAlsoRevokeTokens] = useState(false);
  const [fieldErrors, setFieldErrors] = useState<Record<string, string>>({});
  const [done, setDone] = useState<string>();

  const submit = (e: FormEvent) => {
    e.preventDefault();
    setDone(undefined);
    const parsed = changePasswordBody.safeParse({ currentPassword, newPassword, alsoRevokeTokens });
    const errors: Record<string, string> = {};
    if (!parsed.success) for (const issue of parsed.error.issues) errors[String(issue.path[0])] ??= issue.message;
    if (!errors.newPassword && newPassword !== repeat) errors.repeat = 'The two new passwords differ.';
    setFieldErrors(errors);
    if (!parsed.success || errors.repeat) return;
    change.mutate(parsed.data, {
      onSuccess: (r) => {
        setCurrent(''); setNew(''); setRepeat('');
        setDone(`Password changed. Your other browser sessions are signed out${r.tokensRevoked > 0 ? `, and ${r.tokensRevoked} API token${r.tokensRevoked === 1 ? ' was' : 's were'} revoked` : '; your API tokens still work'}.`);
      },
      onError: (err) => setFieldErrors(fieldErrorsOf(err)),
    });
  };
  const serverFields = fieldErrorsOf(change.error);

  return (
    <Card title="Change password">
      <form onSubmit={submit} className="space-y-4" noValidate>
        <TextField label="Current password" type="password" autoComplete="current-password" value={currentPassword} onChange={(e) => setCurrent(e.target.value)} error={fieldErrors.currentPassword} />
        <div className="grid gap-4 sm:grid-cols-2">
          <TextField label="New password" type="password" autoComplete="new-password" value={newPassword} onChange={(e) => setNew(e.target.value)} error={fieldErrors.newPassword} hint="At least 10 characters" />
          <TextField label="New password again" type="password" autoComplete="new-password" value={repeat} onChange={(e) => setRepeat(e.target.value)} error={fieldErrors.repeat} />
        </div>
        <label className="flex items-start gap-2 text-sm text-harbour-700">
          <input type="checkbox" className="mt-0.5" checked={alsoRevokeTokens} onChange={(e) => setAlsoRevokeTokens(e.target.checked)} />
          <span>Also revoke my personal API tokens (scripts using them stop until you give them a new one).</span>
        </label>
        <p className="text-sm text-harbour-500">
          Changing the password signs out your other browser sessions; this one stays signed in. Your API tokens keep
          working unless you tick the box. We e-mail you a notice.
        </p>
        {change.isError && Object.keys(serverFields).length === 0 && <ErrorNote error={change.error} />}
        {done && <p role="status" className="text-sm text-emerald-700">{done}</p>}
        <Button type="submit" disabled={change.isPending}>{change.isPending ? 'Changing…' : 'Change password'}</Button>
      </form>
    </Card>
  );
}
