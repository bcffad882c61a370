import { GAMMA_AIR, R_AIR } from '../analysis/speed-of-sound.ts';
import { assertPositiveQuantity } from './assert-positive-quantity.ts';

/** Standard atmosphere at sea level, Pa (ISO 2533 / U.S. Standard Atmosphere 1976). */
const STANDARD_ATMOSPHERE = 101_325;

/** The outside air that drives a launcher (and fills its tube before pumping). */
export interface LauncherAir {
  /**
   * Pressure of the air outside, which drives the ball once the seal opens, Pa.
   * @default 101325 (ISO 2533 standard atmosphere)
   */
  ambientPressure?: number;
  /**
   * Temperature of the outside air, K.
   * @default 293.15 (20 °C)
   */
  ambientTemperature?: number;
  /**
   * Ratio of specific heats of the driving gas.
   * @default 1.4 (dry air, U.S. Standard Atmosphere 1976)
   */
  gamma?: number;
  /**
   * Specific gas constant of the driving gas, J/(kg·K).
   * @default 287.053 (dry air, U.S. Standard Atmosphere 1976)
   */
  gasConstant?: number;
}

export interface LauncherModelOptions extends LauncherAir {
  /** Length of the evacuated tube the ball is driven along, m. */
  tubeLength: number;
  /** Inner diameter of the tube (the ball seals the bore), m. */
  boreDiameter: number;
  /** Mass of the ball, kg. */
  mass: number;
  /**
   * Pressure left in the tube before the seal opens, Pa.
   * @default 0
   */
  tubePressure?: number;
}

export interface LauncherPrediction {
  /** Zeroth-order exit speed √(2·P₀·A·L/m), m/s. */
  speed: number;
  /** Driving pressure difference P₀ = ambient − tube, Pa. */
  pressureDifference: number;
  /** Bore cross-section π·d²/4, m². */
  boreArea: number;
  /** Speed of sound of the outside air, √(γ·R·T), m/s. */
  speedOfSound: number;
  /** Unsteady expansion limit 2·c₀/(γ − 1): no gas expanding into vacuum moves faster, m/s. */
  gasDynamicLimit: number;
  /** Tube length at which the zeroth-order speed reaches the speed of sound, m·c²/(2·P₀·A); beyond it the model is surely too high. */
  soundSpeedLength: number;
}

/**
 * Exit speed of a ball driven out of an evacuated tube by the outside air, by the zeroth-order model of
 * Ayars & Buchholtz, "Analysis of the vacuum cannon", Am. J. Phys. 72(7), 961–963 (2004): the pressure difference
 * P₀ acts on the bore area A along the whole tube length L, so ½·m·v² = P₀·A·L and v = √(2·P₀·A·L/m).
 *
 * Assumptions (state them wherever the number is shown): no friction or leakage past the ball, no air left ahead
 * of the ball (a perfect vacuum apart from `tubePressure`, which only lowers P₀), the seal opens instantly, and
 * the full outside pressure acts on the ball all the way (the air that must flow in behind it is ignored). That last
 * one makes the model over-predict for long tubes, where it even passes the speed of sound; Ayars & Buchholtz's
 * refined models stay below it. Two reference lines come with it: the speed of sound of the outside air
 * c = √(γ·R·T) (U.S. Standard Atmosphere 1976), and the limit 2·c₀/(γ − 1) of gas expanding unsteadily into
 * vacuum (Anderson, *Modern Compressible Flow*, unsteady expansion waves), which no open-tube launcher can pass.
 */
export function launcherModel(options: LauncherModelOptions): LauncherPrediction {
  const {
    tubeLength,
    boreDiameter,
    mass,
    tubePressure = 0,
    ambientPressure = STANDARD_ATMOSPHERE,
    ambientTemperature = 293.15,
    gamma = GAMMA_AIR,
    gasConstant = R_AIR,
  } = options;
  assertPositiveQuantity('tubeLength', tubeLength, 'm');
  assertPositiveQuantity('boreDiameter', boreDiameter, 'm');
  assertPositiveQuantity('mass', mass, 'kg');
  assertPositiveQuantity('ambientPressure', ambientPressure, 'Pa');
  assertPositiveQuantity('ambientTemperature', ambientTemperature, 'K');
  assertPositiveQuantity('gasConstant', gasConstant, 'J/(kg·K)');
  if (typeof gamma !== 'number' || !Number.isFinite(gamma)) throw new TypeError('gamma must be a finite number');
  if (!(gamma > 1)) throw new RangeError(`gamma must be greater than 1 (got ${gamma})`);
  if (typeof tubePressure !== 'number' || !Number.isFinite(tubePressure)) throw new TypeError('tubePressure must be a finite number of Pa');
  if (tubePressure < 0) throw new RangeError(`tubePressure must be 0 Pa or more (got ${tubePressure})`);
  if (tubePressure > ambientPressure) {
    throw new RangeError(`tubePressure (${tubePressure} Pa) is above ambientPressure (${ambientPressure} Pa): the outside air cannot drive the ball`);
  }

  const pressureDifference = ambientPressure - tubePressure;
  const boreArea = (Math.PI * boreDiameter * boreDiameter) / 4;
  const speedOfSound = Math.sqrt(gamma * gasConstant * ambientTemperature);
  const force = pressureDifference * boreArea;
  return {
    speed: Math.sqrt((2 * force * tubeLength) / mass),
    pressureDifference,
    boreArea,
    speedOfSound,
    gasDynamicLimit: (2 * speedOfSound) / (gamma - 1),
    soundSpeedLength: force > 0 ? (mass * speedOfSound * speedOfSound) / (2 * force) : Infinity,
  };
}
