import { useEffect, useRef, useState, type ReactNode } from 'react';
import type { AnalysisOptions, AnalysisOptionsInput } from '../../../../shared/contracts/analysis.ts';
import { analysisOptionsSchema } from '../../../../shared/contracts/analysis.ts';
import { Button, ErrorNote, SelectField, TextField } from '../../../components/ui/primitives.tsx';
import { formatMeasurement } from '../../../lib/format.ts';
import { useRecompute } from '../api/analyses.ts';
import { formFromParameters, parametersFromForm, type ParametersForm } from '../lib/parameters-form.ts';
import { PREVIEW_MEMORY_BYTES } from '../../../../shared/traces/preview-budget.ts';

function Section({ title, children }: { title: string; children: ReactNode }) {
  return (
    <fieldset className="space-y-3 border-t border-harbour-100 pt-3 first:border-0 first:pt-0">
      <legend className="text-xs font-semibold uppercase tracking-wide text-harbour-500">{title}</legend>
      {children}
    </fieldset>
  );
}

export interface AnalystPanelProps {
  shotId: string;
  base: AnalysisOptions;
  channelNames: string[];
  canRecompute: boolean;
  /** Called with the parameters to preview (null: preview off). */
  onPreview: (parameters: AnalysisOptionsInput | null) => void;
  preview: { results: { speed: { value: number; uncertainty: number } | null } | null; error: string | null; ms: number | null; loading: boolean; tooBig: boolean; neededBytes: number; loadError: Error | null };
}

/**
 * Where an analyst moves thresholds, smoothing and the gate mapping: every change is previewed in the browser with
 * the same engine, and "Recompute" stores it as a new version (the old ones stay).
 */
export function AnalystPanel({ shotId, base, channelNames, canRecompute, onPreview, preview }: AnalystPanelProps) {
  const [form, setForm] = useState<ParametersForm>(() => formFromParameters(base));
  const [previewOn, setPreviewOn] = useState(false);
  const recompute = useRecompute(shotId);
  const [key, setKey] = useState(() => crypto.randomUUID());
  // The panel is rebuilt when a new version becomes current: its preview must not outlive it.
  const onPreviewRef = useRef(onPreview);
  onPreviewRef.current = onPreview;
  useEffect(() => () => onPreviewRef.current(null), []);

  const parsed = analysisOptionsSchema.safeParse(parametersFromForm(form, base));
  const problem = parsed.success ? null : parsed.error.issues.map((i) => `${i.path.join('.') || 'parameters'}: ${i.message}`).join('; ');

  const change = (patch: Partial<ParametersForm>) => {
    const next = { ...form, ...patch };
    setForm(next);
    setKey(crypto.randomUUID());
    if (previewOn) {
      const p = analysisOptionsSchema.safeParse(parametersFromForm(next, base));
      onPreview(p.success ? p.data : null);
    }
  };
  const togglePreview = (on: boolean) => {
    setPreviewOn(on);
    onPreview(on && parsed.success ? parsed.data : null);
  };
  const setGate = (i: number, patch: Partial<ParametersForm['gates'][number]>) =>
    change({ gates: form.gates.map((g, j) => (j === i ? { ...g, ...patch } : g)) });

  return (
    <div className="space-y-4 text-sm">
      <Section title="Threshold">
        <SelectField label="Mode" value={form.thresholdMode} onChange={(e) => change({ thresholdMode: e.target.value as ParametersForm['thresholdMode'] })}>
          <option value="auto">Automatic: 50 % of the step (IEEE 181 mesial), ±40 % hysteresis</option>
          <option value="percent">Percent of each channel’s step</option>
          <option value="volts">Volts</option>
        </SelectField>
        {form.thresholdMode !== 'auto' && (
          <div className="grid grid-cols-2 gap-3">
            <TextField label={`Level (${form.thresholdMode === 'volts' ? 'V' : '%'})`} inputMode="decimal" value={form.level} onChange={(e) => change({ level: e.target.value })} />
            <TextField label={`Hysteresis ± (${form.thresholdMode === 'volts' ? 'V' : '%'})`} inputMode="decimal" value={form.hysteresis} onChange={(e) => change({ hysteresis: e.target.value })} />
          </div>
        )}
        <div className="grid grid-cols-2 gap-3">
          <SelectField label="Beam-break pulls" value={form.polarity} onChange={(e) => change({ polarity: e.target.value as ParametersForm['polarity'] })}>
            <option value="auto">detect</option><option value="falling">low</option><option value="rising">high</option>
          </SelectField>
          <SelectField label="State levels" value={form.levelsMethod} onChange={(e) => change({ levelsMethod: e.target.value as 'mode' | 'mean' })}>
            <option value="mode">histogram mode</option><option value="mean">histogram mean</option>
          </SelectField>
        </div>
      </Section>
      <Section title="Smoothing">
        <label className="flex items-center gap-2">
          <input type="checkbox" checked={form.smoothing} onChange={(e) => change({ smoothing: e.target.checked })} />
          Savitzky–Golay before finding crossings (the raw trace is kept)
        </label>
        {form.smoothing && (
          <div className="grid grid-cols-2 gap-3">
            <TextField label="Window (odd, samples)" inputMode="numeric" value={form.smoothingWindow} onChange={(e) => change({ smoothingWindow: e.target.value })} />
            <TextField label="Polynomial order" inputMode="numeric" value={form.smoothingOrder} onChange={(e) => change({ smoothingOrder: e.target.value })} />
          </div>
        )}
      </Section>
      <Section title="Gates">
        {form.gates.map((g, i) => (
          <div key={i} className="grid grid-cols-[1fr_7rem_auto] items-end gap-2">
            <SelectField label={`Gate ${i + 1} channel`} value={g.channel} onChange={(e) => setGate(i, { channel: e.target.value })}>
              {[...new Set([g.channel, ...channelNames])].map((n) => <option key={n} value={n}>{n}</option>)}
            </SelectField>
            <TextField label="Position (mm)" inputMode="decimal" value={g.positionMm} onChange={(e) => setGate(i, { positionMm: e.target.value })} />
            <Button variant="ghost" className="!px-2" aria-label={`Remove gate ${i + 1}`} onClick={() => change({ gates: form.gates.filter((_, j) => j !== i) })}>✕</Button>
          </div>
        ))}
        <Button variant="secondary" className="!py-1 text-xs" onClick={() => change({ gates: [...form.gates, { channel: channelNames[0] ?? 'CH1', positionMm: '' }] })}>Add a gate</Button>
        <SelectField label="Edges that time the flight" value={form.edges} onChange={(e) => change({ edges: e.target.value as ParametersForm['edges'] })}>
          <option value="both">both edges (pulse mid-times)</option>
          <option value="leading">leading edges only</option>
          <option value="trailing">trailing edges only</option>
        </SelectField>
        <p className="text-xs text-harbour-500">Two gates on one channel: give the channel twice; its pulses are taken in time order.</p>
        <TextField label="Gate position tolerance ± (mm)" inputMode="decimal" value={form.positionToleranceMm} onChange={(e) => change({ positionToleranceMm: e.target.value })} />
      </Section>
      <Section title="Projectile and conditions">
        <div className="grid grid-cols-2 gap-3">
          <TextField label="Length along the path (mm)" inputMode="decimal" value={form.lengthMm} onChange={(e) => change({ lengthMm: e.target.value })} />
          <TextField label="± (mm)" inputMode="decimal" value={form.lengthToleranceMm} onChange={(e) => change({ lengthToleranceMm: e.target.value })} />
          <TextField label="Mass (g)" inputMode="decimal" value={form.massG} onChange={(e) => change({ massG: e.target.value })} />
          <TextField label="± (g)" inputMode="decimal" value={form.massToleranceG} onChange={(e) => change({ massToleranceG: e.target.value })} />
          <TextField label="Ambient temperature (°C)" inputMode="decimal" value={form.temperatureC} onChange={(e) => change({ temperatureC: e.target.value })} />
          <TextField label="Time-base accuracy ± (ppm)" inputMode="decimal" value={form.timebasePpm} onChange={(e) => change({ timebasePpm: e.target.value })} />
        </div>
        <label className="flex items-center gap-2">
          <input type="checkbox" checked={form.monteCarlo} onChange={(e) => change({ monteCarlo: e.target.checked })} />
          Check the uncertainty by Monte Carlo (JCGM 101, 200 000 draws)
        </label>
      </Section>
      {problem && <ErrorNote error={new Error(problem)} />}
      <div className="space-y-2 border-t border-harbour-100 pt-3">
        <label className="flex items-center gap-2 font-medium">
          <input type="checkbox" checked={previewOn} onChange={(e) => togglePreview(e.target.checked)} disabled={preview.tooBig} data-testid="preview-toggle" />
          Preview in this browser as I change settings
        </label>
        {preview.tooBig && (
          <p className="text-xs text-harbour-500" data-testid="preview-too-deep">
            This record is too deep to preview in the browser: it needs about {Math.round(preview.neededBytes / 1e6).toLocaleString('en')} MB
            of this tab's memory, and the preview keeps under {Math.round(PREVIEW_MEMORY_BYTES / 1e6)} MB. Recompute on the server instead.
          </p>
        )}
        {previewOn && (
          <p className="text-xs text-harbour-600" role="status" data-testid="preview-status">
            {problem ? 'Correct the settings above to see a preview.'
              : preview.loading ? 'Fetching the samples…'
              : preview.loadError ? preview.loadError.message
              : preview.error ? `Preview failed: ${preview.error}`
              : preview.results ? `Preview: ${preview.results.speed ? formatMeasurement(preview.results.speed.value, preview.results.speed.uncertainty, 'm/s') : 'no speed'} (${preview.ms?.toFixed(0)} ms in the browser)`
              : 'Computing…'}
          </p>
        )}
        {canRecompute ? (
          <>
            <Button
              className="w-full"
              disabled={!parsed.success || recompute.isPending}
              onClick={() => parsed.success && recompute.mutate({ parameters: parsed.data, key })}
            >
              {recompute.isPending ? 'Queuing…' : 'Recompute and keep as a new version'}
            </Button>
            {recompute.isError && <ErrorNote error={recompute.error} />}
            {recompute.isSuccess && <p role="status" className="text-xs text-emerald-700">Version {recompute.data.analysis.version} queued.</p>}
          </>
        ) : (
          <p className="text-xs text-harbour-500">Analysts and admins can store a recomputation; you can still preview.</p>
        )}
      </div>
    </div>
  );
}
