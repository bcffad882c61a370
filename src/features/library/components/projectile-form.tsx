import { useForm } from 'react-hook-form';
import { projectileBody, type ProjectileBody } from '../../../../shared/contracts/library.ts';
import { Button, ErrorNote, TextField } from '../../../components/ui/primitives.tsx';
import { useSaveProjectile } from '../api/library-mutations.ts';
import type { ProjectileRow } from '../api/library.ts';
import { siFormResolver } from '../utils/si-form-resolver.ts';
import { fromSi } from '../utils/lab-number-text.ts';

/** The projectile as typed: millimetres and grams (SI only in the request). */
interface ProjectileValues {
  name: string;
  material: string;
  diameterMm: string;
  diameterToleranceMm: string;
  massG: string;
  massToleranceG: string;
  notes: string;
}

const FIELD_OF: Record<string, keyof ProjectileValues> = {
  diameterM: 'diameterMm', diameterToleranceM: 'diameterToleranceMm', massKg: 'massG', massToleranceKg: 'massToleranceG',
};

const mmToM = (mm: number) => mm / 1000;
const gToKg = (g: number) => g / 1000;

export function ProjectileForm({ labId, projectile, onDone }: { labId: string; projectile?: ProjectileRow; onDone: () => void }) {
  const save = useSaveProjectile(labId);
  const { register, handleSubmit, formState: { errors } } = useForm<ProjectileValues, unknown, ProjectileBody>({
    defaultValues: {
      name: projectile?.name ?? '',
      material: projectile?.material ?? '',
      diameterMm: fromSi(projectile?.diameterM, 1000),
      diameterToleranceMm: fromSi(projectile?.diameterToleranceM, 1000) || (projectile ? '' : '0'),
      massG: fromSi(projectile?.massKg, 1000),
      massToleranceG: fromSi(projectile?.massToleranceKg, 1000) || (projectile ? '' : '0'),
      notes: projectile?.notes ?? '',
    },
    resolver: siFormResolver<ProjectileValues, ProjectileBody>({
      schema: projectileBody,
      fieldOf: (path) => FIELD_OF[String(path[0])] ?? String(path[0] ?? ''),
      toBody: (v, read) => ({
        name: v.name,
        material: v.material,
        diameterM: read.number('diameterMm', v.diameterMm, mmToM),
        diameterToleranceM: read.number('diameterToleranceMm', v.diameterToleranceMm, mmToM) ?? 0,
        massKg: read.number('massG', v.massG, gToKg),
        massToleranceKg: read.number('massToleranceG', v.massToleranceG, gToKg) ?? 0,
        notes: v.notes,
      }),
    }),
  });

  const submit = (asNew: boolean) =>
    handleSubmit(async (body) => {
      try {
        await save.mutateAsync({ id: asNew ? undefined : projectile?.id, body });
        onDone();
      } catch {
        // Shown below with the API's message (a taken name, values locked by a signed-off shot).
      }
    });

  return (
    <form onSubmit={submit(false)} noValidate aria-label={projectile ? `Edit ${projectile.name}` : 'New projectile'} className="grid gap-4 sm:grid-cols-2">
      <TextField label="Name" error={errors.name?.message} placeholder="e.g. Table-tennis ball, 40 mm" {...register('name')} />
      <TextField label="Material" error={errors.material?.message} placeholder="e.g. plastic" {...register('material')} />
      <TextField label="Diameter (mm)" inputMode="decimal" error={errors.diameterMm?.message} {...register('diameterMm')} />
      <TextField label="Diameter tolerance (± mm)" inputMode="decimal" hint="Half-width of the spread" error={errors.diameterToleranceMm?.message} {...register('diameterToleranceMm')} />
      <TextField label="Mass (g)" inputMode="decimal" error={errors.massG?.message} {...register('massG')} />
      <TextField label="Mass tolerance (± g)" inputMode="decimal" error={errors.massToleranceG?.message} {...register('massToleranceG')} />
      <div className="sm:col-span-2">
        <TextField label="Notes" error={errors.notes?.message} placeholder="How it was measured, batch, supplier" {...register('notes')} />
      </div>
      {save.isError && <div className="sm:col-span-2"><ErrorNote error={save.error} /></div>}
      <div className="flex flex-wrap gap-2 sm:col-span-2">
        <Button type="submit" disabled={save.isPending}>{projectile ? 'Save changes' : 'Add projectile'}</Button>
        {projectile && <Button variant="secondary" disabled={save.isPending} onClick={submit(true)}>Save as a new entry</Button>}
        <Button variant="ghost" onClick={onDone}>Cancel</Button>
      </div>
    </form>
  );
}
