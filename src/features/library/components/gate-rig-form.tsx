import { useFieldArray, useForm } from 'react-hook-form';
import { gateRigBody, SENSOR_TYPES, type GateRigBody, type SensorType } from '../../../../shared/contracts/library.ts';
import { Button, ErrorNote, SelectField, TextField } from '../../../components/ui/primitives.tsx';
import { useSaveGateRig } from '../api/library-mutations.ts';
import type { GateRigRow } from '../api/library.ts';
import { fromSi } from '../utils/lab-number-text.ts';
import { siFormResolver } from '../utils/si-form-resolver.ts';

export const SENSOR_LABELS: Record<SensorType, string> = {
  photodiode: 'Photodiode (~1 µs)',
  phototransistor: 'Phototransistor (~10 µs)',
  photodarlington: 'Photodarlington (~100 µs)',
  other: 'Other',
};

/** The rig as typed: millimetres along the flight path (SI only in the request). */
interface GateValues { label: string; positionMm: string; uncertaintyMm: string }
interface GateRigValues {
  name: string;
  sensorType: SensorType;
  beamWidthMm: string;
  notes: string;
  gates: GateValues[];
}

const mmToM = (mm: number) => mm / 1000;
const GATE_FIELD_OF: Record<string, keyof GateValues> = { label: 'label', position_m: 'positionMm', position_uncertainty_m: 'uncertaintyMm' };

/** Schema path → form path: `gates.1.position_m` → `gates.1.positionMm`; a whole-list issue goes on the list. */
function fieldOf(path: PropertyKey[]): string {
  const [head, index, leaf] = path.map(String);
  if (head === 'gates') return index === undefined ? 'gates.root' : leaf ? `gates.${index}.${GATE_FIELD_OF[leaf] ?? leaf}` : `gates.${index}.label`;
  if (head === 'beamWidthM') return 'beamWidthMm';
  return head ?? '';
}

/** The next label after the last one: A → B, Gate 3 → Gate 4, otherwise the gate's number. */
function nextLabel(gates: GateValues[]): string {
  const last = gates.at(-1)?.label.trim() ?? '';
  if (last === '') return gates.length === 0 ? 'A' : String(gates.length + 1);
  if (/^[A-Y]$/.test(last)) return String.fromCharCode(last.charCodeAt(0) + 1);
  const m = /^(.*?)(\d+)$/.exec(last);
  return m ? `${m[1]}${Number(m[2]) + 1}` : String(gates.length + 1);
}

export function GateRigForm({ labId, rig, onDone }: { labId: string; rig?: GateRigRow; onDone: () => void }) {
  const save = useSaveGateRig(labId);
  const { register, control, handleSubmit, getValues, formState: { errors } } = useForm<GateRigValues, unknown, GateRigBody>({
    defaultValues: {
      name: rig?.name ?? '',
      sensorType: (rig?.sensorType as SensorType | undefined) ?? 'phototransistor',
      beamWidthMm: rig ? fromSi(rig.beamWidthM, 1000) : '1',
      notes: rig?.notes ?? '',
      gates: rig
        ? rig.gates.map((g) => ({ label: g.label, positionMm: fromSi(g.position_m, 1000), uncertaintyMm: fromSi(g.position_uncertainty_m, 1000) }))
        : [{ label: 'A', positionMm: '0', uncertaintyMm: '0.5' }, { label: 'B', positionMm: '', uncertaintyMm: '0.5' }],
    },
    resolver: siFormResolver<GateRigValues, GateRigBody>({
      schema: gateRigBody,
      fieldOf,
      toBody: (v, read) => ({
        name: v.name,
        sensorType: v.sensorType,
        beamWidthM: read.number('beamWidthMm', v.beamWidthMm, mmToM) ?? 0,
        notes: v.notes,
        gates: v.gates.map((g, i) => ({
          label: g.label,
          position_m: read.number(`gates.${i}.positionMm`, g.positionMm, mmToM),
          position_uncertainty_m: read.number(`gates.${i}.uncertaintyMm`, g.uncertaintyMm, mmToM) ?? 0,
        })),
      }),
    }),
  });
  const gates = useFieldArray({ control, name: 'gates' });

  const submit = (asNew: boolean) =>
    handleSubmit(async (body) => {
      try {
        await save.mutateAsync({ id: asNew ? undefined : rig?.id, body });
        onDone();
      } catch {
        // Shown below with the API's message (a taken name, gates locked by a signed-off shot).
      }
    });

  const listError = (errors.gates as { root?: { message?: string } } | undefined)?.root?.message;

  return (
    <form onSubmit={submit(false)} noValidate aria-label={rig ? `Edit ${rig.name}` : 'New gate rig'} className="space-y-4">
      <div className="grid gap-4 sm:grid-cols-2">
        <TextField label="Name" error={errors.name?.message} placeholder="e.g. Exit rig, three gates" {...register('name')} />
        <SelectField label="Sensor type" {...register('sensorType')}>
          {SENSOR_TYPES.map((t) => <option key={t} value={t}>{SENSOR_LABELS[t]}</option>)}
        </SelectField>
        <TextField label="Beam width (mm)" inputMode="decimal" hint="Along the flight path" error={errors.beamWidthMm?.message} {...register('beamWidthMm')} />
        <TextField label="Notes" error={errors.notes?.message} placeholder="How the positions were measured" {...register('notes')} />
      </div>

      <fieldset>
        <legend className="text-sm font-medium text-harbour-800">Gates, in flight order</legend>
        <p className="text-xs text-harbour-500">Positions along the path from the rig's origin; each must lie further along than the one before.</p>
        <ol className="mt-2 space-y-2">
          {gates.fields.map((field, i) => (
            <li key={field.id} className="grid grid-cols-[1.5rem_minmax(4rem,0.6fr)_1fr_1fr_auto] items-start gap-2 rounded-md bg-harbour-50 p-2" aria-label={`Gate ${i + 1}`}>
              <span className="pt-8 text-right text-sm tabular-nums text-harbour-500">{i + 1}.</span>
              <TextField label="Label" error={errors.gates?.[i]?.label?.message} {...register(`gates.${i}.label`)} />
              <TextField label="Position (mm)" inputMode="decimal" error={errors.gates?.[i]?.positionMm?.message} {...register(`gates.${i}.positionMm`)} />
              <TextField label="Uncertainty (± mm)" inputMode="decimal" error={errors.gates?.[i]?.uncertaintyMm?.message} {...register(`gates.${i}.uncertaintyMm`)} />
              <span className="flex gap-1 pt-6">
                <Button variant="ghost" className="px-2" aria-label={`Move gate ${i + 1} up`} disabled={i === 0} onClick={() => gates.move(i, i - 1)}>↑</Button>
                <Button variant="ghost" className="px-2" aria-label={`Move gate ${i + 1} down`} disabled={i === gates.fields.length - 1} onClick={() => gates.move(i, i + 1)}>↓</Button>
                <Button variant="ghost" className="px-2 text-red-700" aria-label={`Remove gate ${i + 1}`} disabled={gates.fields.length === 1} onClick={() => gates.remove(i)}>✕</Button>
              </span>
            </li>
          ))}
        </ol>
        {listError && <p className="mt-1 text-xs text-red-700">{listError}</p>}
        <Button variant="secondary" className="mt-2" onClick={() => {
          const current = getValues('gates');
          gates.append({ label: nextLabel(current), positionMm: '', uncertaintyMm: current.at(-1)?.uncertaintyMm ?? '0.5' });
        }}>Add gate</Button>
      </fieldset>

      {save.isError && <ErrorNote error={save.error} />}
      <div className="flex flex-wrap gap-2">
        <Button type="submit" disabled={save.isPending}>{rig ? 'Save changes' : 'Add gate rig'}</Button>
        {rig && <Button variant="secondary" disabled={save.isPending} onClick={submit(true)}>Save as a new entry</Button>}
        <Button variant="ghost" onClick={onDone}>Cancel</Button>
      </div>
    </form>
  );
}
