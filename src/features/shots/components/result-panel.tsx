import type { ReactNode } from 'react';
import type { ShotAnalysis } from '../../../../shared/analysis/types.ts';
import { Badge, EmptyState } from '../../../components/ui/primitives.tsx';
import { formatMeasurement } from '../../../lib/format.ts';
import type { TimeBaseConfirmation } from '../api/types.ts';
import { AssumptionList, TimeBaseFlag } from './time-base-check.tsx';

const BASIS_LABELS = {
  fit: 'constant-deceleration fit over all gates, speed at the first gate',
  pair: 'between two gates, mean speed over the span',
  occlusion: 'one gate’s blocking time and the projectile’s length',
} as const;

function Row({ label, value, note }: { label: string; value: string; note?: string }) {
  return (
    <div className="flex items-baseline justify-between gap-4 py-1.5">
      <dt className="text-sm text-harbour-600">{label}</dt>
      <dd className="text-right text-sm font-medium tabular-nums text-harbour-900">
        {value}
        {note && <span className="block text-xs font-normal text-harbour-500">{note}</span>}
      </dd>
    </div>
  );
}

export interface ResultPanelProps {
  results: ShotAnalysis | null;
  preview: boolean;
  /** The stored version's "I checked the time base" (none for a preview). */
  timeBaseConfirmation?: TimeBaseConfirmation | null;
  /** Shown under the time-base flag while it is unconfirmed (the analyst's confirmation form). */
  confirmTimeBase?: ReactNode;
}

/**
 * The headline result: speed ± U (k = 2) with its method, derived quantities, cross-checks, the "Check before
 * trusting" box (the time-base flag and the warnings) and the assumptions. A result marked "check the time base"
 * and not confirmed shows its speed greyed, with the reason, instead of as a measurement.
 */
export function ResultPanel({ results, preview, timeBaseConfirmation = null, confirmTimeBase }: ResultPanelProps) {
  if (!results) return <EmptyState title="No result yet">The speed appears here once the files have been read and analysed.</EmptyState>;
  const { speed, derived, fit } = results;
  const flag = results.timeBaseCheck?.flagged ? results.timeBaseCheck : null;
  const unchecked = flag !== null && timeBaseConfirmation === null;
  return (
    <div className="space-y-4">
      <div>
        <p className="text-xs font-medium uppercase tracking-wide text-harbour-500">
          Speed {preview && <Badge tone="signal">preview, not saved</Badge>}
        </p>
        {speed ? (
          <>
            <p className={`mt-1 text-3xl font-semibold tabular-nums tracking-tight ${unchecked ? 'text-harbour-300' : 'text-harbour-900'}`} data-testid="speed" data-unchecked={unchecked || undefined}>
              {formatMeasurement(speed.value, speed.uncertainty, 'm/s')}
            </p>
            {unchecked && (
              <p className="mt-1 text-sm font-medium text-signal-800" data-testid="speed-unchecked">
                Not a measurement until the time base is checked: {flag.reasons[0]?.message}.
              </p>
            )}
            <p className="mt-1 text-sm text-harbour-600">
              {speed.method === 'flight' ? 'Time of flight' : 'Occlusion'}: {BASIS_LABELS[speed.basis]}. Expanded uncertainty, k = {speed.coverage} (about 95 %).
            </p>
          </>
        ) : (
          <p className="mt-1 text-lg font-medium text-red-800">No speed: no gate gave a usable pulse.</p>
        )}
      </div>
      <dl className={`divide-y divide-harbour-100 ${unchecked ? 'opacity-50' : ''}`}>
        {fit && <Row label="Deceleration" value={formatMeasurement(fit.deceleration, fit.decelerationUncertainty, 'm/s²')} note={`fit over ${fit.gates} gates`} />}
        {derived.mach && <Row label="Mach number" value={formatMeasurement(derived.mach.value, derived.mach.uncertainty)} note={derived.speedOfSound ? `c = ${formatMeasurement(derived.speedOfSound.value, derived.speedOfSound.uncertainty, 'm/s')} in dry air (USSA 1976)` : undefined} />}
        {derived.kineticEnergy && <Row label="Kinetic energy" value={formatMeasurement(derived.kineticEnergy.value, derived.kineticEnergy.uncertainty, 'J')} />}
        {derived.momentum && <Row label="Momentum" value={formatMeasurement(derived.momentum.value, derived.momentum.uncertainty, 'kg·m/s')} />}
      </dl>
      {(results.flight.length > 0 || results.occlusion.length > 0) && (
        <details className="rounded-md bg-harbour-50 px-3 py-2">
          <summary className="cursor-pointer text-sm font-medium text-harbour-700">
            Each gate pair and each gate's occlusion ({results.flight.length + results.occlusion.length})
          </summary>
          <dl className="mt-1 divide-y divide-harbour-100">
        {results.flight.map((f) => (
              <Row key={`${f.from.position}-${f.to.position}`} label={`Flight ${(f.from.position * 1000).toFixed(0)}→${(f.to.position * 1000).toFixed(0)} mm`} value={formatMeasurement(f.speed, f.uncertainty, 'm/s')} note={`leading edges ${f.leadingEdgeSpeed.toFixed(2)} m/s, trailing edges ${f.trailingEdgeSpeed.toFixed(2)} m/s`} />
            ))}
            {results.occlusion.map((o) => (
              <Row key={`occ-${o.channel}-${o.position}`} label={`Occlusion at ${(o.position * 1000).toFixed(0)} mm`} value={formatMeasurement(o.speed, o.uncertainty, 'm/s')} note={`${(o.length * 1000).toFixed(2)} mm in ${(o.width * 1e6).toFixed(1)} µs`} />
            ))}
          </dl>
        </details>
      )}
      {results.crossChecks.length > 0 && (
        <ul className="space-y-1 text-sm">
          {results.crossChecks.map((c, i) => (
            <li key={i} className={c.consistent ? 'text-emerald-800' : 'text-red-800'}>
              {c.consistent ? 'Consistent' : 'Inconsistent'}: occlusion {c.occlusionSpeed.toFixed(2)} m/s vs flight {c.flightSpeed.toFixed(2)} m/s
              (difference {c.difference.toFixed(2)} m/s, limit ±{c.limit.toFixed(2)} m/s)
            </li>
          ))}
        </ul>
      )}
      {(results.warnings.length > 0 || flag) && (
        <div role="alert" className="space-y-2 rounded-md bg-signal-100 px-4 py-3 text-sm text-signal-800">
          <p className="font-semibold">Check before trusting this result</p>
          {flag && <TimeBaseFlag check={flag} confirmation={timeBaseConfirmation}>{unchecked && confirmTimeBase}</TimeBaseFlag>}
          {results.warnings.length > 0 && (
            <ul className="list-disc space-y-0.5 pl-5">
              {results.warnings.map((w, i) => <li key={i}>{w}</li>)}
            </ul>
          )}
        </div>
      )}
      {results.assumptions && <AssumptionList assumptions={results.assumptions} />}
    </div>
  );
}
