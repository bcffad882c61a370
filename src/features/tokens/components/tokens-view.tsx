import { useState, type FormEvent } from 'react';
import { apiTokenBody } from '../../../../shared/contracts/auth.ts';
import { Badge, Button, Card, EmptyState, ErrorNote, Loading, TextField } from '../../../components/ui/primitives.tsx';
import { ApiError } from '../../../lib/api-client.ts';
import { fieldErrorsOf, fieldErrorsOfRequest, type FieldErrors } from '../../../lib/field-errors.ts';
import { formatDateTime } from '../../../lib/format.ts';
import { useCreateToken, useRevokeToken, useTokens } from '../api/tokens.ts';

export function TokensView() {
  const tokens = useTokens();
  const create = useCreateToken();
  const revoke = useRevokeToken();
  const [name, setName] = useState('');
  const [days, setDays] = useState('90');
  const [password, setPassword] = useState('');
  const [problems, setProblems] = useState<FieldErrors>({});
  const [secret, setSecret] = useState<string>();

  const submit = (e: FormEvent) => {
    e.preventDefault();
    const parsed = apiTokenBody.safeParse({ name, expiresInDays: days ? Number(days) : undefined, password });
    if (!parsed.success) return setProblems(fieldErrorsOf(parsed.error.issues));
    setProblems({});
    create.mutate(parsed.data, { onSuccess: (r) => { setSecret(r.secret); setName(''); setPassword(''); } });
  };

  // Each message beside its field, whether the browser or the server found it (a wrong password is the server's).
  const fromServer = fieldErrorsOfRequest(create.error);
  const wrongPassword = create.error instanceof ApiError && create.error.code === 'wrong_password' ? create.error.message : undefined;
  const errors: FieldErrors = { ...problems, ...fromServer, ...(wrongPassword ? { password: wrongPassword } : {}) };
  const formWide = errors[''] ?? (create.isError && Object.keys(fromServer).length === 0 && !wrongPassword ? create.error.message : undefined);
  return (
    <div className="space-y-6">
      <Card title="New API token">
        <p className="mb-4 text-sm text-harbour-600">
          Scripts send a token as <code className="rounded bg-harbour-100 px-1">Authorization: Bearer …</code> and act as you, with your roles.
        </p>
        <form onSubmit={submit} className="grid items-start gap-3 sm:grid-cols-[2fr_1fr_1.2fr_auto]" noValidate>
          <TextField label="Name" value={name} onChange={(e) => setName(e.target.value)} placeholder="e.g. nightly export script" error={errors.name} />
          <TextField label="Expires after (days)" type="number" min={1} max={366} value={days} onChange={(e) => setDays(e.target.value)} hint="Empty: until revoked" error={errors.expiresInDays} />
          <TextField label="Your password" type="password" autoComplete="current-password" value={password} onChange={(e) => setPassword(e.target.value)} hint="To confirm it is you" error={errors.password} />
          {/* Inputs line up under their labels whatever note a field shows; the button sits level with them. */}
          <Button type="submit" className="sm:mt-6" disabled={create.isPending}>Create token</Button>
        </form>
        {formWide && <div className="mt-3"><ErrorNote error={new Error(formWide)} /></div>}
        {secret && (
          <div role="status" className="mt-4 rounded-md bg-signal-100 p-3 text-sm text-signal-800">
            <p className="font-medium">Copy this token now: it is shown only once.</p>
            <code className="mt-1 block break-all font-mono text-harbour-900" data-testid="new-token">{secret}</code>
          </div>
        )}
      </Card>
      <Card title="Your tokens">
        {tokens.isPending && <Loading />}
        {tokens.isError && <ErrorNote error={tokens.error} />}
        {tokens.data?.tokens.length === 0 && <EmptyState title="No tokens">Create one above for a script or notebook.</EmptyState>}
        <ul className="divide-y divide-harbour-100">
          {tokens.data?.tokens.map((t) => (
            <li key={t.id} className="flex flex-wrap items-center justify-between gap-2 py-2 text-sm">
              <span>
                <span className="font-medium">{t.name}</span> <code className="text-harbour-500">{t.prefix}…</code>
                <span className="block text-harbour-500">
                  created {formatDateTime(t.createdAt)} · {t.expiresAt ? `expires ${formatDateTime(t.expiresAt)}` : 'no expiry'} · last used {formatDateTime(t.lastUsedAt)}
                </span>
              </span>
              {t.revokedAt ? <Badge>revoked</Badge> : <Button variant="danger" className="!py-1" onClick={() => revoke.mutate(t.id)}>Revoke</Button>}
            </li>
          ))}
        </ul>
      </Card>
    </div>
  );
}
