import { useQueryClient } from '@tanstack/react-query';
import { useRef, useState, type DragEvent } from 'react';
import { Badge, Button, ErrorNote } from '../../../components/ui/primitives.tsx';
import { uploadCaptures } from '../api/captures.ts';
import { shotKeys } from '../api/shot.ts';

interface Sending { key: string; name: string; fraction: number; error?: string; done?: boolean; duplicate?: boolean }

/**
 * Drop zone for scope files: the files dropped together go up in one request (uploadCaptures), each with its own
 * progress bar; reading and analysing then show in the capture list as the worker reports them.
 */
export function CaptureDrop({ shotId, disabled, disabledReason }: { shotId: string; disabled: boolean; disabledReason?: string }) {
  const queryClient = useQueryClient();
  const input = useRef<HTMLInputElement>(null);
  const [over, setOver] = useState(false);
  const [sending, setSending] = useState<Sending[]>([]);

  const send = async (files: File[]) => {
    const batch = files.map((f, i) => ({ key: `${Date.now()}-${i}-${f.name}`, name: f.name, fraction: 0 }));
    setSending((s) => [...batch, ...s].slice(0, 20));
    const update = (key: string, patch: Partial<Sending>) => setSending((s) => s.map((x) => (x.key === key ? { ...x, ...patch } : x)));
    try {
      const r = await uploadCaptures(shotId, files, (fractions) => fractions.forEach((fraction, i) => update(batch[i].key, { fraction })));
      batch.forEach(({ key }, i) => update(key, { fraction: 1, done: true, duplicate: r.captures[i]?.duplicate }));
    } catch (err) {
      // One request: what refused it (too large, not multipart, signed out) holds for every file in it.
      batch.forEach(({ key }) => update(key, { error: (err as Error).message }));
    }
    void queryClient.invalidateQueries({ queryKey: shotKeys.detail(shotId) });
  };

  const onDrop = (e: DragEvent) => {
    e.preventDefault();
    setOver(false);
    if (disabled) return;
    const files = [...e.dataTransfer.files];
    if (files.length) void send(files);
  };

  return (
    <div>
      <div
        onDragOver={(e) => { e.preventDefault(); if (!disabled) setOver(true); }}
        onDragLeave={() => setOver(false)}
        onDrop={onDrop}
        data-testid="drop-zone"
        className={`flex flex-wrap items-center justify-between gap-3 rounded-lg border-2 border-dashed px-5 py-4 transition-colors ${over ? 'border-signal-400 bg-signal-100/50' : 'border-harbour-200 bg-white'}`}
      >
        <div>
          <p className="font-medium text-harbour-800">{disabled ? 'Files cannot be added' : 'Drop the scope’s CSV exports here'}</p>
          <p className="text-sm text-harbour-500">
            {disabled ? disabledReason : 'One file with every channel, or one file per channel. Files are kept byte for byte.'}
          </p>
        </div>
        <input
          ref={input}
          type="file"
          multiple
          accept=".csv,.tsv,.txt,text/csv,text/plain"
          className="sr-only"
          aria-label="Choose scope files"
          onChange={(e) => {
            const files = [...(e.target.files ?? [])];
            e.target.value = '';
            if (files.length) void send(files);
          }}
        />
        <Button variant="secondary" disabled={disabled} onClick={() => input.current?.click()}>Choose files…</Button>
      </div>
      {sending.length > 0 && (
        <ul className="mt-3 space-y-2">
          {sending.map((s) => (
            <li key={s.key} className="text-sm">
              <div className="flex items-center justify-between gap-2">
                <span className="truncate">{s.name}</span>
                {s.error ? <Badge tone="bad">not sent</Badge> : s.done ? <Badge tone="good">{s.duplicate ? 'already here' : 'sent'}</Badge> : <span className="tabular-nums text-harbour-500">{Math.round(s.fraction * 100)} %</span>}
              </div>
              {!s.done && !s.error && (
                <div className="mt-1 h-1.5 rounded bg-harbour-100" role="progressbar" aria-label={`Uploading ${s.name}`} aria-valuenow={Math.round(s.fraction * 100)} aria-valuemin={0} aria-valuemax={100}>
                  <div className="h-1.5 rounded bg-signal-400" style={{ width: `${s.fraction * 100}%` }} />
                </div>
              )}
              {s.error && <div className="mt-1"><ErrorNote error={new Error(s.error)} /></div>}
            </li>
          ))}
        </ul>
      )}
    </div>
  );
}
