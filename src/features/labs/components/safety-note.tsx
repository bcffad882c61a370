/**
 * The usual launcher cautions, shown once per lab home, short enough not to nag. Local rules govern.
 */
export function SafetyNote() {
  return (
    <aside aria-label="Safety" className="rounded-lg bg-signal-100/60 px-5 py-4 text-sm text-signal-800 ring-1 ring-signal-400/40">
      <p className="font-semibold">Before each shot</p>
      <ul className="mt-1 list-disc space-y-0.5 pl-5">
        <li>Projectiles at hundreds of m/s injure: fire only into a rated backstop, with the exclusion zone clear. Never at people.</li>
        <li>Evacuated tubes can implode: rated tubing, shielding and eye protection. Burst discs and pressurised variants add pressure-vessel hazards.</li>
        <li>The exit makes a loud report: hearing protection for everyone nearby.</li>
      </ul>
      <p className="mt-2 text-xs">Your lab's own safety rules and trained supervision govern every shot; Gatepost only records it.</p>
    </aside>
  );
}
