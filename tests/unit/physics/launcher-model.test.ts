// The zeroth-order vacuum-cannon model against its published equation, with numbers worked by hand (not by the
// code under test): Ayars & Buchholtz, "Analysis of the vacuum cannon", Am. J. Phys. 72(7), 961 (2004),
// v = √(2·P₀·A·L/m). Reference speeds of sound from the U.S. Standard Atmosphere 1976 (c = √(γRT), γ = 1.40,
// R = 287.053 J/(kg·K)), as quoted in ../shared/DOMAIN.md; the gas-dynamic limit 2c₀/(γ−1) from Anderson,
// *Modern Compressible Flow* (≈ 1716 m/s at 20 °C, as quoted in DOMAIN.md).
import { describe, expect, it } from 'vitest';
import { launcherModel } from '../../../shared/physics/launcher-model.ts';

// A table-tennis ball: 40 mm, 2.7 g (ITTF Laws 2.3.1–2.3.2) in a bore it just fills.
const ball = { boreDiameter: 0.040, mass: 0.0027 };

describe('launcherModel (Ayars & Buchholtz 2004, zeroth order)', () => {
  it('When a 40 mm, 2.7 g ball is driven 1 m by one standard atmosphere into a hard vacuum, then v ≈ 307.11 m/s', () => {
    // Worked by hand: A = π·(0.020 m)² = 1.256637×10⁻³ m²; F = 101 325 Pa · A = 127.329 N;
    // v = √(2 · 127.329 J / 0.0027 kg) = √94 318 = 307.11 m/s. (1 atm = 101 325 Pa: ISO 2533 / USSA 1976.)
    const p = launcherModel({ ...ball, tubeLength: 1 });
    expect(p.boreArea).toBeCloseTo(1.256637e-3, 9);
    expect(p.pressureDifference).toBe(101_325);
    expect(p.speed).toBeCloseTo(307.11, 2);
  });

  it('When the tube is twice as long, then the speed grows by √2 (v ∝ √L in the published equation): 434.32 m/s for 2 m', () => {
    // By hand: √(2 · 127.329 · 2 / 0.0027) = √188 636 = 434.32 m/s.
    expect(launcherModel({ ...ball, tubeLength: 2 }).speed).toBeCloseTo(434.32, 2);
  });

  it('When 1 kPa is left in the tube, then only the difference drives the ball: P₀ = 100 325 Pa, v ≈ 305.59 m/s', () => {
    // By hand: F = 100 325 · 1.256637×10⁻³ = 126.072 N; v = √(2 · 126.072 / 0.0027) = √93 387 = 305.59 m/s.
    const p = launcherModel({ ...ball, tubeLength: 1, tubePressure: 1000 });
    expect(p.pressureDifference).toBe(100_325);
    expect(p.speed).toBeCloseTo(305.59, 2);
  });

  it('When the tube is at ambient pressure, then nothing drives the ball (v = 0) and no length reaches the speed of sound', () => {
    const p = launcherModel({ ...ball, tubeLength: 1, tubePressure: 101_325 });
    expect(p.speed).toBe(0);
    expect(p.soundSpeedLength).toBe(Infinity);
  });

  it('Then the speed of sound of the outside air matches USSA 1976 at 0, 15 and 20 °C', () => {
    // USSA 1976 (quoted in DOMAIN.md): c(0 °C) = 331.32 m/s, c(15 °C) = 340.294 m/s, c(20 °C) = 343.23 m/s.
    expect(launcherModel({ ...ball, tubeLength: 1, ambientTemperature: 273.15 }).speedOfSound).toBeCloseTo(331.32, 2);
    expect(launcherModel({ ...ball, tubeLength: 1, ambientTemperature: 288.15 }).speedOfSound).toBeCloseTo(340.294, 3);
    expect(launcherModel({ ...ball, tubeLength: 1 }).speedOfSound).toBeCloseTo(343.23, 2);
  });

  it('Then the gas-dynamic limit 2c₀/(γ−1) is ≈ 1716 m/s at 20 °C (Anderson, Modern Compressible Flow)', () => {
    // By hand: 2 · 343.23 / 0.4 = 1716.2 m/s.
    expect(launcherModel({ ...ball, tubeLength: 1 }).gasDynamicLimit).toBeCloseTo(1716.2, 1);
  });

  it('Then the tube length where the zeroth-order speed reaches c is m·c²/(2·P₀·A) ≈ 1.249 m, and a longer tube predicts more than c', () => {
    // By hand: 0.0027 · 343.234² / (2 · 127.329) = 318.08 / 254.66 = 1.2491 m. Ayars & Buchholtz's point that the
    // zeroth-order model over-predicts long tubes: past this length it even exceeds the speed of sound.
    const p = launcherModel({ ...ball, tubeLength: 1 });
    expect(p.soundSpeedLength).toBeCloseTo(1.2491, 3);
    const long = launcherModel({ ...ball, tubeLength: 1.3 });
    expect(long.speed).toBeGreaterThan(long.speedOfSound);
  });

  it('When an input is out of range or not a number, then it throws with a message that names it', () => {
    expect(() => launcherModel({ ...ball, tubeLength: 0 })).toThrow(new RangeError('tubeLength must be greater than 0 m (got 0)'));
    expect(() => launcherModel({ ...ball, tubeLength: Number.NaN })).toThrow(new TypeError('tubeLength must be a finite number of m'));
    expect(() => launcherModel({ ...ball, mass: -1, tubeLength: 1 })).toThrow(new RangeError('mass must be greater than 0 kg (got -1)'));
    expect(() => launcherModel({ ...ball, tubeLength: 1, tubePressure: 200_000 })).toThrow(
      new RangeError('tubePressure (200000 Pa) is above ambientPressure (101325 Pa): the outside air cannot drive the ball'),
    );
    expect(() => launcherModel({ ...ball, tubeLength: 1, tubePressure: -5 })).toThrow(new RangeError('tubePressure must be 0 Pa or more (got -5)'));
    expect(() => launcherModel({ ...ball, tubeLength: 1, gamma: 1 })).toThrow(new RangeError('gamma must be greater than 1 (got 1)'));
  });
});
