/**
 * Mass flow of an ideal gas through a small opening, from an upstream state (p₁, T₁) at rest relative to the
 * opening into a downstream pressure p₂, by steady isentropic flow to the throat (Anderson, *Modern Compressible
 * Flow*, ch. 5, quasi-one-dimensional flow; equations quoted from memory):
 *
 * - unchoked, p₂/p₁ above the critical ratio (2/(γ+1))^(γ/(γ−1)) (0.5283 for γ = 1.4):
 *   ṁ = A·p₁·√(2γ/((γ−1)·R·T₁)) · √((p₂/p₁)^(2/γ) − (p₂/p₁)^((γ+1)/γ));
 * - choked: ṁ = A·p₁·√(γ/(R·T₁)) · (2/(γ+1))^((γ+1)/(2(γ−1))) (0.6847·A·p₁/√(R·T₁) for γ = 1.4).
 *
 * The two agree at the critical ratio, so the flow is continuous in p₂. A discharge coefficient is not applied: an
 * area fitted from shots is an effective area that includes it.
 *
 * @param area - opening area A ≥ 0, m²
 * @param upstreamPressure - p₁, Pa
 * @param upstreamTemperature - T₁, K
 * @param downstreamPressure - p₂, Pa (no flow when p₂ ≥ p₁)
 * @param gamma - ratio of specific heats
 * @param gasConstant - specific gas constant R, J/(kg·K)
 * @returns mass flow, kg/s (≥ 0)
 */
export function orificeMassFlow(area: number, upstreamPressure: number, upstreamTemperature: number, downstreamPressure: number, gamma: number, gasConstant: number): number {
  if (!(area > 0) || !(upstreamPressure > downstreamPressure) || !(upstreamPressure > 0)) return 0;
  const ratio = Math.max(0, downstreamPressure / upstreamPressure);
  const critical = (2 / (gamma + 1)) ** (gamma / (gamma - 1));
  const rt = gasConstant * upstreamTemperature;
  if (ratio <= critical) {
    return area * upstreamPressure * Math.sqrt(gamma / rt) * (2 / (gamma + 1)) ** ((gamma + 1) / (2 * (gamma - 1)));
  }
  return area * upstreamPressure * Math.sqrt(((2 * gamma) / ((gamma - 1) * rt)) * (ratio ** (2 / gamma) - ratio ** ((gamma + 1) / gamma)));
}
