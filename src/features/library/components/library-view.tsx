import { useState } from 'react';
import { Button, Card, EmptyState, ErrorNote, Loading } from '../../../components/ui/primitives.tsx';
import { formatGrams, formatMm } from '../../../lib/format.ts';
import { useGateRigs, useProjectiles } from '../api/library.ts';
import { GateRigForm, SENSOR_LABELS } from './gate-rig-form.tsx';
import { ProjectileForm } from './projectile-form.tsx';

/** Which entry is open in a form: a new one, or the one with this id. */
type Editing = { kind: 'projectile' | 'rig'; id: string | null } | null;

export function LibraryView({ labId, canWrite }: { labId: string; canWrite: boolean }) {
  const projectiles = useProjectiles(labId);
  const rigs = useGateRigs(labId);
  const [editing, setEditing] = useState<Editing>(null);
  const close = () => setEditing(null);
  const isOpen = (kind: 'projectile' | 'rig', id: string | null) => editing?.kind === kind && editing.id === id;
  const editButton = (kind: 'projectile' | 'rig', id: string, name: string) =>
    canWrite && !editing ? <Button variant="ghost" aria-label={`Edit ${name}`} onClick={() => setEditing({ kind, id })}>Edit</Button> : null;

  return (
    <div className="space-y-4">
      {!canWrite && (
        <p className="text-sm text-harbour-500">Analysts and lab admins keep the library up to date; ask one of them if a value is wrong.</p>
      )}
      {/* Side by side to browse; one column while a form is open, so a rig's gate rows get the room they need. */}
      <div className={`grid gap-6 ${editing ? '' : 'xl:grid-cols-2'}`}>
        <Card
          title="Projectiles"
          actions={canWrite && !editing ? <Button variant="secondary" onClick={() => setEditing({ kind: 'projectile', id: null })}>Add projectile</Button> : undefined}
        >
          {isOpen('projectile', null) && <div className="mb-4 border-b border-harbour-100 pb-4"><ProjectileForm labId={labId} onDone={close} /></div>}
          {projectiles.isPending && <Loading />}
          {projectiles.isError && <ErrorNote error={projectiles.error} />}
          {projectiles.data?.projectiles.length === 0 && !isOpen('projectile', null) && (
            <EmptyState title="No projectiles recorded">
              {canWrite ? 'Add the balls or slugs you fire, with diameter and mass and their tolerances: they feed the occlusion speed and the kinetic energy.' : 'An analyst or admin adds them here.'}
            </EmptyState>
          )}
          <ul className="divide-y divide-harbour-100">
            {projectiles.data?.projectiles.map((p) => (
              <li key={p.id} className="py-3">
                {isOpen('projectile', p.id) ? <ProjectileForm labId={labId} projectile={p} onDone={close} /> : (
                  <div className="flex items-start justify-between gap-3">
                    <div>
                      <p className="font-medium">{p.name}</p>
                      <p className="text-sm tabular-nums text-harbour-600">
                        ⌀ {formatMm(p.diameterM, 2)} ± {formatMm(p.diameterToleranceM, 2)} · {formatGrams(p.massKg)} ± {formatGrams(p.massToleranceKg)}
                        {p.material && <> · {p.material}</>}
                      </p>
                      {p.notes && <p className="text-sm text-harbour-500">{p.notes}</p>}
                    </div>
                    {editButton('projectile', p.id, p.name)}
                  </div>
                )}
              </li>
            ))}
          </ul>
        </Card>
        <Card
          title="Gate rigs"
          actions={canWrite && !editing ? <Button variant="secondary" onClick={() => setEditing({ kind: 'rig', id: null })}>Add gate rig</Button> : undefined}
        >
          {isOpen('rig', null) && <div className="mb-4 border-b border-harbour-100 pb-4"><GateRigForm labId={labId} onDone={close} /></div>}
          {rigs.isPending && <Loading />}
          {rigs.isError && <ErrorNote error={rigs.error} />}
          {rigs.data?.gateRigs.length === 0 && !isOpen('rig', null) && (
            <EmptyState title="No gate rigs recorded">
              {canWrite ? 'Add a rig with its gate positions along the flight path: the time-of-flight speed divides their spacing by the time between pulses.' : 'An analyst or admin adds them here.'}
            </EmptyState>
          )}
          <ul className="divide-y divide-harbour-100">
            {rigs.data?.gateRigs.map((r) => (
              <li key={r.id} className="py-3">
                {isOpen('rig', r.id) ? <GateRigForm labId={labId} rig={r} onDone={close} /> : (
                  <div className="flex items-start justify-between gap-3">
                    <div>
                      <p className="font-medium">{r.name}</p>
                      <p className="text-sm text-harbour-600">
                        {SENSOR_LABELS[r.sensorType as keyof typeof SENSOR_LABELS] ?? r.sensorType} · beam {formatMm(r.beamWidthM, 1)} wide
                      </p>
                      <ol className="mt-2 flex flex-wrap gap-2 text-xs tabular-nums">
                        {r.gates.map((g) => (
                          <li key={g.label} className="rounded bg-harbour-100 px-2 py-1 text-harbour-800">
                            Gate {g.label}: {formatMm(g.position_m, 1)} ± {formatMm(g.position_uncertainty_m, 1)}
                          </li>
                        ))}
                      </ol>
                      {r.notes && <p className="mt-1 text-sm text-harbour-500">{r.notes}</p>}
                    </div>
                    {editButton('rig', r.id, r.name)}
                  </div>
                )}
              </li>
            ))}
          </ul>
        </Card>
      </div>
    </div>
  );
}
