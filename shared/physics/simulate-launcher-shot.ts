import { GAMMA_AIR, R_AIR } from '../analysis/speed-of-sound.ts';
import { assertPositiveQuantity } from './assert-positive-quantity.ts';
import { expansionBasePressure } from './expansion-base-pressure.ts';
import type { LauncherAir } from './launcher-model.ts';
import { orificeMassFlow } from './orifice-mass-flow.ts';

/** Standard atmosphere at sea level, Pa (ISO 2533 / U.S. Standard Atmosphere 1976). */
const STANDARD_ATMOSPHERE = 101_325;

export interface LauncherShotOptions extends LauncherAir {
  /** Length of tube the projectile runs along, from the entrance seal to the exit seal, m. */
  tubeLength: number;
  /** Inner diameter of the tube, m. */
  boreDiameter: number;
  /**
   * Diameter of the projectile, m; the pressures act on its cross-section. A smaller projectile than the bore
   * leaves a gap, which the fitted leak area stands for.
   * @default boreDiameter
   */
  projectileDiameter?: number;
  /** Mass of the projectile, kg. */
  mass: number;
  /**
   * Pressure of the air left in the tube before the shot, Pa.
   * @default 0
   */
  tubePressure?: number;
  /**
   * Effective sliding friction between projectile and bore, a constant force against the motion, N.
   * @default 0
   */
  frictionForce?: number;
  /**
   * Effective area through which driving gas leaks past the projectile into the tube ahead of it, m².
   * @default 0
   */
  leakArea?: number;
  /**
   * How the driving pressure follows the projectile: `'unsteady-expansion'` (the ideal-gas gun: the air behind it
   * thins out as it speeds up, limit 2c₀/(γ−1)) or `'constant-pressure'` (the outside pressure acts in full at
   * every speed, as in the zeroth-order model: the driving gas infinitely fast).
   * @default 'unsteady-expansion'
   */
  drive?: 'unsteady-expansion' | 'constant-pressure';
  /**
   * Pressure of the compressed air ahead of the projectile at which the exit seal lets go; from then on the air
   * ahead is pushed out of the tube at this pressure. Infinity keeps the exit closed.
   * @default ambientPressure (a thin film or foil held on only by the outside air)
   */
  exitSealPressure?: number;
  /**
   * Runge–Kutta steps per reference transit time: the zeroth-order one, √(2·L·m/(P·A)), plus L over the escape
   * speed 2c₀/(γ−1) (which dominates for a very light projectile); a shot takes somewhat more.
   * @default 1000
   */
  steps?: number;
}

export interface LauncherShotEnergy {
  /** Work of the driving pressure on the projectile, ∫ p_behind·A·dx, J. */
  driving: number;
  /** Work of the projectile against the air ahead, ∫ p_ahead·A·dx, J. */
  ahead: number;
  /** Work against friction, ∫ F·dx, J. */
  friction: number;
  /** Kinetic energy at the end, ½·m·v², J. */
  kinetic: number;
  /** Mass of driving gas that leaked past the projectile, kg. */
  leakedMass: number;
  /** Enthalpy it carried in, c_p·T₀ per kilogram, J. */
  leakedEnthalpy: number;
  /** Change of the internal energy p·V/(γ−1) of the air ahead, J. */
  aheadInternal: number;
  /** Energy the air ahead carried out through the opened exit seal, J. */
  vented: number;
}

export interface LauncherShotResult {
  /** Speed at the exit seal, m/s; 0 when the projectile stalls inside. */
  exitSpeed: number;
  reachedExit: boolean;
  /** Time from opening the entrance to reaching the exit (or stalling), s. */
  transitTime: number;
  /** Where the projectile stopped, m (null when it reached the exit). */
  stallPosition: number | null;
  /** Where the projectile was when the air ahead opened the exit seal, m (null: it did not). */
  exitSealOpenedAt: number | null;
  /** The energy ledger: driving − ahead − friction = kinetic; aheadInternal = ahead·(A_bore/A) + leakedEnthalpy − vented. */
  energy: LauncherShotEnergy;
}

// State vector: position, speed, pressure ahead, the work and leak integrals.
const X = 0, V = 1, PA = 2, WD = 3, WA = 4, WF = 5, ML = 6, HL = 7, EV = 8;
const N = 9;

function finiteNonNegative(name: string, value: number, unit: string) {
  if (typeof value !== 'number' || Number.isNaN(value)) throw new TypeError(`${name} must be a number of ${unit}`);
  if (!(value >= 0)) throw new RangeError(`${name} must be 0 ${unit} or more (got ${value})`);
}

/**
 * One shot of an evacuated-tube launcher, integrated along the tube (classical Runge–Kutta, 4th order):
 * m·dv/dt = (p_behind − p_ahead)·A − F, from rest at the entrance to the exit seal. Terms and their sources:
 *
 * - **Zeroth order** (Ayars & Buchholtz, "Analysis of the vacuum cannon", Am. J. Phys. 72(7) 961 (2004)): with
 *   `drive: 'constant-pressure'`, no friction, no leak and a hard vacuum, p_behind = P₀ all the way and
 *   ½·m·v² = P₀·A·L, v = √(2·P₀·A·L/m).
 * - **Driving pressure** (`'unsteady-expansion'`, the default): the outside air follows the projectile through a
 *   centred expansion wave, p_behind = P₀·(1 − (γ−1)/2·v/c₀)^(2γ/(γ−1)) (the ideal-gas gun of constant bore,
 *   Anderson, *Modern Compressible Flow*, ch. 7; see `expansionBasePressure`). Chosen over a reservoir-fed entrance
 *   (Thuecks & Demas, Am. J. Phys. 87(2) (2019), model the intake aperture) because it needs no entrance geometry
 *   the campaign does not log, has a closed form and the published limiting speed 2c₀/(γ−1); it treats the air as
 *   a column already in a tube of the bore's size, which under-states the drive of an open entrance a little
 *   (a wider intake feeds the flow better): the fitted losses absorb that, and the page says so.
 * - **Residual air ahead**: the air left at `tubePressure` is compressed adiabatically and stays uniform
 *   (quasi-static, first law for an ideal gas, dp/dt = γ·(p·A_bore·v + R·T₀·ṁ)/V), until it reaches
 *   `exitSealPressure` and opens the exit; then the air ahead is pushed out at that pressure (its inertia and any
 *   shock ahead of the projectile are left out; at ball speeds near c₀ that is an approximation).
 * - **Sliding friction**: a constant effective force F against the motion (Coulomb friction; the effective value
 *   is fitted, common practice for a lumped loss).
 * - **Leak**: driving gas passes the projectile through an effective area A_leak as isentropic flow through an
 *   orifice from the gas just behind it (p_behind, T₀·(p_behind/P₀)^((γ−1)/γ)) to the air ahead, choked or not
 *   (Anderson ch. 5; see `orificeMassFlow`), bringing the outside air's stagnation enthalpy c_p·T₀ with it.
 *
 * The result carries an energy ledger the tests balance. The exit speed is a smooth function of the inputs (the
 * last step is cut to end exactly at the exit), so it can be differentiated numerically for a fit.
 */
export function simulateLauncherShot(options: LauncherShotOptions): LauncherShotResult {
  const {
    tubeLength: L, boreDiameter, mass: m, tubePressure = 0, ambientPressure: P0 = STANDARD_ATMOSPHERE,
    ambientTemperature: T0 = 293.15, gamma = GAMMA_AIR, gasConstant: R = R_AIR, frictionForce = 0, leakArea = 0,
    drive = 'unsteady-expansion', steps = 1000,
  } = options;
  const projectileDiameter = options.projectileDiameter ?? boreDiameter;
  assertPositiveQuantity('tubeLength', L, 'm');
  assertPositiveQuantity('boreDiameter', boreDiameter, 'm');
  assertPositiveQuantity('projectileDiameter', projectileDiameter, 'm');
  assertPositiveQuantity('mass', m, 'kg');
  assertPositiveQuantity('ambientPressure', P0, 'Pa');
  assertPositiveQuantity('ambientTemperature', T0, 'K');
  assertPositiveQuantity('gasConstant', R, 'J/(kg·K)');
  finiteNonNegative('tubePressure', tubePressure, 'Pa');
  finiteNonNegative('frictionForce', frictionForce, 'N');
  finiteNonNegative('leakArea', leakArea, 'm²');
  if (typeof gamma !== 'number' || !Number.isFinite(gamma) || !(gamma > 1)) throw new RangeError(`gamma must be a number greater than 1 (got ${gamma})`);
  if (!Number.isInteger(steps) || steps < 10) throw new RangeError(`steps must be a whole number of 10 or more (got ${steps})`);
  if (tubePressure > P0) throw new RangeError(`tubePressure (${tubePressure} Pa) is above ambientPressure (${P0} Pa): the outside air cannot drive the projectile`);
  const sealPressure = options.exitSealPressure ?? P0;
  if (!(sealPressure > tubePressure)) throw new RangeError(`exitSealPressure (${sealPressure} Pa) must be above tubePressure (${tubePressure} Pa)`);

  const areaBore = (Math.PI * boreDiameter * boreDiameter) / 4;
  const d = Math.min(projectileDiameter, boreDiameter);
  const area = (Math.PI * d * d) / 4;
  const c0 = Math.sqrt(gamma * R * T0);
  const cp = (gamma * R) / (gamma - 1);
  const tempExponent = (gamma - 1) / gamma;
  const constantDrive = drive === 'constant-pressure';

  // Set once the air ahead has reached the exit seal's pressure (found exactly, by cutting the step that crosses
  // it), so that no Runge–Kutta step mixes the two regimes.
  let vented = false;
  const rhs = (s: Float64Array, out: Float64Array) => {
    const x = s[X];
    const v = s[V] > 0 ? s[V] : 0;
    const pa = s[PA];
    const paEff = vented ? sealPressure : pa;
    const pb = constantDrive ? P0 : expansionBasePressure(v, P0, c0, gamma);
    let mdot = 0;
    if (leakArea > 0 && pb > paEff) {
      const tb = constantDrive ? T0 : T0 * (pb / P0) ** tempExponent;
      mdot = orificeMassFlow(leakArea, pb, tb, paEff, gamma, R);
    }
    const push = (pb - paEff) * area;
    // Sliding friction opposes motion; at rest it holds up to F (static friction taken equal to sliding).
    const net = v > 0 ? push - frictionForce : Math.max(0, push - frictionForce);
    const volume = areaBore * (L - x);
    out[X] = v;
    out[V] = net / m;
    out[PA] = vented ? 0 : volume > 0 ? (gamma * (pa * areaBore * v + R * T0 * mdot)) / volume : 0;
    out[WD] = pb * area * v;
    out[WA] = paEff * area * v;
    out[WF] = v > 0 ? frictionForce * v : 0;
    out[ML] = mdot;
    out[HL] = cp * T0 * mdot;
    out[EV] = vented ? (gamma / (gamma - 1)) * paEff * areaBore * v + cp * T0 * mdot : 0;
  };

  const k1 = new Float64Array(N), k2 = new Float64Array(N), k3 = new Float64Array(N), k4 = new Float64Array(N), tmp = new Float64Array(N);
  /** One classical RK4 step of size h from `from` into `to`; k1 must already hold the derivatives at `from`. */
  const step = (from: Float64Array, h: number, to: Float64Array) => {
    for (let i = 0; i < N; i++) tmp[i] = from[i] + 0.5 * h * k1[i];
    rhs(tmp, k2);
    for (let i = 0; i < N; i++) tmp[i] = from[i] + 0.5 * h * k2[i];
    rhs(tmp, k3);
    for (let i = 0; i < N; i++) tmp[i] = from[i] + h * k3[i];
    rhs(tmp, k4);
    for (let i = 0; i < N; i++) to[i] = from[i] + (h / 6) * (k1[i] + 2 * k2[i] + 2 * k3[i] + k4[i]);
  };

  const state = new Float64Array(N);
  state[PA] = tubePressure;
  const next = new Float64Array(N);
  const u0 = (tubePressure * areaBore * L) / (gamma - 1);
  const ledger = (s: Float64Array, v: number): LauncherShotEnergy => ({
    driving: s[WD], ahead: s[WA], friction: s[WF], kinetic: 0.5 * m * v * v, leakedMass: s[ML], leakedEnthalpy: s[HL],
    aheadInternal: (Math.min(s[PA], sealPressure) * areaBore * (L - s[X])) / (gamma - 1) - u0, vented: s[EV],
  });

  const startForce = (P0 - tubePressure) * area - frictionForce;
  if (!(startForce > 0)) {
    return { exitSpeed: 0, reachedExit: false, transitTime: 0, stallPosition: 0, exitSealOpenedAt: null, energy: ledger(state, 0) };
  }
  const dt = (Math.sqrt((2 * L * m) / (P0 * area)) + (constantDrive ? 0 : (L * (gamma - 1)) / (2 * c0))) / steps;
  // A very light projectile gains most of its speed in a tiny fraction of the transit: no step may add more than
  // a few per cent of the reachable speed (the zeroth-order speed, or the escape speed when lower).
  const reachable = Math.min(Math.sqrt((2 * P0 * area * L) / m), constantDrive ? Infinity : (2 * c0) / (gamma - 1));
  const maxGain = (4 * reachable) / steps;
  let t = 0;
  let sealOpenedAt: number | null = null;
  for (let n = 0; n < 200 * steps; n++) {
    rhs(state, k1); // k1 stays valid for every trial step from this state below
    const h = Math.min(dt, maxGain / Math.max(Math.abs(k1[V]), 1e-300));
    step(state, h, next);
    if (!vented && next[PA] >= sealPressure && next[X] < L) {
      // Cut the step where the air ahead reaches the seal's pressure (secant on the step length), then vent.
      let a = 0, pa0 = state[PA] - sealPressure, b = h, pb = next[PA] - sealPressure;
      for (let i = 0; i < 30 && Math.abs(pb) > 1e-9 * sealPressure; i++) {
        const c = b - (pb * (b - a)) / (pb - pa0);
        step(state, c, next);
        a = b; pa0 = pb; b = c; pb = next[PA] - sealPressure;
      }
      step(state, b, next);
      next[PA] = sealPressure;
      vented = true;
      sealOpenedAt = next[X];
      state.set(next);
      t += b;
      continue;
    }
    if (next[X] >= L) {
      // Cut the last step so that it ends at the exit: Newton on the step length, x(h) − L = 0, dx/dh = v.
      let cut = ((L - state[X]) / (next[X] - state[X])) * h;
      for (let i = 0; i < 8; i++) {
        step(state, cut, next);
        const miss = next[X] - L;
        cut -= miss / Math.max(next[V], 1e-12);
        if (Math.abs(miss) < 1e-13 * L) break;
      }
      step(state, cut, next);
      return { exitSpeed: next[V], reachedExit: true, transitTime: t + cut, stallPosition: null, exitSealOpenedAt: sealOpenedAt, energy: ledger(next, next[V]) };
    }
    if (next[V] <= 0) {
      return { exitSpeed: 0, reachedExit: false, transitTime: t + h, stallPosition: next[X], exitSealOpenedAt: sealOpenedAt, energy: ledger(next, 0) };
    }
    state.set(next);
    t += h;
  }
  return { exitSpeed: 0, reachedExit: false, transitTime: t, stallPosition: state[X], exitSealOpenedAt: sealOpenedAt, energy: ledger(state, 0) };
}
