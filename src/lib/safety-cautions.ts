/**
 * The usual launcher cautions, in one place for every screen that shows them (the lab home, the bench display).
 * Local rules govern; Gatepost only records the shots.
 */
export const LAUNCHER_CAUTIONS = [
  'Projectiles at hundreds of m/s injure: fire only into a rated backstop, with the exclusion zone clear. Never at people.',
  'Evacuated tubes can implode: rated tubing, shielding and eye protection. Burst discs and pressurised variants add pressure-vessel hazards.',
  'The exit makes a loud report: hearing protection for everyone nearby.',
] as const;

export const LOCAL_RULES_NOTE = "Your lab's own safety rules and trained supervision govern every shot; Gatepost only records it.";
