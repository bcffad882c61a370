import { useForm } from 'react-hook-form';
import { Link, useNavigate } from 'react-router-dom';
import { createShotBody, updateShotBody, type CreateShotBody, type UpdateShotBody } from '../../../../shared/contracts/shots.ts';
import { Button, ErrorNote, Loading, SelectField, TextField } from '../../../components/ui/primitives.tsx';
import { useGateRigs, useProjectiles, type GateRigRow, type ProjectileRow } from '../../library/api/library.ts';
import { siFormResolver } from '../../library/utils/si-form-resolver.ts';
import { useCampaign } from '../api/campaigns.ts';
import { useCreateShot } from '../api/create-shot.ts';
import { useUpdateShot } from '../api/update-shot.ts';
import type { ShotListRow } from '../api/shot-list.ts';
import { celsiusToKelvin, fromPascal, kelvinToCelsius, PRESSURE_UNITS, toPascal, type PressureUnit } from '../utils/lab-units.ts';
import { SafetyCaution } from '../../labs/components/safety-note.tsx';

/** What the person types, in lab units; converted to SI (Pa, K) only when the body is built. */
interface NewShotValues {
  tubePressure: string;
  tubePressureUnit: PressureUnit;
  sealType: string;
  projectileId: string;
  gateRigId: string;
  ambientTemperatureC: string;
  ambientPressureKpa: string;
  firedAt: string;
  notes: string;
}

/** Schema field → form field, so the server's own messages show under what the person typed. */
const FIELD_OF: Record<string, keyof NewShotValues> = {
  tubePressurePa: 'tubePressure',
  ambientTemperatureK: 'ambientTemperatureC',
  ambientPressurePa: 'ambientPressureKpa',
};

/** "2026-10-12T09:15" in the browser's time zone, for a datetime-local input. */
function localDateTime(d: Date): string {
  const pad = (n: number) => String(n).padStart(2, '0');
  return `${d.getFullYear()}-${pad(d.getMonth() + 1)}-${pad(d.getDate())}T${pad(d.getHours())}:${pad(d.getMinutes())}`;
}

/** A logged shot's conditions as the API gives them (SI), for the edit form. */
export interface LoggedShot {
  id: string;
  firedAt: string | null;
  projectileId: string | null;
  gateRigId: string | null;
  conditions: { tubePressurePa: number | null; sealType: string; ambientTemperatureK: number | null; ambientPressurePa: number | null };
  notes: string;
}

interface NewShotFormProps {
  labId: string;
  campaignId: string;
  /** The campaign's latest shot: its seal, projectile and rig are usually the next shot's too. */
  previous: ShotListRow | null;
  onCancel: () => void;
  /** Correct this logged shot instead of logging a new one. */
  editing?: LoggedShot;
  /** After a correction was saved. */
  onSaved?: () => void;
}

/**
 * Shown on both forms: which conditions this campaign's analysis and trends need, and what for (the server's
 * campaign.neededConditions, the same rule that marks a shot "conditions missing" in the campaign table).
 */
function NeededConditions({ labId, campaignId }: { labId: string; campaignId: string }) {
  const campaign = useCampaign(labId, campaignId);
  const needed = campaign.data?.campaign.neededConditions;
  if (!needed) return null;
  return (
    <p className="text-sm text-harbour-600" data-testid="needed-conditions">
      This campaign needs:{' '}
      {needed.map((c, i) => (
        <span key={c.key}>{i > 0 && '; '}<span className="font-medium text-harbour-800">{c.label}</span> ({c.why})</span>
      ))}. A shot logged without them is marked “conditions missing” until they are filled in.
    </p>
  );
}

/** The shot form: log a new shot (`editing` absent) or correct a logged one. */
export function NewShotForm(props: NewShotFormProps) {
  const projectiles = useProjectiles(props.labId);
  const rigs = useGateRigs(props.labId);
  // A select keeps its default only if the option exists when the field registers: wait for the library.
  if (projectiles.isPending || rigs.isPending) return <Loading what="Loading the library" />;
  if (projectiles.isError) return <ErrorNote error={projectiles.error} />;
  if (rigs.isError) return <ErrorNote error={rigs.error} />;
  return <NewShotFields {...props} projectiles={projectiles.data.projectiles} rigs={rigs.data.gateRigs} />;
}

/** A number for a form field without binary noise (1500 Pa → "1.5" kPa, not "1.5000000000000002"). */
const fieldNumber = (x: number | null) => (x == null ? '' : String(Number(x.toPrecision(10))));

function defaultsOf(previous: ShotListRow | null, editing: LoggedShot | undefined): NewShotValues {
  if (editing) {
    const c = editing.conditions;
    return {
      tubePressure: fieldNumber(c.tubePressurePa == null ? null : fromPascal(c.tubePressurePa, 'kPa')),
      tubePressureUnit: 'kPa',
      sealType: c.sealType,
      projectileId: editing.projectileId ?? '',
      gateRigId: editing.gateRigId ?? '',
      ambientTemperatureC: fieldNumber(c.ambientTemperatureK == null ? null : kelvinToCelsius(c.ambientTemperatureK)),
      ambientPressureKpa: fieldNumber(c.ambientPressurePa == null ? null : fromPascal(c.ambientPressurePa, 'kPa')),
      firedAt: editing.firedAt ? localDateTime(new Date(editing.firedAt)) : '',
      notes: editing.notes,
    };
  }
  return {
    tubePressure: '',
    tubePressureUnit: 'kPa',
    sealType: previous?.conditions.sealType ?? '',
    projectileId: previous?.projectileId ?? '',
    gateRigId: previous?.gateRigId ?? '',
    ambientTemperatureC: '',
    ambientPressureKpa: '',
    firedAt: localDateTime(new Date()),
    notes: '',
  };
}

function NewShotFields({ labId, campaignId, previous, onCancel, editing, onSaved, projectiles, rigs }: NewShotFormProps & { projectiles: ProjectileRow[]; rigs: GateRigRow[] }) {
  const navigate = useNavigate();
  const create = useCreateShot(labId);
  const update = useUpdateShot(labId, editing?.id ?? '');
  const mutation = editing ? update : create;
  const { register, handleSubmit, formState: { errors, isSubmitting } } = useForm<NewShotValues, unknown, CreateShotBody>({
    defaultValues: defaultsOf(previous, editing),
    resolver: siFormResolver<NewShotValues, CreateShotBody>({
      schema: editing ? updateShotBody.extend({ campaignId: createShotBody.shape.campaignId }) : createShotBody,
      fieldOf: (path) => FIELD_OF[String(path[0])] ?? String(path[0] ?? ''),
      toBody: (v, read) => ({
        campaignId,
        tubePressurePa: read.number('tubePressure', v.tubePressure, (x) => toPascal(x, v.tubePressureUnit)),
        sealType: v.sealType,
        projectileId: v.projectileId || null,
        gateRigId: v.gateRigId || null,
        ambientTemperatureK: read.number('ambientTemperatureC', v.ambientTemperatureC, celsiusToKelvin),
        ambientPressurePa: read.number('ambientPressureKpa', v.ambientPressureKpa, (x) => toPascal(x, 'kPa')),
        // datetime-local has no zone: it is the browser's local time, sent as UTC.
        firedAt: v.firedAt ? new Date(v.firedAt).toISOString() : null,
        notes: v.notes,
      }),
    }),
  });

  const submit = handleSubmit(async (body) => {
    try {
      if (editing) {
        const { campaignId: _campaign, ...changes } = body;
        await update.mutateAsync(changes satisfies UpdateShotBody);
        onSaved?.();
        return;
      }
      const { shot } = await create.mutateAsync(body);
      navigate(`/labs/${labId}/shots/${shot.id}`);
    } catch {
      // Shown below from create.error, with the API's message.
    }
  });

  const noProjectiles = projectiles.length === 0;
  const noRigs = rigs.length === 0;

  return (
    <form onSubmit={submit} noValidate aria-label={editing ? 'Shot conditions' : 'New shot'} className="space-y-5">
      <NeededConditions labId={labId} campaignId={campaignId} />
      {!editing && <SafetyCaution />}
      {!editing && previous && (
        <p className="text-sm text-harbour-500">Seal, projectile and rig are taken from shot #{previous.number}; change them if this shot differs.</p>
      )}
      <fieldset className="grid gap-4 sm:grid-cols-2 lg:grid-cols-4">
        <legend className="mb-2 text-xs font-semibold uppercase tracking-wide text-harbour-500">Launcher</legend>
        <div className="flex items-start gap-2 sm:col-span-2">
          <div className="flex-1">
            <TextField label="Tube vacuum level" inputMode="decimal" placeholder="e.g. 1.5" hint="Absolute pressure in the tube when fired" error={errors.tubePressure?.message} {...register('tubePressure')} />
          </div>
          <div className="w-28">
            <SelectField label="Unit" {...register('tubePressureUnit')}>
              {(Object.keys(PRESSURE_UNITS) as PressureUnit[]).map((u) => <option key={u} value={u}>{u}</option>)}
            </SelectField>
          </div>
        </div>
        <div className="sm:col-span-2">
          <TextField label="Seal type" placeholder="e.g. Polyester film, 50 µm" error={errors.sealType?.message} {...register('sealType')} />
        </div>
        <div className="sm:col-span-2">
          <SelectField label="Projectile" {...register('projectileId')}>
            <option value="">— not recorded —</option>
            {projectiles.map((p) => <option key={p.id} value={p.id}>{p.name}</option>)}
          </SelectField>
          {errors.projectileId && <p className="mt-1 text-xs text-red-700">{errors.projectileId.message}</p>}
        </div>
        <div className="sm:col-span-2">
          <SelectField label="Gate rig" {...register('gateRigId')}>
            <option value="">— not recorded —</option>
            {rigs.map((r) => <option key={r.id} value={r.id}>{r.name} ({r.gates.length} gate{r.gates.length === 1 ? '' : 's'})</option>)}
          </SelectField>
          {errors.gateRigId && <p className="mt-1 text-xs text-red-700">{errors.gateRigId.message}</p>}
        </div>
        {(noProjectiles || noRigs) && (
          <p className="text-sm text-harbour-600 sm:col-span-2 lg:col-span-4">
            The library has no {noProjectiles && noRigs ? 'projectiles or gate rigs' : noProjectiles ? 'projectiles' : 'gate rigs'} yet: an analyst
            or admin adds them under <Link to={`/labs/${labId}/library`} className="font-medium text-harbour-700 underline">Projectiles &amp; rigs</Link>.
            You can log the shot now and set them later.
          </p>
        )}
      </fieldset>

      <fieldset className="grid gap-4 sm:grid-cols-2 lg:grid-cols-4">
        <legend className="mb-2 text-xs font-semibold uppercase tracking-wide text-harbour-500">Room and time</legend>
        <TextField label="Ambient temperature (°C)" inputMode="decimal" placeholder="e.g. 20.5" error={errors.ambientTemperatureC?.message} {...register('ambientTemperatureC')} />
        <TextField label="Ambient pressure (kPa)" inputMode="decimal" placeholder="e.g. 100.9" error={errors.ambientPressureKpa?.message} {...register('ambientPressureKpa')} />
        <div className="sm:col-span-2">
          <TextField label="Fired at" type="datetime-local" hint="Your local time" error={errors.firedAt?.message} {...register('firedAt')} />
        </div>
      </fieldset>

      <div className="space-y-1">
        <label htmlFor="new-shot-notes" className="block text-sm font-medium text-harbour-800">Notes</label>
        <textarea
          id="new-shot-notes"
          rows={2}
          placeholder="Anything that may matter later: alignment checks, a pump hiccup, a different ball batch"
          className="block w-full rounded-md border-0 bg-white px-3 py-2 text-sm text-harbour-900 ring-1 ring-harbour-200 placeholder:text-harbour-300 focus:ring-2 focus:ring-harbour-600"
          {...register('notes')}
        />
        {errors.notes && <p className="text-xs text-red-700">{errors.notes.message}</p>}
      </div>

      {errors.root && <ErrorNote error={new Error(errors.root.message)} />}
      {mutation.isError && <ErrorNote error={mutation.error} />}
      <div className="flex flex-wrap items-center gap-2">
        {editing ? (
          <Button type="submit" disabled={isSubmitting || update.isPending}>{update.isPending ? 'Saving…' : 'Save conditions'}</Button>
        ) : (
          <Button type="submit" disabled={isSubmitting || create.isPending}>{create.isPending ? 'Logging…' : 'Log shot and add files'}</Button>
        )}
        <Button variant="ghost" onClick={onCancel}>Cancel</Button>
        <span className="text-xs text-harbour-500">{editing ? 'The change is kept in the audit trail, with the values before and after.' : "Next: drop the scope files on the shot's page."}</span>
      </div>
    </form>
  );
}
