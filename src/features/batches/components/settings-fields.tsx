import { Button, SelectField, TextField } from '../../../components/ui/primitives.tsx';
import type { SettingsForm } from '../lib/settings-form.ts';

/** The settings a batch applies (or a campaign keeps as defaults); each can be left as every shot has it. */
export function SettingsFields({ form, onChange }: { form: SettingsForm; onChange: (patch: Partial<SettingsForm>) => void }) {
  const unit = form.threshold === 'volts' ? 'V' : '%';
  const setGate = (i: number, patch: Partial<SettingsForm['gates'][number]>) =>
    onChange({ gates: form.gates.map((g, j) => (j === i ? { ...g, ...patch } : g)) });
  return (
    <div className="grid gap-4 text-sm md:grid-cols-2">
      <div className="space-y-3">
        <SelectField label="Threshold" value={form.threshold} onChange={(e) => onChange({ threshold: e.target.value as SettingsForm['threshold'] })}>
          <option value="keep">keep each shot’s</option>
          <option value="auto">automatic: 50 % of the step (IEEE 181 mesial), ±40 % hysteresis</option>
          <option value="percent">percent of each channel’s step</option>
          <option value="volts">volts</option>
        </SelectField>
        {(form.threshold === 'percent' || form.threshold === 'volts') && (
          <div className="grid grid-cols-2 gap-3">
            <TextField label={`Level (${unit})`} inputMode="decimal" value={form.level} onChange={(e) => onChange({ level: e.target.value })} />
            <TextField label={`Hysteresis ± (${unit})`} inputMode="decimal" value={form.hysteresis} onChange={(e) => onChange({ hysteresis: e.target.value })} />
          </div>
        )}
        <div className="grid grid-cols-2 gap-3">
          <SelectField label="Beam-break pulls" value={form.polarity} onChange={(e) => onChange({ polarity: e.target.value as SettingsForm['polarity'] })}>
            <option value="keep">keep each shot’s</option><option value="auto">detect</option><option value="falling">low</option><option value="rising">high</option>
          </SelectField>
          <SelectField label="Edges that time the flight" value={form.edges} onChange={(e) => onChange({ edges: e.target.value as SettingsForm['edges'] })}>
            <option value="keep">keep each shot’s</option><option value="both">both (pulse mid-times)</option><option value="leading">leading only</option><option value="trailing">trailing only</option>
          </SelectField>
        </div>
        <SelectField label="Smoothing (Savitzky–Golay)" value={form.smoothing} onChange={(e) => onChange({ smoothing: e.target.value as SettingsForm['smoothing'] })}>
          <option value="keep">keep each shot’s</option><option value="off">none</option><option value="on">smooth before finding crossings</option>
        </SelectField>
        {form.smoothing === 'on' && (
          <div className="grid grid-cols-2 gap-3">
            <TextField label="Window (odd, samples)" inputMode="numeric" value={form.smoothingWindow} onChange={(e) => onChange({ smoothingWindow: e.target.value })} />
            <TextField label="Polynomial order" inputMode="numeric" value={form.smoothingOrder} onChange={(e) => onChange({ smoothingOrder: e.target.value })} />
          </div>
        )}
      </div>
      <fieldset className="space-y-2">
        <legend className="text-sm font-medium text-harbour-800">Gate mapping</legend>
        {form.gates.length === 0 && <p className="text-harbour-500">Each shot keeps its own: its rig’s gates on its channels in order.</p>}
        {form.gates.map((g, i) => (
          <div key={i} className="grid grid-cols-[1fr_7rem_auto] items-end gap-2">
            <TextField label={`Gate ${i + 1} channel`} value={g.channel} onChange={(e) => setGate(i, { channel: e.target.value })} />
            <TextField label="Position (mm)" inputMode="decimal" value={g.positionMm} onChange={(e) => setGate(i, { positionMm: e.target.value })} />
            <Button variant="ghost" className="!px-2" aria-label={`Remove gate ${i + 1}`} onClick={() => onChange({ gates: form.gates.filter((_, j) => j !== i) })}>✕</Button>
          </div>
        ))}
        <Button variant="secondary" className="!py-1 text-xs" onClick={() => onChange({ gates: [...form.gates, { channel: '', positionMm: '' }] })}>
          {form.gates.length === 0 ? 'Set the gates for every shot' : 'Add a gate'}
        </Button>
        <p className="text-xs text-harbour-500">A channel named here must exist in every chosen shot; the batch is refused before anything is queued if not.</p>
      </fieldset>
    </div>
  );
}
