import { useState, type FormEvent } from 'react';
import { invitationBody } from '../../../../shared/contracts/auth.ts';
import { ROLE_LABELS, ROLES, type Role } from '../../../../shared/contracts/roles.ts';
import { Badge, Button, Card, EmptyState, ErrorNote, Loading, SelectField, TextField } from '../../../components/ui/primitives.tsx';
import { fieldErrorsOf, fieldErrorsOfRequest, type FieldErrors } from '../../../lib/field-errors.ts';
import { formatDate } from '../../../lib/format.ts';
import { useChangeRole, useSetMemberActive, useUnlockSignIn, useMembers, type Member } from '../../labs/api/members.ts';
import { useInvitations, useInvite, useWithdrawInvitation } from '../api/invitations.ts';
import { StorageCard } from './storage-card.tsx';

function InviteForm({ labId }: { labId: string }) {
  const invite = useInvite(labId);
  const [email, setEmail] = useState('');
  const [role, setRole] = useState<Role>('experimenter');
  const [problems, setProblems] = useState<FieldErrors>({});
  const [sentTo, setSentTo] = useState<string>();
  const submit = (e: FormEvent) => {
    e.preventDefault();
    const parsed = invitationBody.safeParse({ email, role });
    if (!parsed.success) return setProblems(fieldErrorsOf(parsed.error.issues));
    setProblems({});
    invite.mutate(parsed.data, { onSuccess: () => { setSentTo(parsed.data.email); setEmail(''); } });
  };
  // Each message beside its field, whether the browser or the server found it (an e-mail already invited, say).
  const fromServer = fieldErrorsOfRequest(invite.error);
  const errors: FieldErrors = { ...problems, ...fromServer };
  const formWide = errors[''] ?? (invite.isError && Object.keys(fromServer).length === 0 ? invite.error.message : undefined);
  return (
    <form onSubmit={submit} className="grid items-start gap-3 sm:grid-cols-[2fr_1fr_auto]" noValidate aria-label="Invite someone">
      <TextField label="E-mail" type="email" value={email} onChange={(e) => setEmail(e.target.value)} placeholder="name@lab.example" error={errors.email} />
      <SelectField label="Role" value={role} onChange={(e) => setRole(e.target.value as Role)}>
        {ROLES.map((r) => <option key={r} value={r}>{ROLE_LABELS[r]}</option>)}
      </SelectField>
      <Button type="submit" className="sm:mt-6" disabled={invite.isPending}>{invite.isPending ? 'Sending…' : 'Send invitation'}</Button>
      {formWide && <div className="sm:col-span-3"><ErrorNote error={new Error(formWide)} /></div>}
      {sentTo && !invite.isError && <p role="status" className="text-sm text-emerald-700 sm:col-span-3">Invitation sent to {sentTo}.</p>}
    </form>
  );
}

function Invitations({ labId }: { labId: string }) {
  const invitations = useInvitations(labId, true);
  const withdraw = useWithdrawInvitation(labId);
  if (invitations.isPending) return <Loading />;
  if (invitations.isError) return <ErrorNote error={invitations.error} />;
  const rows = invitations.data.invitations;
  if (rows.length === 0) return <p className="text-sm text-harbour-500">No invitations sent yet.</p>;
  const tone = { pending: 'signal', accepted: 'good', revoked: 'neutral', expired: 'neutral' } as const;
  return (
    <ul className="divide-y divide-harbour-100">
      {rows.map((inv) => (
        <li key={inv.id} className="flex flex-wrap items-center justify-between gap-2 py-2 text-sm">
          <span>{inv.email} <span className="text-harbour-500">as {ROLE_LABELS[inv.role].toLowerCase()}, sent {formatDate(inv.createdAt)}</span></span>
          <span className="flex items-center gap-2">
            <Badge tone={tone[inv.state]}>{inv.state}</Badge>
            {inv.state === 'pending' && <Button variant="ghost" className="!py-1" onClick={() => withdraw.mutate(inv.id)}>Withdraw</Button>}
          </span>
        </li>
      ))}
    </ul>
  );
}

/** Asks before disabling: says what happens, and that it can be undone. */
function DisableConfirm({ member, pending, onConfirm, onCancel }: { member: Member; pending: boolean; onConfirm: () => void; onCancel: () => void }) {
  return (
    <div role="alertdialog" aria-label={`Disable ${member.name}`} className="mt-2 w-full rounded-md bg-red-50 p-3 text-sm text-red-900 ring-1 ring-red-200">
      <p className="font-medium">Disable {member.name}'s account?</p>
      <p className="mt-1">
        They are signed out everywhere at once, cannot sign in, and their API tokens stop working. Their shots, analyses,
        reviews and audit trail stay. You can enable the account again later.
      </p>
      <div className="mt-3 flex flex-wrap gap-2">
        <Button variant="danger" className="!py-1 text-sm" disabled={pending} onClick={onConfirm}>{pending ? 'Disabling…' : `Disable ${member.name}`}</Button>
        <Button variant="ghost" className="!py-1 text-sm" onClick={onCancel}>Cancel</Button>
      </div>
    </div>
  );
}

export function PeopleView({ labId, isAdmin, myUserId }: { labId: string; isAdmin: boolean; myUserId: string }) {
  const members = useMembers(labId);
  const changeRole = useChangeRole(labId);
  const unlock = useUnlockSignIn(labId);
  const setActive = useSetMemberActive(labId);
  const [confirming, setConfirming] = useState<string>();
  const nameOf = (userId: string | undefined) => members.data?.members.find((m) => m.userId === userId)?.name ?? 'The member';
  return (
    <div className="space-y-6">
      <Card title="Members">
        {members.isPending && <Loading />}
        {members.isError && <ErrorNote error={members.error} />}
        {members.data?.members.length === 0 && <EmptyState title="No members" />}
        {changeRole.isError && <div className="mb-3"><ErrorNote error={changeRole.error} /></div>}
        {unlock.isError && <div className="mb-3"><ErrorNote error={unlock.error} /></div>}
        {setActive.isError && <div className="mb-3"><ErrorNote error={setActive.error} /></div>}
        {setActive.isSuccess && (
          <p role="status" className="mb-3 text-sm text-emerald-700">
            {setActive.data.active
              ? `${nameOf(setActive.data.userId)} can sign in again (with a new sign-in; their API tokens work again).`
              : `${nameOf(setActive.data.userId)} is disabled and signed out everywhere.`}
          </p>
        )}
        {unlock.isSuccess && (
          <p role="status" className="mb-3 text-sm text-emerald-700">
            {members.data?.members.find((m) => m.userId === unlock.variables)?.name ?? 'The member'} can sign in again at once.
          </p>
        )}
        <ul className="divide-y divide-harbour-100">
          {members.data?.members.map((m) => (
            <li key={m.userId} className="flex flex-wrap items-center justify-between gap-3 py-3">
              <span className={m.active ? '' : 'text-harbour-500'}>
                <span className="font-medium">{m.name}</span>{m.userId === myUserId && <span className="text-harbour-500"> (you)</span>}
                {!m.active && <span className="ml-2"><Badge tone="neutral">disabled</Badge></span>}
                <span className="block text-sm text-harbour-500">{m.email}</span>
              </span>
              {isAdmin ? (
                <span className="flex flex-wrap items-center gap-2">
                  {m.userId !== myUserId && m.active && (
                    <Button variant="ghost" className="!py-1 text-sm" title="Clear failed sign-ins, from every address" onClick={() => unlock.mutate(m.userId)}>
                      Unlock sign-in
                    </Button>
                  )}
                  {m.userId !== myUserId && (m.active ? (
                    <Button variant="ghost" className="!py-1 text-sm text-red-700" onClick={() => { setActive.reset(); setConfirming(m.userId); }}>
                      Disable…
                    </Button>
                  ) : (
                    <Button variant="ghost" className="!py-1 text-sm" onClick={() => setActive.mutate({ userId: m.userId, active: true })}>
                      Enable
                    </Button>
                  ))}
                <select
                  aria-label={`Role of ${m.name}`}
                  value={m.role}
                  onChange={(e) => changeRole.mutate({ userId: m.userId, role: e.target.value as Role })}
                  className="rounded-md border-0 bg-white py-1.5 pl-2 pr-8 text-sm ring-1 ring-harbour-200"
                >
                  {ROLES.map((r) => <option key={r} value={r}>{ROLE_LABELS[r]}</option>)}
                </select>
                </span>
              ) : (
                <Badge>{ROLE_LABELS[m.role]}</Badge>
              )}
              {confirming === m.userId && m.active && (
                <DisableConfirm
                  member={m}
                  pending={setActive.isPending}
                  onCancel={() => setConfirming(undefined)}
                  onConfirm={() => setActive.mutate({ userId: m.userId, active: false }, { onSettled: () => setConfirming(undefined) })}
                />
              )}
            </li>
          ))}
        </ul>
      </Card>
      {isAdmin && (
        <Card title="Invite someone">
          <InviteForm labId={labId} />
          <h3 className="mb-2 mt-6 text-xs font-semibold uppercase tracking-wide text-harbour-500">Sent invitations</h3>
          <Invitations labId={labId} />
        </Card>
      )}
      {isAdmin && <StorageCard labId={labId} />}
    </div>
  );
}
