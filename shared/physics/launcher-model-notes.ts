/**
 * What the launcher model with losses assumes, in words for the trends page, the campaign report and the JSON export
 * (the sources of each term are in `simulateLauncherShot`).
 */
export const LAUNCHER_MODEL_ASSUMPTIONS: readonly string[] = [
  'The seal at the entrance opens at once and the ball starts from rest at the entrance.',
  'The outside air follows the ball as a column in a tube of the bore’s size, thinning out as the ball speeds up (ideal-gas gun, Anderson, Modern Compressible Flow); it can never push the ball past 2c₀/(γ−1). A wide-open entrance feeds the flow somewhat better; the fitted losses absorb that.',
  'The air left in the tube is squeezed ahead of the ball without losing heat; when it reaches the outside pressure it pushes the exit seal off and is pushed out ahead of the ball.',
  'Friction is one constant force; the leak is one effective opening past the ball. Both are effective values that make the model match these shots, not measurements of the parts.',
  'The measured speed is taken as the exit speed (gates close to the muzzle; slowing in the air between them is left out).',
];

/** Cautions shown beside every prediction of the launcher model. */
export const LAUNCHER_MODEL_CAUTIONS: readonly string[] = [
  'Projectiles near or above the speed of sound are dangerous: they pierce, shatter and make a loud report. A rated backstop, a clear exclusion zone, eye and hearing protection, and rated tubing against implosion.',
  'These predictions describe this campaign’s own launcher within the conditions it was fired in. They are not advice to raise pressure, speed or energy, nor to change the launcher.',
  'The lab’s own safety rules and trained supervision govern every shot.',
];
