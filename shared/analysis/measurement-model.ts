/** One input quantity of a measurement model (JCGM 100:2008): its estimate and standard uncertainty. */
export interface ModelInput {
  /** What it is ("CH2 entry: noise jitter"). */
  name: string;
  /** Budget line it is reported under ("noise jitter"). */
  group: string;
  /** Best estimate (0 for a correction whose expectation is zero). */
  value: number;
  /** Standard uncertainty u(xᵢ), in the input's unit. */
  standardUncertainty: number;
  /** Distribution assigned to the input, used by the Monte Carlo propagation (JCGM 101:2008). */
  distribution: 'normal' | 'rectangular';
}

/** A measurement model Y = f(X₁, …, X_N): its inputs and a function of their values, in input order. */
export interface MeasurementModel {
  inputs: ModelInput[];
  evaluate: (x: Float64Array) => number;
}

/** One line of an uncertainty budget: the root-sum-square of |cᵢ|·u(xᵢ) over the inputs of a group. */
export interface BudgetLine {
  group: string;
  /** Contribution to the output's standard uncertainty, in the output's unit. */
  contribution: number;
  /** Share of the output's variance, 0–1. */
  share: number;
}
