import type { BudgetLine, MeasurementModel } from './measurement-model.ts';

export interface LinearPropagation {
  /** y = f(x̂). */
  value: number;
  /** Combined standard uncertainty u_c(y). */
  standardUncertainty: number;
  /** Contributions grouped by budget line, largest first. */
  budget: BudgetLine[];
}

/**
 * Law of propagation of uncertainty for uncorrelated inputs, JCGM 100:2008 (GUM) §5.1.2 eq. (10):
 * u_c²(y) = Σ (∂f/∂xᵢ)² u²(xᵢ). The sensitivity coefficients are evaluated numerically by central differences
 * over ±u(xᵢ), as the GUM allows for sensitivity coefficients (§5.1.3, from memory), so any model written as a plain function can be propagated.
 */
export function propagateUncertainty(model: MeasurementModel): LinearPropagation {
  const { inputs, evaluate } = model;
  const x = new Float64Array(inputs.length);
  for (let i = 0; i < inputs.length; i++) x[i] = inputs[i].value;
  const value = evaluate(x);
  if (!Number.isFinite(value)) throw new RangeError('the measurement model is not finite at the input estimates');
  const groups = new Map<string, number>();
  let total = 0;
  for (let i = 0; i < inputs.length; i++) {
    const u = inputs[i].standardUncertainty;
    if (!(u >= 0)) throw new RangeError(`input "${inputs[i].name}" has no valid standard uncertainty`);
    let term = 0;
    if (u > 0) {
      x[i] = inputs[i].value + u;
      const up = evaluate(x);
      x[i] = inputs[i].value - u;
      const down = evaluate(x);
      x[i] = inputs[i].value;
      term = (up - down) / 2; // = cᵢ·u(xᵢ)
    }
    const variance = term * term;
    total += variance;
    groups.set(inputs[i].group, (groups.get(inputs[i].group) ?? 0) + variance);
  }
  const budget: BudgetLine[] = [...groups.entries()]
    .map(([group, variance]) => ({ group, contribution: Math.sqrt(variance), share: total > 0 ? variance / total : 0 }))
    .sort((a, b) => b.contribution - a.contribution);
  return { value, standardUncertainty: Math.sqrt(total), budget };
}
