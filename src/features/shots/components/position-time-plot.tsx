import { useEffect, useMemo } from 'react';
import { useElementWidth } from '../../../lib/use-element-width.ts';
import uPlot from 'uplot';
import 'uplot/dist/uPlot.min.css';
import type { ShotAnalysis } from '../../../../shared/analysis/types.ts';
import { timeTicks } from '../../../lib/time-axis.ts';

/**
 * Gate position against entry time, with the speed's line and its ±U band: the fitted constant-deceleration
 * curve x = v·τ − a·τ²/2 when three or more gates fired, else the straight line x = v·τ.
 */
export function PositionTimePlot({ results }: { results: ShotAnalysis | null }) {
  const [box, width] = useElementWidth();


  const fired = useMemo(
    () => results?.gates.filter((g) => g.status === 'ok' && g.pulses.length > 0).sort((a, b) => a.position - b.position) ?? [],
    [results],
  );
  const speed = results?.speed ?? null;

  useEffect(() => {
    if (!box.current || width === 0 || !speed || fired.length === 0) return;
    const t1 = fired[0].pulses[0].start;
    const x1 = fired[0].position;
    const a = results?.fit?.deceleration ?? 0;
    const gatePts = fired.map((g) => ({ t: g.pulses[0].start - t1, x: g.position - x1 }));
    const lastPos = Math.max(...results!.gates.map((g) => g.position - x1), 0.01);
    const tEnd = Math.max(lastPos / Math.max(speed.value - speed.uncertainty, speed.value * 0.5), ...gatePts.map((p) => p.t)) * 1.08;
    const n = 60;
    const xsLine = Array.from({ length: n + 1 }, (_, i) => (i / n) * tEnd);
    const xs = [...new Set([...xsLine, ...gatePts.map((p) => p.t)])].sort((p, q) => p - q);
    const line = (v: number) => xs.map((t) => (v * t - (a * t * t) / 2) * 1000);
    const pts = xs.map((t) => gatePts.find((p) => p.t === t)?.x ?? null).map((x) => (x == null ? null : x * 1000));
    const data: uPlot.AlignedData = [xs, line(speed.value), line(speed.value + speed.uncertainty), line(speed.value - speed.uncertainty), pts];
    const u = new uPlot(
      {
        width,
        height: 240,
        legend: { show: false },
        cursor: { show: false },
        scales: { x: { time: false } },
        axes: [
          { stroke: '#365d7a', grid: { stroke: '#e2ebf2' }, values: (uu, splits) => timeTicks(splits, (uu.scales.x.max ?? 1) - (uu.scales.x.min ?? 0)), label: 'time after the first gate', labelSize: 18 },
          { stroke: '#365d7a', grid: { stroke: '#e2ebf2' }, values: (_uu, s) => s.map((v) => `${v.toFixed(0)} mm`), size: 72, label: 'position', labelSize: 18 },
        ],
        series: [
          {},
          { stroke: '#16324a', width: 1.5 },
          { stroke: 'rgba(196, 122, 18, 0.8)', width: 1, dash: [4, 4] },
          { stroke: 'rgba(196, 122, 18, 0.8)', width: 1, dash: [4, 4] },
          { stroke: '#c47a12', width: 0, paths: () => null, points: { show: true, size: 9, fill: '#f2a541', stroke: '#7a4a06' } },
        ],
        bands: [{ series: [2, 3], fill: 'rgba(242, 165, 65, 0.15)' }],
      },
      data,
      box.current,
    );
    return () => u.destroy();
  }, [box, width, speed, fired, results]);

  if (!speed || fired.length === 0) return <p className="text-sm text-harbour-500">Drawn once a speed is known.</p>;
  return (
    <div>
      <div ref={box} className="w-full" data-testid="position-time" />
      <p className="mt-1 text-xs text-harbour-500">
        Dots: gates that fired, at their entry instants. Line: {results?.fit ? 'the speed and deceleration of the fit' : 'the speed'}; shaded: v ± U.
      </p>
    </div>
  );
}
