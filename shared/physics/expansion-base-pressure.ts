/**
 * Pressure on the base of a projectile that runs away from gas at rest, through the centred unsteady expansion wave
 * it leaves behind: the ideal-gas gun of constant bore (Lagrange's problem).
 *
 * Along the C⁻ characteristics that reach the base from undisturbed gas the Riemann invariant u + 2c/(γ − 1) keeps its
 * value 2c₀/(γ − 1), so c/c₀ = 1 − (γ − 1)/2 · v/c₀ at a base moving at v, and isentropy gives
 * p/p₀ = (c/c₀)^(2γ/(γ−1)). Anderson, *Modern Compressible Flow*, ch. 7 (unsteady wave motion: finite expansion
 * waves, the gas behind a piston withdrawn at speed u; equation quoted from memory, derived again here from the
 * invariant). The pressure reaches 0 at the escape speed 2c₀/(γ − 1) (≈ 1716 m/s for air at 20 °C): no
 * projectile driven this way can pass it, whatever its mass.
 *
 * @param speed - projectile speed v ≥ 0, m/s
 * @param stagnationPressure - pressure p₀ of the driving gas at rest, Pa
 * @param speedOfSound - speed of sound c₀ of the driving gas at rest, m/s (Infinity: the gas follows at once, p = p₀)
 * @param gamma - ratio of specific heats γ > 1 of the driving gas
 * @returns the base pressure, Pa (0 at and above the escape speed)
 */
export function expansionBasePressure(speed: number, stagnationPressure: number, speedOfSound: number, gamma: number): number {
  if (speed <= 0) return stagnationPressure;
  const ratio = 1 - ((gamma - 1) / 2) * (speed / speedOfSound);
  if (ratio <= 0) return 0;
  return stagnationPressure * ratio ** ((2 * gamma) / (gamma - 1));
}
