import { useMemo, useState } from 'react';
import { Link } from 'react-router-dom';
import { launcherModel, type LauncherPrediction } from '../../../../shared/physics/launcher-model.ts';
import { formatMeasurement, roundToUncertainty } from '../../../../shared/units/format-measurement.ts';
import { Button, Card, ErrorNote, Loading, SelectField, TextField } from '../../../components/ui/primitives.tsx';
import { useUpdateCampaign } from '../../campaigns/api/campaigns.ts';
import { millimetresToMetres } from '../../campaigns/utils/lab-units.ts';
import { SafetyCaution } from '../../labs/components/safety-note.tsx';
import { groupKeyOf, useCampaignTrends, type GroupBy, type ShotSelection, type TrendPoint } from '../api/campaign-trends.ts';
import { oneTwoFiveEdgesPa, parseEdgesKpa, type VacuumBinning } from '../lib/vacuum-edges.ts';
import { LauncherCautions, LauncherFitCard } from './launcher-fit-card.tsx';
import { TrendPlot, type ReferenceLine, type TrendCurve, type TrendSeries } from './trend-plot.tsx';

/** Group colours: the product's harbour and signal first, then hues far enough apart to tell at a glance. */
const GROUP_COLOURS = ['#244863', '#c47a12', '#2f7d5b', '#8e3b72', '#4d7694', '#a0522d', '#5b6b2f', '#6a4fa3'];
const MODEL_COLOUR = '#0d2133';
const FIT_COLOUR = '#c47a12';
const ZERO_LINE: ReferenceLine[] = [{ y: 0, label: '', colour: '#365d7a' }];

export interface ProjectileChoice { id: string; name: string; massKg: number; diameterM: number }

/** A speed to 0.1 m/s, rounded in decimal (234.15 → 234.2; toFixed would give 234.1 from the binary 234.1499…). */
const ms = (x: number | null) => (x == null ? '—' : `${roundToUncertainty(x, 0.1, 1).value} m/s`);

/** Reads a positive number typed in lab units; the message names the field and says what is wrong. */
function positive(text: string, name: string): { value: number | null; error?: string } {
  const t = text.trim().replace(',', '.');
  if (t === '') return { value: null, error: `Enter the ${name}.` };
  const x = Number(t);
  if (!Number.isFinite(x)) return { value: null, error: `“${text}” is not a number.` };
  if (!(x > 0)) return { value: null, error: `The ${name} must be greater than 0.` };
  return { value: x };
}

function mostCommonProjectile(points: TrendPoint[]): string | null {
  const counts = new Map<string, number>();
  for (const p of points) if (p.projectileId) counts.set(p.projectileId, (counts.get(p.projectileId) ?? 0) + 1);
  let best: string | null = null;
  for (const [id, n] of counts) if (best == null || n > counts.get(best)!) best = id;
  return best;
}

/** The middle value (the mean of the middle two for an even count) of the logged values; null when none. */
function medianOf(values: (number | null)[]): number | null {
  const xs = values.filter((x): x is number => x != null && Number.isFinite(x)).sort((a, b) => a - b);
  if (xs.length === 0) return null;
  const mid = xs.length >> 1;
  return xs.length % 2 === 1 ? xs[mid] : (xs[mid - 1] + xs[mid]) / 2;
}

/** A number for a text field without float noise (0.0405 m → "40.5" mm, not "40.50000000000001"). */
const plain = (x: number) => String(Number(x.toPrecision(10)));

function LauncherInputs({ fields, set, errors }: {
  fields: Record<'length' | 'bore' | 'mass' | 'ambientKpa' | 'ambientC', string>;
  set: (k: keyof typeof fields, v: string) => void;
  errors: Partial<Record<keyof typeof fields, string>>;
}) {
  return (
    <div className="grid grid-cols-2 gap-3 sm:grid-cols-3">
      <TextField label="Tube length (m)" inputMode="decimal" value={fields.length} onChange={(e) => set('length', e.target.value)} error={errors.length} />
      <TextField label="Bore (mm)" inputMode="decimal" value={fields.bore} onChange={(e) => set('bore', e.target.value)} error={errors.bore} />
      <TextField label="Ball mass (g)" inputMode="decimal" value={fields.mass} onChange={(e) => set('mass', e.target.value)} error={errors.mass} />
      <TextField label="Outside air (kPa)" inputMode="decimal" value={fields.ambientKpa} onChange={(e) => set('ambientKpa', e.target.value)} error={errors.ambientKpa} />
      <TextField label="Outside air (°C)" inputMode="decimal" value={fields.ambientC} onChange={(e) => set('ambientC', e.target.value)} error={errors.ambientC} />
    </div>
  );
}

/** Where one launcher input came from: the campaign, the most used ball, the shots' logs, typed here, or nowhere. */
type Source = 'campaign' | 'ball' | 'shots' | 'typed' | 'none';

/** Says where each launcher input came from, so nobody takes a default for a measured value. */
function LauncherSources({ tube, bore, mass, air, ball, airShots }: { tube: Source; bore: Source; mass: Source; air: Source; ball: string | null; airShots: number }) {
  const parts: string[] = [];
  if (tube === 'campaign' && bore === 'campaign') parts.push('Tube length and bore are the campaign’s launcher.');
  else if (tube === 'campaign') parts.push('Tube length is the campaign’s launcher.');
  else if (tube === 'none') parts.push('This campaign has no launcher logged yet.');
  if (bore === 'ball' && ball) parts.push(`Bore starts from ${ball}.`);
  if (mass === 'ball' && ball) parts.push(`Mass is that of ${ball}, the campaign’s most used projectile.`);
  if (air === 'shots') parts.push(`Outside air: the median of ${airShots} shot${airShots === 1 ? '' : 's'}’ logged conditions.`);
  else if (air === 'none') parts.push('Outside air: no shot logged it; 101.325 kPa and 20 °C assumed.');
  if ([tube, bore, mass, air].includes('typed')) parts.push('Values typed here are used only on this page.');
  return <p className="text-xs text-harbour-500" data-testid="launcher-sources">{parts.join(' ')}</p>;
}

/**
 * A campaign's speeds against tube vacuum level and shot number, grouped, with ±U bars, per-group statistics and
 * the zeroth-order launcher model (Ayars & Buchholtz 2004) with its assumptions.
 */
export function TrendsView({ labId, campaignId, projectiles, canEditCampaign }: {
  labId: string; campaignId: string; projectiles: ProjectileChoice[];
  /** May this person correct the campaign (and so keep the launcher typed here)? */
  canEditCampaign: boolean;
}) {
  const [groupBy, setGroupBy] = useState<GroupBy>('seal');
  const [shots, setShots] = useState<ShotSelection>('all');
  const [binning, setBinning] = useState<VacuumBinning>('1-2-5');
  const [edgesText, setEdgesText] = useState('1, 2, 5, 10');
  const [csvPrecision, setCsvPrecision] = useState<'rounded' | 'full'>('rounded');
  // 1–2–5 edges around the pressures already on screen (the answer before this one, while it loads).
  const [pressuresSeen, setPressuresSeen] = useState<string>('');
  const typedEdges = parseEdgesKpa(edgesText);
  const vacuumEdgesPa = binning === 'decade' ? null : binning === 'custom' ? typedEdges.edgesPa : oneTwoFiveEdgesPa(pressuresSeen.split(',').map((x) => (x ? Number(x) : null)));
  const q = useCampaignTrends(labId, campaignId, { groupBy, shots, vacuumEdgesPa });
  const points = useMemo(() => q.data?.points ?? [], [q.data]);
  const pressureKey = points.map((p) => p.tubePressurePa ?? '').join(',');
  if (pressureKey !== pressuresSeen && q.data) setPressuresSeen(pressureKey);
  const stored = q.data?.campaign ?? null;
  const saveLauncher = useUpdateCampaign(labId, campaignId);

  const defaultBall = projectiles.find((p) => p.id === mostCommonProjectile(points)) ?? null;
  // The outside air of the campaign's own shots, where they were logged; else the standard atmosphere at sea level
  // (ISO 2533: 101.325 kPa, 15 °C; 20 °C here as a laboratory's usual room temperature, common practice).
  const airPa = medianOf(points.map((p) => p.ambientPressurePa));
  const airK = medianOf(points.map((p) => p.ambientTemperatureK));
  const [edited, setEdited] = useState<Partial<Record<'length' | 'bore' | 'mass' | 'ambientKpa' | 'ambientC', string>>>({});
  const fields = {
    length: edited.length ?? (stored?.tubeLengthM != null ? plain(stored.tubeLengthM) : ''),
    bore: edited.bore ?? (stored?.boreM != null ? plain(stored.boreM * 1000) : defaultBall ? (defaultBall.diameterM * 1000).toFixed(1) : ''),
    mass: edited.mass ?? (defaultBall ? (defaultBall.massKg * 1000).toFixed(2) : ''),
    ambientKpa: edited.ambientKpa ?? (airPa != null ? plain(airPa / 1000) : '101.325'),
    ambientC: edited.ambientC ?? (airK != null ? (airK - 273.15).toFixed(1) : '20'),
  };
  const set = (k: keyof typeof fields, v: string) => setEdited((e) => ({ ...e, [k]: v }));
  const length = positive(fields.length, 'tube length');
  const bore = positive(fields.bore, 'bore');
  const mass = positive(fields.mass, 'ball mass');
  const ambient = positive(fields.ambientKpa, 'outside air pressure');
  const tempC = Number(fields.ambientC.trim().replace(',', '.'));
  const tempError = fields.ambientC.trim() === '' || !Number.isFinite(tempC) ? 'Enter the outside air temperature in °C.' : tempC <= -273.15 ? 'The temperature must be above absolute zero (−273.15 °C).' : undefined;
  const errors = { length: length.error, bore: bore.error, mass: mass.error, ambientKpa: ambient.error, ambientC: tempError };

  const model = useMemo(() => {
    if (length.value == null || bore.value == null || mass.value == null || ambient.value == null || tempError) return null;
    const base = { tubeLength: length.value, boreDiameter: bore.value / 1000, mass: mass.value / 1000, ambientPressure: ambient.value * 1000, ambientTemperature: tempC + 273.15 };
    const atVacuum: LauncherPrediction = launcherModel(base);
    const measured = points.map((p) => p.tubePressurePa).filter((x): x is number => x != null && x > 0);
    // From a decade below the best vacuum measured (or 0.1 kPa) up to just under the outside pressure.
    const lowKpa = Math.min(0.1, ...measured.map((x) => x / 1000 / 10));
    const highKpa = ambient.value * 0.995;
    const n = 160;
    const x: number[] = [];
    const y: number[] = [];
    for (let i = 0; i < n; i++) {
      const kpa = lowKpa * (highKpa / lowKpa) ** (i / (n - 1));
      x.push(kpa);
      y.push(launcherModel({ ...base, tubePressure: kpa * 1000 }).speed);
    }
    return { atVacuum, x, y };
  }, [length.value, bore.value, mass.value, ambient.value, tempC, tempError, points]);

  const groupLabels = useMemo(() => new Map((q.data?.groups ?? []).map((g, i) => [g.key, { label: g.label, colour: GROUP_COLOURS[i % GROUP_COLOURS.length] }])), [q.data]);
  const { byPressure, byNumber, leftOff } = useMemo(() => {
    const pressure = new Map<string, TrendSeries>();
    const number = new Map<string, TrendSeries>();
    let skipped = 0;
    for (const [key, g] of groupLabels) {
      pressure.set(key, { label: g.label, colour: g.colour, points: [] });
      number.set(key, { label: g.label, colour: g.colour, points: [] });
    }
    for (const p of points) {
      if (p.speed == null || p.timeBase === 'unchecked') continue;
      const key = groupKeyOf(p, groupBy);
      number.get(key)?.points.push({ x: p.number, y: p.speed, u: p.uncertainty, signedOff: p.signedOff });
      if (p.tubePressurePa != null && p.tubePressurePa > 0) pressure.get(key)?.points.push({ x: p.tubePressurePa / 1000, y: p.speed, u: p.uncertainty, signedOff: p.signedOff });
      else skipped++;
    }
    return { byPressure: [...pressure.values()], byNumber: [...number.values()], leftOff: skipped };
  }, [points, groupLabels, groupBy]);

  const references: ReferenceLine[] = useMemo(() => (model ? [
    { y: model.atVacuum.speedOfSound, label: `speed of sound ${model.atVacuum.speedOfSound.toFixed(1)} m/s`, colour: '#b42318' },
    { y: model.atVacuum.gasDynamicLimit, label: `gas-dynamic limit ${model.atVacuum.gasDynamicLimit.toFixed(0)} m/s`, colour: '#7a4a06' },
  ] : []), [model]);
  const view = q.data?.launcherFit ?? null;
  const fitted = view?.status === 'fitted' ? view : null;
  const curves = useMemo(() => {
    const list: TrendCurve[] = [];
    if (model) list.push({ label: 'zeroth-order model', colour: MODEL_COLOUR, x: model.x, y: model.y, dash: [6, 4] });
    if (fitted) list.push({ label: 'fitted model', colour: FIT_COLOUR, x: fitted.curve.map((c) => c.tubePressurePa / 1000), y: fitted.curve.map((c) => c.speed) });
    return list;
  }, [model, fitted]);
  const band = useMemo(() => (fitted ? {
    x: fitted.curve.map((c) => c.tubePressurePa / 1000),
    lo: fitted.curve.map((c) => c.speed - c.predictionExpandedUncertainty),
    hi: fitted.curve.map((c) => c.speed + c.predictionExpandedUncertainty),
    colour: 'rgba(196, 122, 18, 0.18)',
  } : null), [fitted]);
  const residuals = useMemo(() => (fitted?.fit ? [{
    label: 'residual', colour: GROUP_COLOURS[0],
    points: fitted.fit.shots.map((s) => ({ x: s.tubePressure / 1000, y: s.residual, u: s.expandedUncertainty })),
  }] : []), [fitted]);

  if (q.isPending) return <Loading what="Loading the campaign's shots" />;
  if (q.isError) return <ErrorNote error={q.error} />;
  const withSpeed = points.filter((p) => p.speed != null).length;
  const signedOffCount = points.filter((p) => p.signedOff).length;
  const exportBase = `/api/labs/${labId}/campaigns/${campaignId}/export`;
  const selection = shots === 'signed-off' ? '&shots=signed-off' : '';
  const unchecked = points.filter((p) => p.speed != null && p.timeBase === 'unchecked');

  return (
    <div className="space-y-6">
      <div className="flex flex-wrap items-end gap-4">
        <div className="w-56">
          <SelectField label="Group by" value={groupBy} onChange={(e) => setGroupBy(e.target.value as GroupBy)}>
            <option value="seal">Seal type</option>
            <option value="projectile">Projectile</option>
            <option value="vacuum">Tube vacuum (binned)</option>
            <option value="none">No grouping</option>
          </SelectField>
        </div>
        {groupBy === 'vacuum' && (
          <div className="w-48">
            <SelectField label="Pressure bins" value={binning} onChange={(e) => setBinning(e.target.value as VacuumBinning)}>
              <option value="1-2-5">1–2–5 steps (kPa)</option>
              <option value="decade">One per decade</option>
              <option value="custom">My own edges</option>
            </SelectField>
          </div>
        )}
        {groupBy === 'vacuum' && binning === 'custom' && (
          <div className="w-56">
            <TextField label="Bin edges (kPa)" value={edgesText} onChange={(e) => setEdgesText(e.target.value)} error={typedEdges.error} hint="Increasing, e.g. 1, 2, 5, 10" />
          </div>
        )}
        <div className="w-56">
          <SelectField label="Shots" value={shots} onChange={(e) => setShots(e.target.value as ShotSelection)}>
            <option value="all">All (signed off marked)</option>
            <option value="signed-off">Signed off only</option>
          </SelectField>
        </div>
        <ul className="flex flex-wrap gap-x-4 gap-y-1 pb-2 text-sm" aria-label="Groups">
          {[...groupLabels.values()].map((g) => (
            <li key={g.label} className="inline-flex items-center gap-1.5"><span className="h-3 w-3 rounded-full" style={{ background: g.colour }} aria-hidden />{g.label}</li>
          ))}
          {shots === 'all' && (
            <li className="inline-flex items-center gap-1.5" data-testid="signed-off-legend">
              <span className="h-3 w-3 rounded-full bg-harbour-700" aria-hidden />signed off
              <span className="ml-2 h-3 w-3 rounded-full border-2 border-harbour-700 bg-white" aria-hidden />not signed off
            </li>
          )}
          {model && <li className="inline-flex items-center gap-1.5"><span className="h-0 w-5 border-t-2 border-dashed" style={{ borderColor: MODEL_COLOUR }} aria-hidden />zeroth order</li>}
          {fitted && <li className="inline-flex items-center gap-1.5"><span className="h-2.5 w-5 rounded-sm" style={{ background: 'rgba(196, 122, 18, 0.3)', borderTop: `2px solid ${FIT_COLOUR}` }} aria-hidden />fitted model, k = {fitted.coverageFactor} band</li>}
        </ul>
        <div className="ml-auto flex flex-wrap items-end gap-3 pb-2 text-sm text-harbour-600">
          <div className="w-44">
            <SelectField label="CSV numbers" value={csvPrecision} onChange={(e) => setCsvPrecision(e.target.value as 'rounded' | 'full')}>
              <option value="rounded">Rounded to their U</option>
              <option value="full">Full precision</option>
            </SelectField>
          </div>
          <p className="pb-2">
          Export {shots === 'signed-off' ? 'the signed-off shots' : 'the campaign’s shots'}:{' '}
          <a className="font-medium text-harbour-800 underline-offset-2 hover:underline" href={`${exportBase}?format=csv${selection}${csvPrecision === 'full' ? '&precision=full' : ''}`} download data-testid="export-csv">CSV</a>{' · '}
          <a className="font-medium text-harbour-800 underline-offset-2 hover:underline" href={`${exportBase}?format=json${selection}`} download>JSON</a>{' · '}
          <a className="font-medium text-harbour-800 underline-offset-2 hover:underline" href={`/api/labs/${labId}/campaigns/${campaignId}/report.pdf`} download>PDF report</a>
          </p>
        </div>
      </div>
      {shots === 'signed-off' && (
        <p role="status" className="text-sm text-harbour-700" data-testid="signed-off-filter-note">
          Showing only shots whose current version a reviewer signed off ({signedOffCount}). The statistics, the fitted model and the exports cover these shots only.
        </p>
      )}
      {unchecked.length > 0 && (
        <p role="note" className="rounded-md bg-signal-100 px-3 py-2 text-sm text-signal-800" data-testid="trends-unchecked">
          Left out of the plots and statistics until an analyst confirms the read, because their result is marked “check the time base”:{' '}
          {unchecked.map((p, i) => (
            <span key={p.shotId}>{i > 0 && ', '}<Link className="font-medium underline" to={`/labs/${labId}/shots/${p.shotId}`}>shot {p.number}</Link></span>
          ))}.
        </p>
      )}
      {withSpeed === 0 && <p className="text-sm text-harbour-500">No shot of this campaign has an analysed speed yet. <Link className="underline" to={`/labs/${labId}/campaigns/${campaignId}`}>Back to the campaign</Link>.</p>}

      <div className="grid gap-6 xl:grid-cols-2">
        <Card title="Speed against tube vacuum level">
          <TrendPlot xLabel="tube pressure before the shot (kPa, log scale)" logX series={byPressure} curves={curves} band={band} references={references} testId="trend-vacuum" />
          <p className="mt-2 text-xs text-harbour-500">
            Bars are ±U (k = 2).{fitted ? ` Shaded: where one new shot’s measured speed should fall (k = ${fitted.coverageFactor}) by the model fitted to these shots.` : ''}{leftOff > 0 ? ` ${leftOff} shot${leftOff === 1 ? '' : 's'} without a logged tube pressure left off this plot.` : ''}
            {model && model.atVacuum.gasDynamicLimit > Math.max(...byPressure.flatMap((s) => s.points.map((p) => p.y + (p.u ?? 0))), model.atVacuum.speedOfSound) * 1.3 ? ` Gas-dynamic limit ${model.atVacuum.gasDynamicLimit.toFixed(0)} m/s is far above the plot.` : ''}
          </p>
          {fitted && <div className="mt-2"><LauncherCautions compact view={fitted} speeds={fitted.curve.map((c) => c.speed + c.predictionExpandedUncertainty)} /></div>}
        </Card>
        <Card title="Speed against shot number">
          <TrendPlot xLabel="shot number" integerX series={byNumber} references={references.slice(0, 1)} testId="trend-number" />
          <p className="mt-2 text-xs text-harbour-500">Bars are ±U (k = 2).</p>
        </Card>
      </div>

      {view && (
        <div className="grid items-start gap-6 xl:grid-cols-[minmax(0,1fr)_minmax(0,1fr)]">
          <LauncherFitCard view={view} />
          {fitted && (
            <Card title="Residuals: measured − fitted model">
              <TrendPlot xLabel="tube pressure before the shot (kPa, log scale)" logX series={residuals} references={ZERO_LINE} yLabel="residual (m/s)" yFloor={null} height={220} testId="trend-residuals" />
              <p className="mt-2 text-xs text-harbour-500">
                Bars are ±U (k = 2) of each shot. Points scattered on both sides of zero, mostly within their bars, mean the model describes the shots; a run of
                points on one side, or a curve, means it misses a trend.
              </p>
            </Card>
          )}
        </div>
      )}

      <div className="grid gap-6 xl:grid-cols-[minmax(0,1fr)_minmax(0,1fr)]">
        <Card title="Spread per group">
          <table className="w-full text-sm" aria-label="Statistics per group">
            <thead className="text-left text-xs font-semibold uppercase tracking-wide text-harbour-600">
              <tr><th className="py-1.5 pr-2">{groupBy === 'vacuum' ? 'Tube pressure' : 'Group'}</th><th className="px-2 text-right">n</th><th className="px-2 text-right">Mean</th><th className="px-2 text-right">SD</th><th className="px-2 text-right">SE</th><th className="pl-2 text-right">Extreme spread</th></tr>
            </thead>
            <tbody className="divide-y divide-harbour-100 whitespace-nowrap tabular-nums">
              {(q.data.groups ?? []).map((g) => (
                <tr key={g.key}>
                  <td className="whitespace-normal py-1.5 pr-2"><span className="mr-1.5 inline-block h-2.5 w-2.5 rounded-full" style={{ background: groupLabels.get(g.key)?.colour }} aria-hidden />{g.label}</td>
                  <td className="px-2 text-right">{g.count}</td>
                  <td className="px-2 text-right">{ms(g.mean)}</td>
                  <td className="px-2 text-right">{ms(g.standardDeviation)}</td>
                  <td className="px-2 text-right">{ms(g.standardError ?? null)}</td>
                  <td className="pl-2 text-right">{ms(g.extremeSpread)}</td>
                </tr>
              ))}
            </tbody>
          </table>
          <p className="mt-2 text-xs text-harbour-500">
            n counts shots with a speed; SD is the sample standard deviation (n − 1) and SE the standard error of the mean (SD/√n), shown from two shots up;
            extreme spread is fastest − slowest.{groupBy === 'vacuum' ? ' A bin holds pressures from its lower edge up to, not including, its upper edge.' : ''}
          </p>
          <p role="note" className={`mt-2 rounded-md px-3 py-2 text-xs ring-1 ${groupBy === 'vacuum' || groupBy === 'none' ? 'bg-signal-100 text-signal-800 ring-signal-400/60' : 'bg-harbour-50 text-harbour-700 ring-harbour-100'}`} data-testid="not-repeatability">
            A spread across a pressure sweep is not a repeatability figure: the speed follows the tube vacuum, so the SD of shots at different pressures
            mixes that trend with shot-to-shot scatter. For repeatability, compare shots fired at the same vacuum, seal and projectile{groupBy === 'vacuum' ? ', and keep bins narrow' : ''}.
          </p>
        </Card>

        <Card title="Launcher model">
          <div className="space-y-3">
            <SafetyCaution
              open
              lead={`This model predicts speeds near and above the speed of sound${model ? ` (up to ${model.atVacuum.speed.toFixed(0)} m/s here)` : ''}. Treat every shot as dangerous whatever the prediction says.`}
            />
            <LauncherInputs fields={fields} set={set} errors={errors} />
            <LauncherSources
              tube={edited.length != null ? 'typed' : stored?.tubeLengthM != null ? 'campaign' : 'none'}
              bore={edited.bore != null ? 'typed' : stored?.boreM != null ? 'campaign' : defaultBall ? 'ball' : 'none'}
              mass={edited.mass != null ? 'typed' : defaultBall ? 'ball' : 'none'}
              air={edited.ambientKpa != null || edited.ambientC != null ? 'typed' : airPa != null || airK != null ? 'shots' : 'none'}
              ball={defaultBall?.name ?? null}
              airShots={points.filter((p) => p.ambientPressurePa != null || p.ambientTemperatureK != null).length}
            />
            {canEditCampaign && length.value != null && bore.value != null && (length.value !== stored?.tubeLengthM || Math.abs(bore.value / 1000 - (stored?.boreM ?? 0)) > 1e-9) && (
              <div className="flex flex-wrap items-center gap-3">
                <Button
                  variant="secondary"
                  disabled={saveLauncher.isPending}
                  onClick={() => saveLauncher.mutate({ tubeLengthM: length.value, boreM: millimetresToMetres(bore.value!) }, { onSuccess: () => setEdited(({ length: _l, bore: _b, ...rest }) => rest) })}
                >
                  Keep {plain(length.value)} m × {plain(bore.value)} mm as this campaign’s launcher
                </Button>
                {saveLauncher.isError && <ErrorNote error={saveLauncher.error} />}
              </div>
            )}
            {saveLauncher.isSuccess && !saveLauncher.isPending && <p role="status" className="text-xs text-harbour-600">Saved with the campaign.</p>}
            {model && (
              <p className="text-sm text-harbour-800" data-testid="model-summary">
                v = √(2·P₀·A·L/m): <strong>{model.atVacuum.speed.toFixed(1)} m/s</strong> into a hard vacuum (P₀ = {(model.atVacuum.pressureDifference / 1000).toFixed(1)} kPa).
                Speed of sound {model.atVacuum.speedOfSound.toFixed(1)} m/s; gas-dynamic limit 2c₀/(γ−1) = {model.atVacuum.gasDynamicLimit.toFixed(0)} m/s.
                {' '}The model reaches the speed of sound at L = {model.atVacuum.soundSpeedLength.toFixed(2)} m{length.value != null && length.value > model.atVacuum.soundSpeedLength ? ', shorter than this tube: expect the measured speeds well below the curve' : ''}.
              </p>
            )}
            <div className="rounded-md bg-harbour-50 px-3 py-2 text-xs text-harbour-700 ring-1 ring-harbour-100">
              <p className="font-medium text-harbour-800">What the curve assumes</p>
              <ul className="mt-1 list-disc space-y-0.5 pl-4">
                <li>No friction and no leak past the ball.</li>
                <li>No air left ahead of the ball beyond the logged tube pressure (which only lowers P₀ = outside − tube).</li>
                <li>The seal opens instantly and the full outside pressure pushes the ball all the way.</li>
                <li>It ignores the air that must rush in behind the ball, so it over-predicts, most for long tubes; real open-tube launchers stay below the speed of sound.</li>
              </ul>
              <p className="mt-1">Zeroth-order model of Ayars &amp; Buchholtz, Am. J. Phys. 72(7) 961 (2004); speed of sound c = √(γRT), U.S. Standard Atmosphere 1976.</p>
            </div>
          </div>
        </Card>
      </div>

      <ShotsTable labId={labId} points={points} groupBy={groupBy} groupLabels={groupLabels} />
    </div>
  );
}

/** Every shot on the plots, with its group and whether a reviewer signed off its current version. */
function ShotsTable({ labId, points, groupBy, groupLabels }: {
  labId: string; points: TrendPoint[]; groupBy: GroupBy; groupLabels: Map<string, { label: string; colour: string }>;
}) {
  if (points.length === 0) return null;
  return (
    <Card title="Shots">
      <div className="overflow-x-auto">
        <table className="w-full text-sm" aria-label="Shots on these plots">
          <thead className="text-left text-xs font-semibold uppercase tracking-wide text-harbour-600">
            <tr>
              <th className="py-1.5 pr-2">Shot</th><th className="px-2 text-right">Tube pressure (kPa)</th><th className="px-2">Seal</th><th className="px-2">Group</th>
              <th className="px-2 text-right">Speed ± U (k = 2)</th><th className="pl-2">Signed off</th>
            </tr>
          </thead>
          <tbody className="divide-y divide-harbour-100 tabular-nums">
            {points.map((p) => {
              const g = groupLabels.get(groupKeyOf(p, groupBy));
              return (
                <tr key={p.shotId} data-signed-off={p.signedOff ? 'yes' : 'no'}>
                  <td className="py-1.5 pr-2"><Link className="font-medium text-harbour-800 underline-offset-2 hover:underline" to={`/labs/${labId}/shots/${p.shotId}`}>#{p.number}</Link></td>
                  <td className="px-2 text-right">{p.tubePressurePa == null ? '—' : plain(p.tubePressurePa / 1000)}</td>
                  <td className="px-2">{p.sealType || '—'}</td>
                  <td className="px-2"><span className="mr-1.5 inline-block h-2.5 w-2.5 rounded-full" style={{ background: g?.colour }} aria-hidden />{g?.label ?? '—'}</td>
                  <td className="whitespace-nowrap px-2 text-right">{p.timeBase === 'unchecked' ? 'check the time base' : formatMeasurement(p.speed, p.uncertainty, 'm/s')}</td>
                  <td className="whitespace-nowrap pl-2">{p.signedOff ? <span className="rounded-full bg-emerald-50 px-2 py-0.5 text-xs font-medium text-emerald-800 ring-1 ring-emerald-200">✓ signed off</span> : <span className="text-harbour-400">—</span>}</td>
                </tr>
              );
            })}
          </tbody>
        </table>
      </div>
    </Card>
  );
}
