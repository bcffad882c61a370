import type { SpeedResult } from '../../../../shared/analysis/types.ts';

/**
 * The GUM budget of the speed: each group's contribution to the standard uncertainty (m/s) and its share of the
 * variance, as a table and as bars.
 */
export function UncertaintyBudget({ speed }: { speed: SpeedResult | null }) {
  if (!speed || speed.budget.length === 0) return <p className="text-sm text-harbour-500">No budget: there is no speed.</p>;
  const rows = [...speed.budget].sort((a, b) => b.share - a.share);
  return (
    <div>
      <table className="w-full text-sm">
        {/* No upper-casing here: u (standard) and U (expanded) are different quantities (GUM 2.3.1, 2.3.5). */}
        <thead className="text-left text-xs text-harbour-500">
          <tr>
            <th scope="col" className="py-1 font-medium">Source</th>
            <th scope="col" className="py-1 text-right font-medium">Contribution to <i>u</i></th>
            <th scope="col" className="w-2/5 py-1 pl-4 font-medium">Share of variance</th>
          </tr>
        </thead>
        <tbody className="divide-y divide-harbour-100">
          {rows.map((b) => (
            <tr key={b.group}>
              <td className="py-1.5">{b.group.charAt(0).toUpperCase() + b.group.slice(1)}</td>
              <td className="py-1.5 text-right tabular-nums">{b.contribution.toPrecision(2)} m/s</td>
              <td className="py-1.5 pl-4">
                <div className="flex items-center gap-2">
                  <div className="h-2.5 flex-1 rounded bg-harbour-100" aria-hidden="true">
                    <div className="h-2.5 rounded bg-harbour-600" style={{ width: `${Math.max(0.5, b.share * 100)}%` }} />
                  </div>
                  <span className="w-12 text-right tabular-nums text-xs text-harbour-600">{(b.share * 100).toFixed(b.share < 0.01 ? 2 : 1)} %</span>
                </div>
              </td>
            </tr>
          ))}
        </tbody>
        <tfoot>
          <tr className="border-t border-harbour-200 font-medium">
            <td className="py-1.5">Combined standard uncertainty <i>u</i><sub>c</sub></td>
            <td className="py-1.5 text-right tabular-nums">{speed.standardUncertainty.toPrecision(2)} m/s</td>
            <td className="py-1.5 pl-4 text-xs text-harbour-600"><i>U</i> = <i>k</i>·<i>u</i><sub>c</sub> = {speed.uncertainty.toPrecision(2)} m/s (<i>k</i> = {speed.coverage})</td>
          </tr>
        </tfoot>
      </table>
      {speed.monteCarlo && (
        <p className="mt-2 text-xs text-harbour-600">
          Monte Carlo check (JCGM 101, {speed.monteCarlo.draws.toLocaleString('en')} draws): mean {speed.monteCarlo.mean.toFixed(3)} m/s,
          SD {speed.monteCarlo.standardDeviation.toPrecision(3)} m/s, 95 % interval [{speed.monteCarlo.intervalLow.toFixed(2)}, {speed.monteCarlo.intervalHigh.toFixed(2)}] m/s.
        </p>
      )}
      <p className="mt-2 text-xs text-harbour-500">Law of propagation of uncertainty, GUM (JCGM 100:2008) 5.1.2.</p>
    </div>
  );
}
