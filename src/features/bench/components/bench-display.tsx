import { Link } from 'react-router-dom';
import { formatMeasurement, roundToUncertainty } from '../../../lib/format.ts';
import { LAUNCHER_CAUTIONS, LOCAL_RULES_NOTE } from '../../../lib/safety-cautions.ts';
import { useBenchFeed, type BenchLatest, type BenchSpeed } from '../api/bench.ts';
import { MiniTrace } from './mini-trace.tsx';

/** How the speed was obtained, in words that fit one line across the room. */
export function methodWords(speed: BenchSpeed, fitGates: number | null = null): string {
  if (speed.basis === 'fit') return `Time of flight, fit over ${fitGates ?? 'all'} gates (speed at the first gate)`;
  if (speed.basis === 'pair') return 'Time of flight between two gates (mean over the span)';
  return 'Occlusion: one gate’s blocking time and the projectile’s length';
}

const shortMethod = (s: BenchSpeed) => (s.basis === 'occlusion' ? 'occlusion' : s.basis === 'fit' ? 'flight, fit' : 'flight');

/** The range of every channel's state levels, V: one vertical scale for all small traces. */
function sharedScale(traces: BenchLatest['traces']): { low: number; high: number } | null {
  const levels = traces.flatMap((t) => (t.levels ? [t.levels.low, t.levels.high] : []));
  return levels.length > 0 ? { low: Math.min(...levels), high: Math.max(...levels) } : null;
}

function Headline({ latest }: { latest: BenchLatest }) {
  const r = latest.speed ? roundToUncertainty(latest.speed.value, latest.speed.uncertainty) : null;
  return (
    <section aria-label="Latest shot" className="min-w-0">
      <p className="text-2xl font-medium text-harbour-200 xl:text-3xl" data-testid="bench-shot">
        Shot #{latest.number}
        {latest.analysis && <span className="ml-3 text-lg text-harbour-300">version {latest.analysis.version}</span>}
      </p>
      {latest.busy && (
        <p role="status" className="mt-2 text-2xl font-medium text-signal-400" data-testid="bench-busy">
          {latest.speed ? 'Recomputing…' : 'Reading the scope files and computing…'}
        </p>
      )}
      {r ? (
        <>
          <p className="mt-1 leading-none font-semibold tracking-tight text-white tabular-nums" data-testid="bench-speed">
            <span className="text-[clamp(4.5rem,min(11vw,19vh),13rem)]">{r.value}</span>
            <span className="ml-[0.2em] text-[clamp(2.25rem,min(5vw,9vh),6rem)] text-harbour-100">± {r.uncertainty}</span>
            <span className="ml-[0.3em] text-[clamp(1.75rem,min(3.5vw,6vh),4.5rem)] font-medium text-harbour-200">m/s</span>
          </p>
          <p className="mt-3 text-lg text-harbour-200 min-[1400px]:text-2xl" data-testid="bench-method">
            {methodWords(latest.speed!, latest.fitGates)} · expanded uncertainty, k = 2 (about 95 %)
          </p>
        </>
      ) : !latest.busy && (
        <p className="mt-3 text-5xl font-semibold text-red-300" data-testid="bench-no-speed">No speed</p>
      )}
      {latest.failures.length > 0 && (
        <ul className="mt-3 space-y-1 text-xl text-red-200" data-testid="bench-failures">
          {latest.failures.map((f) => <li key={f}>{f}</li>)}
        </ul>
      )}
      {latest.warnings.length > 0 && (
        <div role="alert" className="mt-4 rounded-lg bg-signal-400/15 px-5 py-3 text-lg text-signal-100 ring-1 ring-signal-400/60 min-[1400px]:text-xl">
          <p className="font-semibold text-signal-400">Check before trusting this result</p>
          <ul className="mt-1 list-disc space-y-0.5 pl-6">
            {latest.warnings.map((w) => <li key={w}>{w}</li>)}
          </ul>
        </div>
      )}
    </section>
  );
}

/**
 * The full-screen page for the screen beside the launcher: the latest shot's speed in type readable from across
 * the room, its method and warnings, a small trace of each gate with its crossings, the last few shots, and the
 * launcher cautions. It updates by itself; nothing to click at the bench.
 */
export function BenchDisplay({ labId, campaignId, labName }: { labId: string; campaignId: string; labName: string }) {
  const feed = useBenchFeed(labId, campaignId);
  const data = feed.data;
  const stale = feed.isError && data != null;
  return (
    <div className="flex min-h-screen flex-col bg-harbour-900 text-white">
      <header className="flex flex-wrap items-baseline gap-x-6 gap-y-1 px-8 pt-5">
        <h1 className="text-2xl font-semibold">{data?.campaign.name ?? 'Bench display'}</h1>
        <span className="text-lg text-harbour-300">{labName}</span>
        <span className="ml-auto flex items-center gap-2 text-base text-harbour-300" role="status" data-testid="bench-live">
          <span aria-hidden className={`inline-block h-3 w-3 rounded-full ${stale ? 'bg-red-400' : 'bg-emerald-400'}`} />
          {stale ? 'Server not answering; showing the last result' : `Live · checked ${new Date(feed.dataUpdatedAt || Date.now()).toLocaleTimeString('en-GB')}`}
        </span>
        <Link to={`/labs/${labId}/campaigns/${campaignId}`} className="text-base text-harbour-300 underline-offset-4 hover:underline">Leave</Link>
      </header>

      {feed.isPending && <p className="px-8 py-16 text-3xl text-harbour-200">Loading…</p>}
      {feed.isError && !data && <p className="px-8 py-16 text-3xl text-red-300">{feed.error.message}</p>}
      {data && !data.latest && <p className="px-8 py-16 text-4xl text-harbour-200">No shot in this campaign yet. The first result appears here by itself.</p>}
      {data?.latest && (
        <main className="grid flex-1 gap-8 px-8 py-4 lg:grid-cols-[minmax(0,3fr)_minmax(16rem,1fr)]">
          <div className="min-w-0 space-y-5">
            <Headline latest={data.latest} />
            {data.latest.traces.length > 0 && (
              <div className={`grid gap-3 sm:grid-cols-2 ${data.latest.traces.length >= 3 ? 'lg:grid-cols-3' : ''}`} aria-label="Gate traces">
                {data.latest.traces.map((t) => (
                  <MiniTrace key={`${data.latest!.analysis?.id}-${t.captureId}-${t.channelIndex}`} trace={t} window={data.latest!.window} scale={sharedScale(data.latest!.traces)} />
                ))}
              </div>
            )}
          </div>
          <aside aria-label="Earlier shots" className="min-w-0">
            <h2 className="text-lg font-medium uppercase tracking-wide text-harbour-300">Earlier shots</h2>
            {data.recent.length === 0 ? <p className="mt-3 text-xl text-harbour-300">None yet.</p> : (
              <ol className="mt-2 divide-y divide-harbour-700" data-testid="bench-recent">
                {data.recent.map((s) => (
                  <li key={s.id} className="flex items-baseline justify-between gap-4 py-2 text-2xl tabular-nums">
                    <span className="text-harbour-200">#{s.number}</span>
                    <span className="text-right">
                      {s.speed ? formatMeasurement(s.speed.value, s.speed.uncertainty, 'm/s') : <span className="text-harbour-300">{s.status === 'failed' ? 'failed' : '—'}</span>}
                      {s.speed && <span className="block text-sm text-harbour-300">{shortMethod(s.speed)}</span>}
                    </span>
                  </li>
                ))}
              </ol>
            )}
          </aside>
        </main>
      )}

      <footer aria-label="Safety" className="border-t border-signal-400/40 bg-signal-400/10 px-8 py-3 text-base text-signal-100" data-testid="bench-cautions">
        <p className="font-semibold text-signal-400">Before each shot</p>
        <ul className="mt-1 grid gap-x-6 gap-y-1 lg:grid-cols-3">
          {LAUNCHER_CAUTIONS.map((c) => <li key={c}>{c}</li>)}
        </ul>
        <p className="mt-1 text-sm text-signal-100/80">{LOCAL_RULES_NOTE}</p>
      </footer>
    </div>
  );
}
