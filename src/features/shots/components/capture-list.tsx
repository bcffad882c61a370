import { useState, type FormEvent } from 'react';
import type { TimeBaseOrigin } from '../../../../shared/contracts/capture.ts';
import { importOverridesSchema, type ImportOverrides } from '../../../../shared/contracts/shots.ts';
import { Badge, Button, ErrorNote, SelectField, TextField } from '../../../components/ui/primitives.tsx';
import { formatDateTime, formatSeconds } from '../../../lib/format.ts';
import { useReingest } from '../api/captures.ts';
import { useRemoveCapture } from '../api/shot-corrections.ts';
import type { CaptureInfo } from '../api/types.ts';

const STATE = {
  queued: { label: 'waiting to be read', tone: 'neutral' },
  reading: { label: 'reading', tone: 'signal' },
  ready: { label: 'read', tone: 'good' },
  failed: { label: 'could not be read', tone: 'bad' },
} as const;

const kib = (bytes: number) => (bytes < 1024 * 1024 ? `${(bytes / 1024).toFixed(1)} KiB` : `${(bytes / 1024 / 1024).toFixed(1)} MiB`);

/** Overrides for a file the importer misread: which column is time, the channel names, units, time base. */
function FixReading({ shotId, capture, onDone }: { shotId: string; capture: CaptureInfo; onDone: () => void }) {
  const reingest = useReingest(shotId);
  const o = capture.importOptions as ImportOverrides;
  const [timeColumn, setTimeColumn] = useState(o.timeColumn == null ? '' : String(o.timeColumn + 1));
  const [names, setNames] = useState((o.channelNames ?? []).join(', '));
  const [units, setUnits] = useState((o.channelUnits ?? []).join(', '));
  const [timeUnit, setTimeUnit] = useState<string>(o.timeUnit ?? '');
  const [delimiter, setDelimiter] = useState<string>(o.delimiter ?? '');
  const [decimalComma, setDecimalComma] = useState<string>(o.decimalComma == null ? '' : String(o.decimalComma));
  const [dataStart, setDataStart] = useState(o.dataStartLine ? String(o.dataStartLine) : '');
  const [headerRows, setHeaderRows] = useState(o.headerRows == null ? '' : String(o.headerRows));
  const [dtUs, setDtUs] = useState(o.dt ? String(o.dt * 1e6) : '');
  const [t0Us, setT0Us] = useState(o.t0 != null ? String(o.t0 * 1e6) : '');
  const [problem, setProblem] = useState<string>();

  const submit = (e: FormEvent) => {
    e.preventDefault();
    const list = (s: string) => s.split(',').map((x) => x.trim()).filter(Boolean);
    const candidate: Record<string, unknown> = {};
    if (timeColumn === 'none') candidate.timeColumn = null;
    else if (timeColumn) candidate.timeColumn = Number(timeColumn) - 1;
    if (names.trim()) candidate.channelNames = list(names);
    if (units.trim()) candidate.channelUnits = list(units);
    if (timeUnit) candidate.timeUnit = timeUnit;
    if (delimiter) candidate.delimiter = delimiter;
    if (decimalComma) candidate.decimalComma = decimalComma === 'true';
    if (dataStart) candidate.dataStartLine = Number(dataStart);
    if (headerRows) candidate.headerRows = Number(headerRows);
    // The form takes µs (what people read off a scope); the importer takes seconds.
    if (dtUs) candidate.dt = Number(dtUs) * 1e-6;
    if (t0Us) candidate.t0 = Number(t0Us) * 1e-6;
    const parsed = importOverridesSchema.safeParse(candidate);
    if (!parsed.success) return setProblem(parsed.error.issues.map((i) => `${i.path.join('.')}: ${i.message}`).join('; '));
    setProblem(undefined);
    reingest.mutate({ captureId: capture.id, importOptions: parsed.data }, { onSuccess: onDone });
  };

  return (
    <form onSubmit={submit} className="mt-3 grid gap-3 rounded-md bg-harbour-50 p-4 sm:grid-cols-3" noValidate>
      <p className="text-sm text-harbour-700 sm:col-span-3">Leave a field empty to let Gatepost detect it. Columns count from 1.</p>
      <TextField label="Time column" value={timeColumn} onChange={(e) => setTimeColumn(e.target.value)} placeholder="e.g. 1, or none" />
      <TextField label="Channel names" value={names} onChange={(e) => setNames(e.target.value)} placeholder="Gate A, Gate B" hint="In column order, comma-separated" />
      <TextField label="Channel units" value={units} onChange={(e) => setUnits(e.target.value)} placeholder="V, mV" />
      <SelectField label="Time unit" value={timeUnit} onChange={(e) => setTimeUnit(e.target.value)}>
        <option value="">detect</option>
        <option value="s">s</option><option value="ms">ms</option><option value="us">µs</option><option value="ns">ns</option>
      </SelectField>
      <SelectField label="Delimiter" value={delimiter} onChange={(e) => setDelimiter(e.target.value)}>
        <option value="">detect</option>
        <option value=",">comma</option><option value=";">semicolon</option><option value={'\t'}>tab</option><option value="whitespace">spaces</option>
      </SelectField>
      <SelectField label="Decimal comma" value={decimalComma} onChange={(e) => setDecimalComma(e.target.value)}>
        <option value="">detect</option><option value="true">yes (1,5)</option><option value="false">no (1.5)</option>
      </SelectField>
      <TextField label="First data line" value={dataStart} onChange={(e) => setDataStart(e.target.value)} inputMode="numeric" />
      <SelectField label="Header rows above the data" value={headerRows} onChange={(e) => setHeaderRows(e.target.value)}>
        <option value="">detect</option><option value="0">none</option><option value="1">1 (names)</option><option value="2">2 (names, then units)</option>
      </SelectField>
      <TextField label="Sample interval (µs)" value={dtUs} onChange={(e) => setDtUs(e.target.value)} hint="For files that state none, or whose printed times are too coarse" />
      <TextField label="First sample time (µs)" value={t0Us} onChange={(e) => setT0Us(e.target.value)} hint="Negative = before the trigger" />
      {(problem || reingest.isError) && <div className="sm:col-span-3"><ErrorNote error={reingest.error ?? new Error(problem)} /></div>}
      <div className="flex gap-2 sm:col-span-3">
        <Button type="submit" disabled={reingest.isPending}>Read again with these settings</Button>
        <Button variant="ghost" onClick={onDone}>Cancel</Button>
      </div>
    </form>
  );
}

const DELIMITER: Record<string, string> = { ',': 'comma', ';': 'semicolon', tab: 'tab', whitespace: 'spaces' };
const ORIGIN: Record<TimeBaseOrigin['how'], string> = {
  'time-column': 'read from the time column',
  metadata: 'stated by the file',
  rebuilt: 'rebuilt from the stated interval',
  given: 'given by you',
};

/** How the importer read a file, in the lab's words: what a person checks before trusting the time base. */
function HowItWasRead({ capture }: { capture: CaptureInfo }) {
  const layout = capture.layout ?? {};
  const origin = layout.timeOrigin as TimeBaseOrigin | undefined;
  const files = capture.channels;
  const headerRows = Number(layout.headerRows ?? 0);
  const rows: [string, string][] = [
    ['Separator', `${DELIMITER[String(layout.delimiter)] ?? String(layout.delimiter)}${layout.decimalComma ? ', decimal comma' : ''}`],
    ['Above the data', `${Number(layout.preambleLines ?? 0)} preamble line${Number(layout.preambleLines) === 1 ? '' : 's'}, ${headerRows === 0 ? 'no header row' : headerRows === 1 ? 'one header row (names)' : 'two header rows (names, then units)'}; data from line ${Number(layout.dataStartLine ?? 1).toLocaleString('en')}`],
  ];
  if (origin) rows.push(['Time base', `${ORIGIN[origin.how]}: ${origin.source}`]);
  if (files?.time.kind === 'uniform') rows.push(['Sample interval', `${formatSeconds(files.time.dt)}, first sample at ${formatSeconds(files.time.t0)}`]);
  if (files) rows.push(['Channels', files.channels.map((ch) => `${ch.name} (${ch.sourceUnit && ch.sourceUnit !== ch.unit ? `${ch.sourceUnit} → ${ch.unit}` : ch.unit || 'no unit'})`).join(', ')]);
  if (layout.valueKind === 'codes') rows.push(['Values', 'raw converter codes, not volts (the file gives only a scale per division)']);
  return (
    <details className="mt-2 text-sm" data-testid="how-it-was-read">
      <summary className={`cursor-pointer ${origin?.assumed || origin?.how === 'rebuilt' ? 'font-medium text-signal-800' : 'text-harbour-700'}`}>
        How it was read{origin?.assumed ? ' — time unit assumed, check it' : origin?.how === 'rebuilt' ? ' — time base rebuilt, check it' : ''}
      </summary>
      <dl className="mt-2 grid gap-x-4 gap-y-1 sm:grid-cols-[10rem_1fr]">
        {rows.map(([k, v]) => (
          <div key={k} className="contents">
            <dt className="text-harbour-500">{k}</dt>
            <dd className="text-harbour-800">{v}</dd>
          </div>
        ))}
      </dl>
    </details>
  );
}

/** Asks before removing a file from the shot; says what happens to its bytes and to the analysis. */
function RemoveFile({ labId, shotId, capture }: { labId: string; shotId: string; capture: CaptureInfo }) {
  const remove = useRemoveCapture(labId, shotId);
  const [asking, setAsking] = useState(false);
  if (!asking) return <Button variant="ghost" className="!py-1 text-xs" onClick={() => setAsking(true)}>Remove</Button>;
  return (
    <span className="flex flex-wrap items-center gap-2 rounded-md bg-red-50 px-2 py-1 text-xs text-red-900 ring-1 ring-red-200" role="group" aria-label={`Remove ${capture.fileName}`}>
      Remove {capture.fileName} from this shot? The file stays stored and in the audit trail; the shot is analysed again without it.
      <Button variant="secondary" className="!py-0.5 text-xs" disabled={remove.isPending} onClick={() => remove.mutate(capture.id, { onSuccess: () => setAsking(false) })}>
        {remove.isPending ? 'Removing…' : 'Remove file'}
      </Button>
      <Button variant="ghost" className="!py-0.5 text-xs" onClick={() => setAsking(false)}>Keep</Button>
      {remove.isError && <ErrorNote error={remove.error} />}
    </span>
  );
}

export function CaptureList({ labId, shotId, captures: all, canEdit }: { labId: string; shotId: string; captures: CaptureInfo[]; canEdit: boolean }) {
  const [fixing, setFixing] = useState<string | null>(null);
  const captures = all.filter((c) => !c.removedAt);
  const removed = all.filter((c) => c.removedAt);
  if (all.length === 0) return null;
  return (
    <div className="space-y-2">
    <ul className="divide-y divide-harbour-100" data-testid="capture-list">
      {captures.map((c) => {
        const state = STATE[c.state];
        const files = c.channels;
        return (
          <li key={c.id} className="py-3">
            <div className="flex flex-wrap items-center justify-between gap-2">
              <span className="min-w-0">
                <span className="font-medium">{c.fileName}</span>{' '}
                <span className="text-sm text-harbour-500">{kib(c.sizeBytes)} · sha256 {c.sha256.slice(0, 10)}…</span>
              </span>
              <span className="flex items-center gap-2">
                <Badge tone={state.tone}>{state.label}</Badge>
                {canEdit && (c.state === 'failed' || c.state === 'ready') && fixing !== c.id && (
                  <Button variant="ghost" className="!py-1 text-xs" onClick={() => setFixing(c.id)}>
                    {c.state === 'failed' ? 'Fix how it is read' : 'Change how it is read'}
                  </Button>
                )}
                {canEdit && c.state !== 'queued' && c.state !== 'reading' && <RemoveFile labId={labId} shotId={shotId} capture={c} />}
              </span>
            </div>
            {(c.state === 'queued' || c.state === 'reading') && (
              <div className="mt-2 h-1.5 rounded bg-harbour-100" role="progressbar" aria-label={`Reading ${c.fileName}`} aria-valuenow={c.progress} aria-valuemin={0} aria-valuemax={100}>
                <div className="h-1.5 rounded bg-harbour-500 transition-all" style={{ width: `${Math.max(3, c.progress)}%` }} />
              </div>
            )}
            {c.state === 'ready' && files && (
              <p className="mt-1 text-sm text-harbour-600">
                {files.channels.map((ch) => `${ch.name}${ch.sourceUnit && ch.sourceUnit !== ch.unit ? ` (${ch.sourceUnit} → ${ch.unit})` : ''}`).join(', ')} ·{' '}
                {(c.sampleCount ?? 0).toLocaleString('en')} samples ·{' '}
                {files.time.kind === 'uniform' ? `every ${formatSeconds(files.time.dt)} from ${formatSeconds(files.time.t0)}` : 'uneven sample times'}
              </p>
            )}
            {c.state === 'ready' && c.layout && <HowItWasRead capture={c} />}
            {c.warnings.length > 0 && (
              <ul className="mt-1 list-disc pl-5 text-sm text-signal-800">{c.warnings.map((w, i) => <li key={i}>{w}</li>)}</ul>
            )}
            {c.state === 'failed' && c.error && <div className="mt-2"><ErrorNote error={new Error(c.error)} /></div>}
            {fixing === c.id && <FixReading shotId={shotId} capture={c} onDone={() => setFixing(null)} />}
          </li>
        );
      })}
    </ul>
    {removed.length > 0 && (
      <p className="text-xs text-harbour-500" data-testid="removed-files">
        Removed from this shot (still stored, listed in the audit trail): {removed.map((c) => `${c.fileName} (${formatDateTime(c.removedAt!)})`).join(', ')}
      </p>
    )}
    </div>
  );
}
