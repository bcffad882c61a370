import { Card, EmptyState, ErrorNote, Loading } from '../../../components/ui/primitives.tsx';
import { formatGrams, formatMm } from '../../../lib/format.ts';
import { useGateRigs, useProjectiles } from '../api/library.ts';

const SENSOR_LABELS: Record<string, string> = {
  photodiode: 'Photodiode (~1 µs)',
  phototransistor: 'Phototransistor (~10 µs)',
  photodarlington: 'Photodarlington (~100 µs)',
  other: 'Other',
};

export function LibraryView({ labId }: { labId: string }) {
  const projectiles = useProjectiles(labId);
  const rigs = useGateRigs(labId);
  return (
    <div className="grid gap-6 xl:grid-cols-2">
      <Card title="Projectiles">
        {projectiles.isPending && <Loading />}
        {projectiles.isError && <ErrorNote error={projectiles.error} />}
        {projectiles.data?.projectiles.length === 0 && <EmptyState title="No projectiles recorded" />}
        <ul className="divide-y divide-harbour-100">
          {projectiles.data?.projectiles.map((p) => (
            <li key={p.id} className="py-3">
              <p className="font-medium">{p.name}</p>
              <p className="text-sm tabular-nums text-harbour-600">
                ⌀ {formatMm(p.diameterM, 2)} ± {formatMm(p.diameterToleranceM, 2)} · {formatGrams(p.massKg)} ± {formatGrams(p.massToleranceKg)}
                {p.material && <> · {p.material}</>}
              </p>
              {p.notes && <p className="text-sm text-harbour-500">{p.notes}</p>}
            </li>
          ))}
        </ul>
      </Card>
      <Card title="Gate rigs">
        {rigs.isPending && <Loading />}
        {rigs.isError && <ErrorNote error={rigs.error} />}
        {rigs.data?.gateRigs.length === 0 && <EmptyState title="No gate rigs recorded" />}
        <ul className="divide-y divide-harbour-100">
          {rigs.data?.gateRigs.map((r) => (
            <li key={r.id} className="py-3">
              <p className="font-medium">{r.name}</p>
              <p className="text-sm text-harbour-600">{SENSOR_LABELS[r.sensorType] ?? r.sensorType} · beam {formatMm(r.beamWidthM, 1)} wide</p>
              <ol className="mt-2 flex flex-wrap gap-2 text-xs tabular-nums">
                {r.gates.map((g) => (
                  <li key={g.label} className="rounded bg-harbour-100 px-2 py-1 text-harbour-800">
                    Gate {g.label}: {formatMm(g.position_m, 1)} ± {formatMm(g.position_uncertainty_m, 1)}
                  </li>
                ))}
              </ol>
              {r.notes && <p className="mt-1 text-sm text-harbour-500">{r.notes}</p>}
            </li>
          ))}
        </ul>
      </Card>
    </div>
  );
}
