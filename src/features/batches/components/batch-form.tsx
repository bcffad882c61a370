import { useState } from 'react';
import { Link, useNavigate } from 'react-router-dom';
import { analysisSettingsSchema } from '../../../../shared/contracts/analysis-settings.ts';
import { Badge, Button, Card, ErrorNote, Loading, PageHeader } from '../../../components/ui/primitives.tsx';
import { formatDateTime, formatMeasurement } from '../../../lib/format.ts';
import { shotStatus } from '../../../lib/shot-status.ts';
import { useCampaign } from '../../campaigns/api/campaigns.ts';
import { useShotList } from '../../campaigns/api/shot-list.ts';
import { useBatchList, useSaveCampaignSettings, useStartBatch } from '../api/batches.ts';
import { describeSettings, formFromSettings, settingsFromForm, type SettingsForm } from '../lib/settings-form.ts';
import { SettingsFields } from './settings-fields.tsx';

const ALL_SHOTS = { sort: 'number', direction: 'asc', status: '', q: '', limit: 200, offset: 0 } as const;

/**
 * Apply one set of settings to chosen shots of a campaign, or all of them: one new version per shot, one progress
 * display. The same settings can be kept as the campaign's defaults for shots still to come.
 */
export function BatchForm({ labId, campaignId }: { labId: string; campaignId: string }) {
  const navigate = useNavigate();
  const campaign = useCampaign(labId, campaignId);
  const shots = useShotList(labId, { campaignId, ...ALL_SHOTS });
  const batches = useBatchList(labId, campaignId);
  const start = useStartBatch(labId, campaignId);
  const save = useSaveCampaignSettings(labId, campaignId);
  const [form, setForm] = useState<SettingsForm | null>(null);
  const [chosen, setChosen] = useState<Set<string>>(new Set());
  const [all, setAll] = useState(true);

  if (campaign.isPending || shots.isPending) return <Loading what="Loading the campaign" />;
  if (campaign.isError) return <ErrorNote error={campaign.error} />;
  if (shots.isError) return <ErrorNote error={shots.error} />;
  const defaults = campaign.data.campaign.analysisSettings;
  const current = form ?? formFromSettings(defaults);
  const settings = settingsFromForm(current);
  const parsed = analysisSettingsSchema.safeParse(settings);
  const problem = parsed.success ? null : parsed.error.issues.map((i) => `${i.path.join('.') || 'settings'}: ${i.message}`).join('; ');
  const empty = Object.keys(settings).length === 0;
  const rows = shots.data.shots;
  const count = all ? shots.data.total : chosen.size;
  const toggle = (id: string) => {
    const next = new Set(chosen);
    if (next.has(id)) next.delete(id);
    else next.add(id);
    setChosen(next);
  };
  const submit = () => {
    if (!parsed.success) return;
    start.mutate(all ? { settings: parsed.data, all: true } : { settings: parsed.data, shotIds: [...chosen] }, {
      onSuccess: (view) => navigate(`/labs/${labId}/batches/${view.batch.id}`),
    });
  };

  return (
    <>
      <PageHeader
        title="Recompute several shots"
        subtitle={campaign.data.campaign.name}
        actions={<Link to={`/labs/${labId}/campaigns/${campaignId}`} className="text-sm font-medium text-harbour-600 hover:underline">Back to the campaign</Link>}
      />
      <div className="space-y-6">
        <Card title="Settings to apply">
          <div className="space-y-4">
            <p className="text-sm text-harbour-600">
              Settings left as “keep each shot’s” stay as each shot’s current version has them; each shot also keeps its own
              projectile, room conditions and tolerances. Signed-off shots get a new version that needs a new review.
            </p>
            {defaults && <p className="text-sm text-harbour-700">Campaign defaults for new shots: <span className="font-medium">{describeSettings(defaults)}</span></p>}
            <SettingsFields form={current} onChange={(patch) => setForm({ ...current, ...patch })} />
            {problem && <ErrorNote error={new Error(`Please correct the settings: ${problem}`)} />}
          </div>
        </Card>

        <Card title="Shots">
          <div className="space-y-3 text-sm">
            <label className="flex items-center gap-2 font-medium">
              <input type="checkbox" checked={all} onChange={(e) => setAll(e.target.checked)} data-testid="batch-all" />
              Every shot of the campaign ({shots.data.total})
            </label>
            {!all && (
              <ul className="grid gap-1 sm:grid-cols-2 lg:grid-cols-3" aria-label="Choose shots">
                {rows.map((s) => (
                  <li key={s.id}>
                    <label className="flex items-center gap-2 rounded px-2 py-1 hover:bg-harbour-50">
                      <input type="checkbox" checked={chosen.has(s.id)} onChange={() => toggle(s.id)} aria-label={`Shot #${s.number}`} />
                      <span className="w-10 font-medium tabular-nums">#{s.number}</span>
                      <span className="tabular-nums text-harbour-700">{s.speed ? formatMeasurement(s.speed.value, s.speed.uncertainty, 'm/s') : '—'}</span>
                      <span className="ml-auto"><Badge tone={shotStatus(s.status).tone}>{shotStatus(s.status).label}</Badge></span>
                    </label>
                  </li>
                ))}
              </ul>
            )}
          </div>
        </Card>

        <div className="flex flex-wrap items-center gap-3">
          <Button disabled={!parsed.success || empty || count === 0 || start.isPending} onClick={submit} data-testid="batch-start">
            {start.isPending ? 'Queuing…' : `Recompute ${count} shot${count === 1 ? '' : 's'}`}
          </Button>
          <Button variant="secondary" disabled={!parsed.success || save.isPending} onClick={() => parsed.success && save.mutate(empty ? null : parsed.data, { onSuccess: () => setForm(null) })}>
            {empty ? 'Clear the campaign’s defaults' : 'Keep as the campaign’s defaults for new shots'}
          </Button>
          {empty && <span className="text-sm text-harbour-500">Choose at least one setting to apply.</span>}
          {save.isSuccess && <span role="status" className="text-sm text-emerald-700">Campaign defaults saved.</span>}
        </div>
        {start.isError && <ErrorNote error={start.error} />}
        {save.isError && <ErrorNote error={save.error} />}

        <Card title="Earlier batches">
          {batches.isPending ? <Loading /> : batches.isError ? <ErrorNote error={batches.error} /> : batches.data.batches.length === 0 ? (
            <p className="text-sm text-harbour-500">No batch recompute in this campaign yet.</p>
          ) : (
            <ul className="-mx-5 -my-5 divide-y divide-harbour-100 text-sm">
              {batches.data.batches.map((b) => (
                <li key={b.id} className="flex flex-wrap items-baseline gap-x-4 px-5 py-2">
                  <Link to={`/labs/${labId}/batches/${b.id}`} className="font-medium text-harbour-800 hover:underline">{formatDateTime(b.createdAt)}</Link>
                  <span className="text-harbour-600">{b.requestedByName ?? 'someone no longer in the lab'}</span>
                  <span className="text-harbour-700">{describeSettings(b.settings)}</span>
                  <span className="ml-auto tabular-nums text-harbour-500">{b.counts.done}/{b.counts.total} done{b.counts.failed ? `, ${b.counts.failed} failed` : ''}</span>
                </li>
              ))}
            </ul>
          )}
        </Card>
      </div>
    </>
  );
}
