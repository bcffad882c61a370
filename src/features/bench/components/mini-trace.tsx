import type { BenchLatest, BenchTrace } from '../api/bench.ts';
import { useBenchTrace } from '../api/bench.ts';

const W = 400;
const H = 90;

/** An SVG path of the window: one vertical stroke per (min, max) column, or a line through raw samples. */
function tracePath(data: NonNullable<ReturnType<typeof useBenchTrace>['data']>, x: (t: number) => number, y: (v: number) => number): string {
  const parts: string[] = [];
  if (data.raw) {
    let pen = 'M';
    for (let i = 0; i < data.t.length; i++) {
      const v = data.v[i];
      if (v == null) {
        pen = 'M';
        continue;
      }
      parts.push(`${pen}${x(data.t[i]).toFixed(1)} ${y(v).toFixed(1)}`);
      pen = 'L';
    }
  } else {
    for (let j = 0; j < data.min.length; j++) {
      const lo = data.min[j];
      const hi = data.max[j];
      if (lo == null || hi == null) continue;
      const xj = x(data.t0 + (j + 0.5) * data.dt).toFixed(1);
      // Join neighbouring columns so the steps of a pulse read as edges, not as loose dashes.
      parts.push(`${j === 0 || data.min[j - 1] == null ? 'M' : 'L'}${xj} ${y(hi).toFixed(1)}L${xj} ${y(lo).toFixed(1)}`);
    }
  }
  return parts.join('');
}

/**
 * One gate's trace, small: the samples around the pulses, the threshold dashed, each crossing marked, on the same
 * vertical scale as the other gates so a weak dip looks weak.
 */
export function MiniTrace({ trace, window, scale }: { trace: BenchTrace; window: BenchLatest['window']; scale: { low: number; high: number } | null }) {
  const q = useBenchTrace(trace, window, W);
  const gate = trace.gatePositions.length > 0 ? `gate at ${trace.gatePositions.map((p) => `${Number((p * 1000).toFixed(1))} mm`).join(', ')}` : 'not a gate';
  const missed = trace.status === 'missed';
  let body = null;
  if (q.data) {
    const from = q.data.from;
    const to = q.data.to > from ? q.data.to : from + 1e-9;
    const values = q.data.raw ? q.data.v : [...q.data.min, ...q.data.max];
    // One vertical scale for every gate (from all channels' state levels), widened only by samples outside it.
    let lo = scale?.low ?? Infinity;
    let hi = scale?.high ?? -Infinity;
    for (const v of values) {
      if (v == null) continue;
      if (v < lo) lo = v;
      if (v > hi) hi = v;
    }
    if (trace.threshold != null) {
      lo = Math.min(lo, trace.threshold);
      hi = Math.max(hi, trace.threshold);
    }
    if (!Number.isFinite(lo) || hi <= lo) {
      lo = (Number.isFinite(lo) ? lo : 0) - 1;
      hi = lo + 2;
    }
    const pad = (hi - lo) * 0.08;
    const x = (t: number) => ((t - from) / (to - from)) * W;
    const y = (v: number) => H - ((v - (lo - pad)) / (hi - lo + 2 * pad)) * H;
    body = (
      <>
        {trace.threshold != null && (
          <line x1={0} x2={W} y1={y(trace.threshold)} y2={y(trace.threshold)} className="stroke-signal-400" strokeWidth={1} strokeDasharray="4 4" />
        )}
        <path d={tracePath(q.data, x, y)} fill="none" className={missed ? 'stroke-red-300' : 'stroke-harbour-100'} strokeWidth={1.5} vectorEffect="non-scaling-stroke" />
        {trace.crossings.filter((t) => t >= from && t <= to).map((t, i) => (
          <line key={i} data-testid="crossing" x1={x(t)} x2={x(t)} y1={0} y2={H} className="stroke-signal-400" strokeWidth={2} />
        ))}
      </>
    );
  }
  return (
    <figure className="min-w-0 rounded-lg bg-harbour-800/70 p-3 ring-1 ring-harbour-700" data-testid="bench-trace">
      <figcaption className="flex items-baseline justify-between gap-2 text-sm text-harbour-200">
        <span className="truncate font-medium text-white">{trace.name}</span>
        <span className={missed ? 'font-semibold text-red-300' : ''}>{missed ? 'missed' : gate}</span>
      </figcaption>
      <svg viewBox={`0 0 ${W} ${H}`} preserveAspectRatio="none" className="mt-2 h-16 w-full min-[1400px]:h-[clamp(7rem,16vh,14rem)]" role="img"
        aria-label={`${trace.name}: ${trace.crossings.length} threshold crossing${trace.crossings.length === 1 ? '' : 's'}${missed ? ', missed' : ''}`}>
        {body}
      </svg>
      {missed && trace.reason && <p className="mt-1 text-xs text-red-200">{trace.reason}</p>}
    </figure>
  );
}
