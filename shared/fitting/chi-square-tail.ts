/** ln Γ(x) for x > 0, Lanczos approximation (Numerical Recipes, 3rd ed., §6.1, `gammln`). */
function logGamma(x: number): number {
  const cof = [57.15623566586292, -59.59796035547549, 14.136097974741746, -0.4919138160976202,
    0.00003399464998481189, 0.00004652362892704858, -0.00009837447530487956, 0.0001580887032249125,
    -0.00021026444172410488, 0.00021743961811521265, -0.0001643181065367639, 0.00008441822398385275,
    -0.000026190838401581408, 0.0000036899182659531625];
  let y = x;
  const tmp = x + 5.2421875 - (x + 0.5) * Math.log(x + 5.2421875);
  let ser = 0.9999999999999971;
  for (const c of cof) ser += c / ++y;
  return -tmp + Math.log((2.5066282746310007 * ser) / x);
}

/**
 * Probability that a χ² variable with ν degrees of freedom is at least `chiSquare`: Q(ν/2, χ²/2), the regularized
 * upper incomplete gamma function, by its series below a + 1 and its continued fraction above (Numerical Recipes,
 * 3rd ed., §6.2 and §14.3.2). A small value says the residuals are larger than the stated uncertainties allow.
 */
export function chiSquareTail(chiSquare: number, dof: number): number {
  if (!Number.isInteger(dof) || dof < 1) throw new RangeError(`dof must be a whole number of 1 or more (got ${dof})`);
  if (!(chiSquare >= 0)) throw new RangeError(`chiSquare must be 0 or more (got ${chiSquare})`);
  const a = dof / 2;
  const x = chiSquare / 2;
  if (x === 0) return 1;
  const lnPrefix = a * Math.log(x) - x - logGamma(a);
  if (x < a + 1) {
    let term = 1 / a;
    let sum = term;
    for (let n = 1; n < 1000; n++) {
      term *= x / (a + n);
      sum += term;
      if (Math.abs(term) < Math.abs(sum) * 1e-16) break;
    }
    return Math.max(0, 1 - sum * Math.exp(lnPrefix));
  }
  // Modified Lentz continued fraction for Q(a, x).
  const tiny = 1e-300;
  let b = x + 1 - a;
  let c = 1 / tiny;
  let d = 1 / b;
  let h = d;
  for (let i = 1; i < 1000; i++) {
    const an = -i * (i - a);
    b += 2;
    d = an * d + b;
    if (Math.abs(d) < tiny) d = tiny;
    c = b + an / c;
    if (Math.abs(c) < tiny) c = tiny;
    d = 1 / d;
    const delta = d * c;
    h *= delta;
    if (Math.abs(delta - 1) < 1e-16) break;
  }
  return Math.exp(lnPrefix) * h;
}
