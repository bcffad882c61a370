export interface ConstantDecelerationFit {
  /** Position at tRef, m. */
  position: number;
  /** Speed at tRef, m/s. */
  speed: number;
  /** Deceleration (positive = slowing), m/s². */
  deceleration: number;
}

/**
 * Weighted least-squares fit of x(t) = x₀ + v·(t − tRef) − (a/2)·(t − tRef)² to gate positions against
 * crossing instants (constant-deceleration model; weighted linear least squares, e.g. Bevington & Robinson,
 * Data Reduction and Error Analysis). Weights are 1/σ² of each point expressed in position.
 * With exactly three points the fit passes through them. Solves the 3×3 normal equations directly, with time
 * scaled to the span so they stay well conditioned.
 */
export function fitConstantDeceleration(
  times: ArrayLike<number>,
  positions: ArrayLike<number>,
  weights: ArrayLike<number>,
  tRef: number,
): ConstantDecelerationFit {
  const n = times.length;
  if (n < 3) throw new RangeError('a constant-deceleration fit needs at least 3 gates');
  if (positions.length !== n || weights.length !== n) throw new RangeError('times, positions and weights must have the same length');
  let span = 0;
  for (let i = 0; i < n; i++) span = Math.max(span, Math.abs(times[i] - tRef));
  if (!(span > 0)) throw new RangeError('the gate instants must differ');
  // Normal equations for p = [c0, c1, c2] in x = c0 + c1·s + c2·s², s = (t − tRef)/span.
  const m = [0, 0, 0, 0, 0, 0, 0, 0, 0];
  const r = [0, 0, 0];
  for (let i = 0; i < n; i++) {
    const w = weights[i];
    if (!(w > 0)) throw new RangeError('weights must be positive');
    const s = (times[i] - tRef) / span;
    const basis = [1, s, s * s];
    for (let j = 0; j < 3; j++) {
      r[j] += w * basis[j] * positions[i];
      for (let k = 0; k < 3; k++) m[3 * j + k] += w * basis[j] * basis[k];
    }
  }
  const det3 = (a: number[]): number =>
    a[0] * (a[4] * a[8] - a[5] * a[7]) - a[1] * (a[3] * a[8] - a[5] * a[6]) + a[2] * (a[3] * a[7] - a[4] * a[6]);
  const d = det3(m);
  if (!(Math.abs(d) > 0)) throw new RangeError('the gate instants do not determine a constant-deceleration fit');
  // Cramer's rule: three unknowns, so this is simpler and as accurate as an elimination here.
  const solve = (col: number): number => {
    const a = m.slice();
    for (let j = 0; j < 3; j++) a[3 * j + col] = r[j];
    return det3(a) / d;
  };
  const c0 = solve(0);
  const c1 = solve(1);
  const c2 = solve(2);
  return { position: c0, speed: c1 / span, deceleration: (-2 * c2) / (span * span) };
}
