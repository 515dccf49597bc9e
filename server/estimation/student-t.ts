/**
 * Student t quantiles for non-integer degrees of freedom (the Welch–Satterthwaite predictive bands
 * of forecast.ts, docs/forecasting.md §6). The distribution function through the regularised
 * incomplete beta function, P(T ≤ t) = 1 − ½·I_{ν/(ν+t²)}(ν/2, ½) for t ≥ 0 (Abramowitz & Stegun
 * 26.7.1), evaluated by its continued fraction with the modified Lentz method, log Γ by Lanczos'
 * series (g = 7, 9 terms); the quantile by safeguarded Newton steps on that function.
 * Checked against SciPy's `scipy.stats.t.ppf` (student-t.test.ts).
 */

const LANCZOS = [
  0.99999999999980993, 676.5203681218851, -1259.1392167224028, 771.32342877765313, -176.61502916214059, 12.507343278686905, -0.13857109526572012,
  9.9843695780195716e-6, 1.5056327351493116e-7,
];

/** ln Γ(x) for x > 0. */
export function logGamma(x: number): number {
  if (x < 0.5) return Math.log(Math.PI / Math.sin(Math.PI * x)) - logGamma(1 - x);
  const z = x - 1;
  let a = LANCZOS[0]!;
  const t = z + 7.5;
  for (let i = 1; i < 9; i++) a += LANCZOS[i]! / (z + i);
  return 0.5 * Math.log(2 * Math.PI) + (z + 0.5) * Math.log(t) - t + Math.log(a);
}

/** Continued fraction of the incomplete beta function (modified Lentz). */
function betaFraction(x: number, a: number, b: number): number {
  const tiny = 1e-300;
  let c = 1;
  let d = 1 - ((a + b) * x) / (a + 1);
  if (Math.abs(d) < tiny) d = tiny;
  d = 1 / d;
  let h = d;
  for (let m = 1; m <= 10000; m++) {
    const m2 = 2 * m;
    let aa = (m * (b - m) * x) / ((a + m2 - 1) * (a + m2));
    d = 1 + aa * d;
    if (Math.abs(d) < tiny) d = tiny;
    c = 1 + aa / c;
    if (Math.abs(c) < tiny) c = tiny;
    d = 1 / d;
    h *= d * c;
    aa = (-(a + m) * (a + b + m) * x) / ((a + m2) * (a + m2 + 1));
    d = 1 + aa * d;
    if (Math.abs(d) < tiny) d = tiny;
    c = 1 + aa / c;
    if (Math.abs(c) < tiny) c = tiny;
    d = 1 / d;
    const del = d * c;
    h *= del;
    if (Math.abs(del - 1) < 1e-15) break;
  }
  return h;
}

/** Regularised incomplete beta I_x(a, b). */
export function incompleteBeta(x: number, a: number, b: number): number {
  if (x <= 0) return 0;
  if (x >= 1) return 1;
  const lnFront = logGamma(a + b) - logGamma(a) - logGamma(b) + a * Math.log(x) + b * Math.log(1 - x);
  if (x < (a + 1) / (a + b + 2)) return (Math.exp(lnFront) * betaFraction(x, a, b)) / a;
  return 1 - (Math.exp(lnFront) * betaFraction(1 - x, b, a)) / b;
}

/** P(T ≤ t) for Student's t with ν > 0 degrees of freedom. */
export function studentTCdf(t: number, nu: number): number {
  if (!Number.isFinite(nu)) return normalCdf(t);
  const tail = 0.5 * incompleteBeta(nu / (nu + t * t), nu / 2, 0.5);
  return t >= 0 ? 1 - tail : tail;
}

/** Density of Student's t. */
function studentTDensity(t: number, nu: number): number {
  return Math.exp(logGamma((nu + 1) / 2) - logGamma(nu / 2) - 0.5 * Math.log(nu * Math.PI) - ((nu + 1) / 2) * Math.log(1 + (t * t) / nu));
}

/** Standard normal distribution function. */
function normalCdf(x: number): number {
  return 0.5 * erfc(-x / Math.SQRT2);
}

/** erfc with relative error below 1.2e-7 (Numerical Recipes' Chebyshev fit, erfcc). */
function erfc(x: number): number {
  const z = Math.abs(x);
  const t = 1 / (1 + 0.5 * z);
  const r =
    t *
    Math.exp(-z * z - 1.26551223 + t * (1.00002368 + t * (0.37409196 + t * (0.09678418 + t * (-0.18628806 + t * (0.27886807 + t * (-1.13520398 + t * (1.48851587 + t * (-0.82215223 + t * 0.17087277)))))))));
  return x >= 0 ? r : 2 - r;
}

/**
 * The p-quantile of Student's t with ν degrees of freedom (ν > 0, non-integer allowed; ν = ∞ gives
 * the normal quantile, to about 1e-7 relative). Accurate to about 1e-10 relative for ν ≥ 1.
 */
export function studentTQuantile(p: number, nu: number): number {
  if (!(p > 0 && p < 1)) throw new RangeError(`studentTQuantile: p must lie in (0, 1), got ${p}`);
  if (!(nu > 0)) throw new RangeError(`studentTQuantile: degrees of freedom must be positive, got ${nu}`);
  if (p === 0.5) return 0;
  if (p < 0.5) return -studentTQuantile(1 - p, nu);
  const normal = !Number.isFinite(nu) || nu > 1e7;
  const cdf = (x: number): number => (normal ? normalCdf(x) : studentTCdf(x, nu));
  const density = (x: number): number => (normal ? Math.exp(-0.5 * x * x) / Math.sqrt(2 * Math.PI) : studentTDensity(x, nu));
  // bracket [lo, hi] with F(lo) ≤ p ≤ F(hi), then Newton steps kept inside the bracket
  let lo = 0;
  let hi = 1;
  while (cdf(hi) < p) {
    lo = hi;
    hi *= 2;
    if (hi > 1e300) return Infinity;
  }
  let t = 0.5 * (lo + hi);
  for (let it = 0; it < 200; it++) {
    const f = cdf(t) - p;
    if (f > 0) hi = t;
    else lo = t;
    const step = f / density(t);
    let next = t - step;
    if (!(next > lo && next < hi)) next = 0.5 * (lo + hi);
    if (Math.abs(next - t) <= 1e-13 * Math.max(1, Math.abs(t))) return next;
    t = next;
  }
  return t;
}

/** The standard normal p-quantile (the t quantile's limit). */
export function normalQuantile(p: number): number {
  return studentTQuantile(p, Infinity);
}
