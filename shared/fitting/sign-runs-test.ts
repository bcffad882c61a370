export interface SignRunsTest {
  /** Runs of equal sign in the order given. */
  runs: number;
  /** Expected runs for these counts of positive and negative values in random order, 2·n₊·n₋/n + 1. */
  expected: number;
  /** Exact probability of this few runs or fewer in random order (null when all values have one sign). */
  probability: number | null;
}

function choose(n: number, k: number): number {
  if (k < 0 || k > n) return 0;
  let r = 1;
  for (let i = 1; i <= k; i++) r = (r * (n - k + i)) / i;
  return r;
}

/**
 * Wald–Wolfowitz runs test on the signs of residuals in a chosen order (Wald & Wolfowitz, Ann. Math. Stat. 11, 147
 * (1940)): too few runs mean the residuals come in blocks, a sign that the model misses a trend. The probability is
 * exact, by counting arrangements: with n₁ and n₂ values of each sign, 2·C(n₁−1, k−1)·C(n₂−1, k−1) of the
 * C(n₁+n₂, n₁) orders have 2k runs and C(n₁−1, k−1)·C(n₂−1, k) + C(n₁−1, k)·C(n₂−1, k−1) have 2k+1. Zeros count as
 * neither sign and are skipped.
 */
export function signRunsTest(values: readonly number[]): SignRunsTest {
  const signs = values.filter((v) => v !== 0 && Number.isFinite(v)).map((v) => v > 0);
  const n1 = signs.filter(Boolean).length;
  const n2 = signs.length - n1;
  let runs = signs.length > 0 ? 1 : 0;
  for (let i = 1; i < signs.length; i++) if (signs[i] !== signs[i - 1]) runs++;
  const n = n1 + n2;
  const expected = n > 0 ? (2 * n1 * n2) / n + 1 : 0;
  if (n1 === 0 || n2 === 0) return { runs, expected, probability: null };
  let ways = 0;
  for (let r = 2; r <= runs; r++) {
    const k = Math.floor(r / 2);
    ways += r % 2 === 0
      ? 2 * choose(n1 - 1, k - 1) * choose(n2 - 1, k - 1)
      : choose(n1 - 1, k - 1) * choose(n2 - 1, k) + choose(n1 - 1, k) * choose(n2 - 1, k - 1);
  }
  return { runs, expected, probability: ways / choose(n, n1) };
}
