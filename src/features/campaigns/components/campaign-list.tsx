import { SafetyCaution } from '../../labs/components/safety-note.tsx';
import { useState, type FormEvent } from 'react';
import { Link } from 'react-router-dom';
import { campaignBody } from '../../../../shared/contracts/auth.ts';
import { Button, Card, EmptyState, ErrorNote, Loading, TextField } from '../../../components/ui/primitives.tsx';
import { fieldErrorsOf, fieldErrorsOfRequest, type FieldErrors } from '../../../lib/field-errors.ts';
import { formatDate } from '../../../lib/format.ts';
import { useCampaigns, useCreateCampaign } from '../api/campaigns.ts';
import { millimetresToMetres, parseLabNumber } from '../utils/lab-units.ts';

const mm = (x: number | null) => (x == null ? null : millimetresToMetres(x));

function NewCampaignForm({ labId, onDone }: { labId: string; onDone: () => void }) {
  const create = useCreateCampaign(labId);
  const [name, setName] = useState('');
  const [description, setDescription] = useState('');
  const [startedOn, setStartedOn] = useState('');
  const [tubeLength, setTubeLength] = useState('');
  const [boreMm, setBoreMm] = useState('');
  const [problems, setProblems] = useState<FieldErrors>({});
  const submit = (e: FormEvent) => {
    e.preventDefault();
    const notNumbers: FieldErrors = {};
    for (const [key, text] of [['tubeLengthM', tubeLength], ['boreM', boreMm]]) {
      if (Number.isNaN(parseLabNumber(text))) notNumbers[key] = `“${text}” is not a number.`;
    }
    if (Object.keys(notNumbers).length > 0) return setProblems(notNumbers);
    const parsed = campaignBody.safeParse({
      name, description, startedOn: startedOn || null, tubeLengthM: parseLabNumber(tubeLength), boreM: mm(parseLabNumber(boreMm)),
    });
    if (!parsed.success) return setProblems(fieldErrorsOf(parsed.error.issues));
    setProblems({});
    create.mutate(parsed.data, { onSuccess: onDone });
  };
  // Each message beside its field, whether the browser or the server found it.
  const errors = { ...problems, ...fieldErrorsOfRequest(create.error) };
  const formWide = errors[''] ?? (create.isError && Object.keys(fieldErrorsOfRequest(create.error)).length === 0 ? create.error.message : undefined);
  return (
    <form onSubmit={submit} className="grid gap-4 sm:grid-cols-[2fr_1fr]" noValidate aria-label="New campaign">
      <SafetyCaution className="sm:col-span-2" />
      <TextField label="Name" value={name} onChange={(e) => setName(e.target.value)} placeholder="e.g. Burst disc trial, December" error={errors.name} />
      <TextField label="Started on" type="date" value={startedOn} onChange={(e) => setStartedOn(e.target.value)} error={errors.startedOn} />
      <div className="sm:col-span-2">
        <TextField label="Purpose" value={description} onChange={(e) => setDescription(e.target.value)} placeholder="What the campaign is meant to find out" error={errors.description} />
      </div>
      <div className="grid grid-cols-2 gap-4 sm:col-span-2 sm:grid-cols-4">
        <TextField label="Tube length (m)" inputMode="decimal" value={tubeLength} onChange={(e) => setTubeLength(e.target.value)} hint="Optional" error={errors.tubeLengthM} />
        <TextField label="Bore (mm)" inputMode="decimal" value={boreMm} onChange={(e) => setBoreMm(e.target.value)} hint="Optional" error={errors.boreM} />
      </div>
      {formWide && <div className="sm:col-span-2"><ErrorNote error={new Error(formWide)} /></div>}
      <div className="flex gap-2 sm:col-span-2">
        <Button type="submit" disabled={create.isPending}>Create campaign</Button>
        <Button variant="ghost" onClick={onDone}>Cancel</Button>
      </div>
    </form>
  );
}

export function CampaignList({ labId, canCreate }: { labId: string; canCreate: boolean }) {
  const campaigns = useCampaigns(labId);
  const [creating, setCreating] = useState(false);
  return (
    <Card
      title="Campaigns"
      actions={canCreate && !creating ? <Button variant="secondary" onClick={() => setCreating(true)}>New campaign</Button> : undefined}
    >
      {creating && <div className="mb-6 border-b border-harbour-100 pb-6"><NewCampaignForm labId={labId} onDone={() => setCreating(false)} /></div>}
      {campaigns.isPending && <Loading what="Loading campaigns" />}
      {campaigns.isError && <ErrorNote error={campaigns.error} />}
      {campaigns.data && campaigns.data.campaigns.length === 0 && (
        <EmptyState title="No campaigns yet">
          {canCreate ? 'Start one with “New campaign”; shots are filed under a campaign.' : 'An experimenter or admin starts campaigns; they will appear here.'}
        </EmptyState>
      )}
      {campaigns.data && campaigns.data.campaigns.length > 0 && (
        <ul className="divide-y divide-harbour-100">
          {campaigns.data.campaigns.map((c) => (
            <li key={c.id}>
              <Link to={c.id} className="flex flex-wrap items-baseline justify-between gap-2 py-3 hover:bg-harbour-50">
                <span>
                  <span className="font-medium text-harbour-900">{c.name}</span>
                  {c.description && <span className="block text-sm text-harbour-500">{c.description}</span>}
                </span>
                <span className="text-sm tabular-nums text-harbour-500">
                  {c.shotCount} shot{c.shotCount === 1 ? '' : 's'} · since {formatDate(c.startedOn)}
                  {c.tubeLengthM != null && ` · tube ${c.tubeLengthM} m${c.boreM != null ? `, bore ${(c.boreM * 1000).toFixed(1)} mm` : ''}`}
                </span>
              </Link>
            </li>
          ))}
        </ul>
      )}
    </Card>
  );
}
