import { useDeferredValue, useMemo, useState } from 'react';
import type { LauncherFitView } from '../../../../shared/contracts/launcher-fit.ts';
import { vacuumForTargetSpeed } from '../../../../shared/physics/vacuum-for-target-speed.ts';
import { Badge, Card, TextField } from '../../../components/ui/primitives.tsx';
import { formatMeasurement } from '../../../lib/format.ts';

/** Speed of sound in the fit's outside air, √(γRT) (U.S. Standard Atmosphere 1976 constants). */
const soundSpeed = (view: LauncherFitView) => Math.sqrt(1.4 * 287.053 * (view.fit?.reference.ambientTemperature ?? 293.15));

/**
 * The cautions that stand beside every prediction of the model: in full, or (`compact`) in one sentence that points
 * to the full list under the fitted model.
 */
export function LauncherCautions({ view, speeds, compact = false }: { view: LauncherFitView; speeds: number[]; compact?: boolean }) {
  const c = soundSpeed(view);
  const near = speeds.some((v) => v >= 0.8 * c);
  const lead = near ? `Predictions here come near the speed of sound (${c.toFixed(0)} m/s): take particular care.` : 'Cautions';
  if (compact) {
    return (
      <p className="rounded-md bg-signal-100 px-3 py-2 text-xs text-harbour-800 ring-1 ring-signal-400" role="note" data-testid="launcher-cautions-short">
        {near ? `${lead} ` : ''}Near-sonic and supersonic projectiles are dangerous. These curves describe this campaign’s own launcher and are not advice to
        raise pressure or speed; the lab’s safety rules and trained supervision govern. Full cautions under the fitted model.
      </p>
    );
  }
  return (
    <div className="rounded-md bg-signal-100 px-3 py-2 text-xs text-harbour-800 ring-1 ring-signal-400" role="note" data-testid="launcher-cautions">
      <p className="font-medium">{lead}</p>
      <ul className="mt-1 list-disc space-y-0.5 pl-4">
        {view.cautions.map((t) => <li key={t}>{t}</li>)}
      </ul>
    </div>
  );
}

const kPa = (pa: number, digits = 2) => `${(pa / 1000).toFixed(digits)} kPa`;

/** "What vacuum for a target speed?": answered in the browser from the fitted model (the same shared code as the API). */
function InverseQuestion({ view }: { view: LauncherFitView }) {
  const [text, setText] = useState('');
  const deferred = useDeferredValue(text);
  const target = Number(deferred.trim().replace(',', '.'));
  const valid = deferred.trim() !== '' && Number.isFinite(target) && target > 0;
  const answer = useMemo(() => (valid && view.fit ? vacuumForTargetSpeed(view.fit, target) : null), [valid, target, view.fit]);
  const k = view.coverageFactor;
  return (
    <div className="space-y-2" data-testid="inverse-question">
      <div className="w-56">
        <TextField
          label="What vacuum for a target speed? (m/s)" inputMode="decimal" value={text} onChange={(e) => setText(e.target.value)}
          error={deferred.trim() !== '' && !valid ? `“${deferred}” is not a positive speed.` : undefined}
        />
      </div>
      {answer?.reachable && (
        <p className="text-sm text-harbour-800" data-testid="inverse-answer">
          For {answer.targetSpeed.toFixed(1)} m/s the fitted model needs the tube at{' '}
          <strong>{formatMeasurement(answer.tubePressure / 1000, (k * answer.standardUncertainty) / 1000, 'kPa')}</strong> (k = {k}, from the fit’s parameters).
          {' '}One shot’s own scatter moves that by about ±{((k * answer.shotSpreadPressure) / 1000).toFixed(2)} kPa.
          {answer.outsideMeasured && ' This lies outside the tube pressures the campaign measured: an extrapolation, to be treated with caution.'}
        </p>
      )}
      {answer && !answer.reachable && (
        <p className="text-sm text-harbour-800" data-testid="inverse-answer">
          {answer.reason === 'above-hard-vacuum'
            ? `The fitted model gives at most ${answer.limitSpeed.toFixed(1)} m/s, even at a hard vacuum: this launcher, as fitted, does not reach ${answer.targetSpeed.toFixed(1)} m/s by pumping harder. Gatepost gives no advice on changing the launcher; that belongs to the lab’s own design review and safety rules.`
            : `Even with the tube near the outside pressure the model gives ${answer.limitSpeed.toFixed(1)} m/s; a slower target is outside what this model describes.`}
        </p>
      )}
    </div>
  );
}

/**
 * The launcher model with losses fitted to the campaign's shots, in a launcher builder's words: friction, leak area,
 * driving efficiency, where the energy goes at the best vacuum, how well the model describes the shots, and the
 * inverse question, with the cautions beside every prediction.
 */
export function LauncherFitCard({ view }: { view: LauncherFitView }) {
  const fit = view.fit;
  const k = view.coverageFactor;
  if (view.status !== 'fitted' || !fit) {
    return (
      <Card title="Launcher model fitted to the shots">
        <p className="text-sm text-harbour-700" data-testid="launcher-fit-reason">{view.reason}</p>
        {view.leftOut.length > 0 && <p className="mt-1 text-xs text-harbour-500">Left out: {view.leftOut.map((x) => `#${x.number} (${x.reason})`).join(', ')}.</p>}
      </Card>
    );
  }
  const b = view.budget;
  const friction = formatMeasurement(fit.frictionForce.value, k * fit.frictionForce.standardUncertainty, 'N');
  const leak = formatMeasurement(fit.leakArea.value * 1e6, k * fit.leakArea.standardUncertainty * 1e6, 'mm²');
  const steps = b ? [
    { label: 'Zeroth order (full outside pressure all the way)', v: b.zerothOrder },
    { label: 'Inflow gas dynamics and the air left in the tube', v: b.gasDynamics },
    { label: 'Friction', v: b.withFriction },
    { label: 'Leak past the ball: the fitted model', v: b.fitted },
  ] : [];
  return (
    <Card
      title="Launcher model fitted to the shots"
      actions={fit.describesData ? <Badge tone="good">describes the shots</Badge> : <Badge tone="bad">does not describe the shots</Badge>}
    >
      <div className="space-y-4" data-testid="launcher-fit">
        <dl className="grid grid-cols-[repeat(auto-fit,minmax(10rem,1fr))] gap-3 text-sm">
          <div className="rounded-md bg-harbour-50 px-3 py-2">
            <dt className="text-xs text-harbour-600">Sliding friction</dt>
            <dd className="text-base font-semibold whitespace-nowrap tabular-nums text-harbour-900" data-testid="fit-friction">≈ {friction}</dd>
            {fit.atLowerBound.frictionForce && <dd className="text-xs text-harbour-500">at its lower bound: none seen</dd>}
          </div>
          <div className="rounded-md bg-harbour-50 px-3 py-2">
            <dt className="text-xs text-harbour-600">Leak area past the ball</dt>
            <dd className="text-base font-semibold whitespace-nowrap tabular-nums text-harbour-900" data-testid="fit-leak">≈ {leak}</dd>
            {fit.atLowerBound.leakArea && <dd className="text-xs text-harbour-500">at its lower bound: none seen</dd>}
          </div>
          {b && (
            <div className="rounded-md bg-harbour-50 px-3 py-2">
              <dt className="text-xs text-harbour-600">Effective driving efficiency at {kPa(b.tubePressure)}</dt>
              <dd className="text-base font-semibold whitespace-nowrap tabular-nums text-harbour-900" data-testid="fit-efficiency">≈ {formatMeasurement(b.efficiency.value * 100, k * b.efficiency.standardUncertainty * 100, '%')}</dd>
              <dd className="text-xs text-harbour-500">of the zeroth-order kinetic energy</dd>
            </div>
          )}
        </dl>
        <p className="text-xs text-harbour-600">
          ± U with k = {k}. Friction and leak area trade off against each other (correlation {fit.correlation.toFixed(2)}): both slow the ball, so
          the shots pin down their combination better than either alone. Both are effective values for this launcher and ball, not measurements of the parts.
        </p>

        <div>
          <p className="text-sm font-medium text-harbour-800">How well the model describes the shots</p>
          <ul className="mt-1 list-disc space-y-0.5 pl-5 text-sm text-harbour-700" data-testid="fit-findings">
            {fit.findings.map((f) => <li key={f}>{f}</li>)}
          </ul>
          <p className="mt-1 text-xs text-harbour-500">
            {view.shotsUsed.length} shots used{view.leftOut.length > 0 ? `; left out ${view.leftOut.map((x) => `#${x.number} (${x.reason})`).join(', ')}` : ''}.
            {view.airAssumed.length > 0 ? ` Outside air assumed (101.325 kPa, 20 °C) for #${view.airAssumed.join(', #')}.` : ''}
            {' '}Fitted with {view.launcher.tubeLengthM} m × {((view.launcher.boreM ?? 0) * 1000).toFixed(1)} mm and {view.launcher.projectileName ?? 'the logged projectile'} ({((view.launcher.massKg ?? 0) * 1000).toFixed(2)} g); values typed in the launcher card change the zeroth-order line only.
          </p>
        </div>

        {b && (
          <div>
            <p className="text-sm font-medium text-harbour-800">Where the speed goes at {kPa(b.tubePressure)}, the campaign’s best vacuum</p>
            <table className="mt-1 w-full text-sm tabular-nums" data-testid="fit-budget">
              <tbody className="divide-y divide-harbour-100">
                {steps.map((s, i) => (
                  <tr key={s.label}>
                    <td className="py-1 pr-2 text-harbour-700">{i > 0 ? '− ' : ''}{s.label}</td>
                    <td className="py-1 text-right font-medium whitespace-nowrap text-harbour-900">{s.v.toFixed(1)} m/s</td>
                    <td className="w-24 py-1 pl-2 text-right text-xs whitespace-nowrap text-harbour-500">{i > 0 ? `−${(steps[i - 1].v - s.v).toFixed(1)} m/s` : ''}</td>
                  </tr>
                ))}
              </tbody>
            </table>
            <p className="mt-1 text-xs text-harbour-500">Each loss is added to the ones above it, so the steps depend on their order.</p>
          </div>
        )}

        <InverseQuestion view={view} />
        <LauncherCautions view={view} speeds={view.curve.map((c) => c.speed + c.predictionExpandedUncertainty)} />
        <details className="text-xs text-harbour-700">
          <summary className="cursor-pointer font-medium text-harbour-800">What the fitted model assumes</summary>
          <ul className="mt-1 list-disc space-y-0.5 pl-4">
            {view.assumptions.map((a) => <li key={a}>{a}</li>)}
          </ul>
          <p className="mt-1">
            Terms: Ayars &amp; Buchholtz, Am. J. Phys. 72(7) 961 (2004) (zeroth order); Anderson, Modern Compressible Flow (unsteady expansion
            behind the ball, flow through the leak); Thuecks &amp; Demas, Am. J. Phys. 87(2) (2019) (the intake). Weighted least squares with the
            parameters’ covariance; χ²/ν and a runs test on the residuals judge the fit.
          </p>
        </details>
      </div>
    </Card>
  );
}
