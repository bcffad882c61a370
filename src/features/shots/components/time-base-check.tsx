import { useState, type FormEvent, type ReactNode } from 'react';
import type { AnalysisAssumptions, TimeBaseCheck } from '../../../../shared/analysis/types.ts';
import { describeAssumptions } from '../../../../shared/analysis/describe-assumptions.ts';
import { Button, ErrorNote } from '../../../components/ui/primitives.tsx';
import { formatDateTime } from '../../../lib/format.ts';
import { useConfirmTimeBase } from '../api/confirm-time-base.ts';
import type { TimeBaseConfirmation } from '../api/types.ts';

/**
 * The "check the time base" part of the "Check before trusting" box: why the result is not stated as a
 * measurement, and the analyst's confirmation, or (for analysts) the form to give it.
 */
export function TimeBaseFlag({ check, confirmation, children }: { check: TimeBaseCheck; confirmation: TimeBaseConfirmation | null; children?: ReactNode }) {
  return (
    <div data-testid="time-base-flag" className="space-y-1">
      <p className="font-semibold">{confirmation ? 'Time base checked' : 'Check the time base'}</p>
      <ul className="list-disc space-y-0.5 pl-5">
        {check.reasons.map((r) => <li key={r.code}>{r.message}</li>)}
      </ul>
      {confirmation ? (
        <p className="text-xs">
          Confirmed by {confirmation.by?.name ?? 'a former member'}, {formatDateTime(confirmation.at)}: “{confirmation.note}”
        </p>
      ) : (
        <p className="text-xs">
          This result is not a measurement, and review cannot approve it, until an analyst confirms the read or fixes it
          (“Change how it is read” on the file, or a recomputation).
        </p>
      )}
      {children}
    </div>
  );
}

/** "I checked the time base": an analyst says what they checked; the confirmation is kept with this version and audited. */
export function ConfirmTimeBase({ shotId, analysisId, version }: { shotId: string; analysisId: string; version: number }) {
  const confirm = useConfirmTimeBase(shotId, analysisId);
  const [open, setOpen] = useState(false);
  const [note, setNote] = useState('');
  const [missing, setMissing] = useState(false);
  if (!open) return <Button variant="secondary" className="mt-1" onClick={() => setOpen(true)}>I checked the time base…</Button>;
  const submit = (e: FormEvent) => {
    e.preventDefault();
    if (note.trim() === '') {
      setMissing(true);
      return;
    }
    confirm.mutate({ note: note.trim() });
  };
  return (
    <form onSubmit={submit} className="mt-2 space-y-2" noValidate>
      <label className="block text-xs font-medium">
        What did you check? <span className="font-normal">(kept with version {version}, in the audit trail and on the report)</span>
        <textarea
          className="mt-1 block w-full rounded-md border-0 bg-white px-2.5 py-1.5 text-sm text-harbour-900 ring-1 ring-harbour-200 focus:ring-2 focus:ring-harbour-600 aria-[invalid]:ring-red-400"
          rows={2}
          value={note}
          aria-invalid={missing || undefined}
          onChange={(e) => { setNote(e.target.value); setMissing(false); }}
          placeholder="e.g. the scope showed 100 ns per point and the file's interval matches"
        />
      </label>
      {missing && <p role="alert" className="text-xs text-red-700">Say what you checked: the confirmation needs a note.</p>}
      {confirm.isError && <ErrorNote error={confirm.error} />}
      <div className="flex gap-2">
        <Button type="submit" disabled={confirm.isPending}>{confirm.isPending ? 'Saving…' : 'I checked the time base'}</Button>
        <Button variant="ghost" onClick={() => { setOpen(false); setMissing(false); }}>Cancel</Button>
      </div>
    </form>
  );
}

/** The assumptions behind the result, stated beside it (the same lines as the report and the CLI). */
export function AssumptionList({ assumptions }: { assumptions: AnalysisAssumptions }) {
  return (
    <details className="rounded-md bg-harbour-50 px-3 py-2" open>
      <summary className="cursor-pointer text-sm font-medium text-harbour-700">Assumptions behind this result</summary>
      <dl className="mt-1 grid grid-cols-[auto_1fr] gap-x-4 gap-y-0.5 text-xs" data-testid="assumptions">
        {describeAssumptions(assumptions).map((l) => (
          <div key={l.label} className="contents">
            <dt className="text-harbour-500">{l.label}</dt>
            <dd className="text-harbour-800">{l.text}</dd>
          </div>
        ))}
      </dl>
    </details>
  );
}
