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
