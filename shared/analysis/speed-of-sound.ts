/** Ratio of specific heats of dry air, U.S. Standard Atmosphere 1976. */
export const GAMMA_AIR = 1.4;
/** Specific gas constant of dry air, J/(kg·K), U.S. Standard Atmosphere 1976 (R* / M₀). */
export const R_AIR = 287.053;

/**
 * Speed of sound in dry air as an ideal gas, c = √(γ R T), with the constants of the U.S. Standard Atmosphere 1976.
 * @param temperature - absolute temperature, K
 * @returns speed of sound, m/s
 */
export function speedOfSound(temperature: number): number {
  if (!(temperature > 0) || !Number.isFinite(temperature)) {
    throw new RangeError('temperature must be a positive number of kelvin');
  }
  return Math.sqrt(GAMMA_AIR * R_AIR * temperature);
}
