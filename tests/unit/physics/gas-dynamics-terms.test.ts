// The two gas-dynamic terms of the launcher model against values computed by hand (Python, not the code under test):
// - base pressure behind a projectile at v through a centred expansion, p = p₀·(1 − (γ−1)/2·v/c₀)^(2γ/(γ−1))
//   (Anderson, *Modern Compressible Flow*, ch. 7; from memory): at 100 m/s in air at 20 °C (c₀ = 343.234 m/s,
//   USSA 1976 constants) p/p₀ = (1 − 0.2·100/343.234)⁷ = 0.656881; zero at 2c₀/(γ−1) = 1716.17 m/s;
// - isentropic orifice flow (Anderson ch. 5; from memory): choked, ṁ = 0.684731·A·p₁/√(R·T₁) for γ = 1.4
//   (√γ·(2/(γ+1))^((γ+1)/(2(γ−1))) = 0.684731), critical pressure ratio 0.528282 (standard isentropic tables give
//   0.5283); through 1 mm² from 101 325 Pa, 293.15 K: choked 2.39172×10⁻⁴ kg/s, at p₂/p₁ = 0.9 1.47605×10⁻⁴ kg/s.
import { describe, expect, it } from 'vitest';
import { expansionBasePressure } from '../../../shared/physics/expansion-base-pressure.ts';
import { orificeMassFlow } from '../../../shared/physics/orifice-mass-flow.ts';

const c0 = Math.sqrt(1.4 * 287.053 * 293.15);

describe('expansionBasePressure', () => {
  it('When the projectile is at rest, at 100 m/s and at the escape speed, then p/p₀ is 1, 0.656881 and 0', () => {
    expect(expansionBasePressure(0, 101_325, c0, 1.4)).toBe(101_325);
    expect(expansionBasePressure(100, 1, c0, 1.4)).toBeCloseTo(0.656881, 6);
    expect(expansionBasePressure(1716.17, 1, c0, 1.4)).toBeLessThan(1e-20);
    expect(expansionBasePressure(2000, 1, c0, 1.4)).toBe(0);
  });
  it('When the driving gas is infinitely fast (c₀ = ∞), then the full pressure acts at any speed (the zeroth-order drive)', () => {
    expect(expansionBasePressure(400, 101_325, Infinity, 1.4)).toBe(101_325);
  });
});

describe('orificeMassFlow', () => {
  const T = 293.15;
  it('When the flow is choked, then ṁ = 0.684731·A·p₁/√(R·T₁): 2.39172×10⁻⁴ kg/s through 1 mm²', () => {
    expect(orificeMassFlow(1e-6, 101_325, T, 0, 1.4, 287.053)).toBeCloseTo(2.39172e-4, 9);
    expect(orificeMassFlow(1e-6, 101_325, T, 40_000, 1.4, 287.053)).toBeCloseTo(2.39172e-4, 9);
  });
  it('When p₂/p₁ = 0.9, then the unchoked flow is 1.47605×10⁻⁴ kg/s', () => {
    expect(orificeMassFlow(1e-6, 101_325, T, 0.9 * 101_325, 1.4, 287.053)).toBeCloseTo(1.47605e-4, 9);
  });
  it('When the pressure ratio passes the critical 0.528282, then the flow is continuous', () => {
    const at = (r: number) => orificeMassFlow(1e-6, 101_325, T, r * 101_325, 1.4, 287.053);
    expect(at(0.528282 + 1e-7) / at(0.528282 - 1e-7)).toBeCloseTo(1, 6);
  });
  it('When there is no area or no pressure drop, then nothing flows', () => {
    expect(orificeMassFlow(0, 101_325, T, 0, 1.4, 287.053)).toBe(0);
    expect(orificeMassFlow(1e-6, 50_000, T, 60_000, 1.4, 287.053)).toBe(0);
  });
});
