import { LAUNCHER_CAUTIONS, LOCAL_RULES_NOTE } from '../../../lib/safety-cautions.ts';

/**
 * The usual launcher cautions, shown once per lab home, short enough not to nag. Local rules govern.
 */
export function SafetyNote() {
  return (
    <aside aria-label="Safety" className="rounded-lg bg-signal-100/60 px-5 py-4 text-sm text-signal-800 ring-1 ring-signal-400/40">
      <p className="font-semibold">Before each shot</p>
      <ul className="mt-1 list-disc space-y-0.5 pl-5">
        {LAUNCHER_CAUTIONS.map((c) => <li key={c}>{c}</li>)}
      </ul>
      <p className="mt-2 text-xs">{LOCAL_RULES_NOTE}</p>
    </aside>
  );
}

/** The same cautions folded into one line, for forms and side panels (new campaign, new shot, shot page, trends). */
export function SafetyCaution({ className = '', open = false, lead }: {
  className?: string;
  /** Shown unfolded (beside a prediction of near-sonic speeds). */
  open?: boolean;
  /** A sentence before the cautions saying why they matter here. */
  lead?: string;
}) {
  return (
    <details open={open} className={`rounded-md bg-signal-100/60 px-3 py-2 text-xs text-signal-800 ring-1 ring-signal-400/40 ${className}`} data-testid="safety-caution">
      <summary className="cursor-pointer font-medium">Launcher safety</summary>
      {lead && <p className="mt-1 font-medium">{lead}</p>}
      <p className="mt-1">
        Rated backstop and a clear exclusion zone; never fire at people. Shield evacuated tubes and wear eye and hearing protection; burst
        discs and pressurised variants add pressure-vessel hazards. Your lab’s rules and trained supervision govern.
      </p>
    </details>
  );
}
