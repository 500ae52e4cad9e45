/**
 * Gauss–Legendre quadrature on [−1, 1] for an even number of nodes, returned as the positive half
 * (the rule is symmetric: nodes ±t_i share the weight w_i).
 *
 * Nodes are the roots of the Legendre polynomial P_n, found by Newton's method on the three-term
 * recurrence (n+1)P_{n+1} = (2n+1)xP_n − nP_{n−1} (Abramowitz & Stegun 22.7.10), started from
 * Tricomi's asymptotic estimate cos(π(i + 3/4)/(n + 1/2)); weights w_i = 2/((1 − t_i²) P_n'(t_i)²)
 * (Abramowitz & Stegun 25.4.29). Cost O(n²) per rule; rules are cached.
 */

export interface HalfRule {
  /** Number of nodes of the full rule (even). */
  n: number;
  /** Positive nodes t_i ∈ (0, 1), ascending; length n/2. */
  t: Float64Array;
  /** Weights of ±t_i (each); Σ 2·w_i = 2. */
  w: Float64Array;
}

const cache = new Map<number, HalfRule>();
const CACHE_LIMIT = 256;

/** Largest rule this module builds; larger requests are a sign of a scene the reference cannot handle. */
export const MAX_GAUSS_LEGENDRE_NODES = 16384;

/** Evaluate P_n(x) and P_n'(x) by the recurrence; returns [P_n, P_n']. */
function legendre(n: number, x: number, out: Float64Array): void {
  let p0 = 1;
  let p1 = x;
  for (let j = 2; j <= n; j++) {
    const p2 = ((2 * j - 1) * x * p1 - (j - 1) * p0) / j;
    p0 = p1;
    p1 = p2;
  }
  out[0] = p1;
  // P_n'(x) = n (x P_n − P_{n−1}) / (x² − 1)   (Abramowitz & Stegun 22.8.5)
  out[1] = (n * (x * p1 - p0)) / (x * x - 1);
}

/** Positive half of the n-point Gauss–Legendre rule on [−1, 1]; n must be even and ≥ 2. */
export function gaussLegendreHalf(n: number): HalfRule {
  if (!Number.isInteger(n) || n < 2 || n % 2 !== 0) {
    throw new RangeError(`Gauss–Legendre rule needs an even node count ≥ 2; got ${n}`);
  }
  if (n > MAX_GAUSS_LEGENDRE_NODES) {
    throw new RangeError(`Gauss–Legendre rule of ${n} nodes exceeds the limit of ${MAX_GAUSS_LEGENDRE_NODES}`);
  }
  const hit = cache.get(n);
  if (hit) return hit;
  const half = n / 2;
  const t = new Float64Array(half);
  const w = new Float64Array(half);
  const pd = new Float64Array(2);
  for (let i = 0; i < half; i++) {
    // i = 0 is the largest root.
    let x = Math.cos((Math.PI * (i + 0.75)) / (n + 0.5));
    // Newton converges quadratically from this start; once a step is below 1e-12 one more
    // step reaches full double precision.
    for (let it = 0; it < 50; it++) {
      legendre(n, x, pd);
      const dx = pd[0] / pd[1];
      x -= dx;
      if (Math.abs(dx) < 1e-12) {
        legendre(n, x, pd);
        x -= pd[0] / pd[1];
        break;
      }
    }
    legendre(n, x, pd);
    t[half - 1 - i] = x;
    w[half - 1 - i] = 2 / ((1 - x * x) * pd[1] * pd[1]);
  }
  const rule: HalfRule = { n, t, w };
  if (cache.size >= CACHE_LIMIT) {
    const first = cache.keys().next();
    if (!first.done) cache.delete(first.value);
  }
  cache.set(n, rule);
  return rule;
}

/**
 * Node count for a Gauss–Legendre rule on [−1, 1] integrating an integrand whose phase (plus
 * log-amplitude) changes at most at rate `omega` (radians per unit of the [−1, 1] variable).
 * Legendre coefficients of e^{iΩt} decay super-exponentially beyond degree Ω + O(Ω^{1/3}), and the
 * n-point rule is exact to degree 2n − 1; the constants below were calibrated on e^{iΩt}
 * (normal: error ~1e-11, high: ~1e-14 relative to the integral's scale) and are then rounded up
 * to a coarse ladder of even sizes so that few distinct rules are built.
 */
export function glNodeCount(omega: number, accuracy: 'normal' | 'high', scale = 1): number {
  const om = Math.max(0, omega);
  const raw =
    accuracy === 'high' ? om / 2 + 5.5 * Math.cbrt(om) + 8 : om / 2 + 4 * Math.cbrt(om) + 4;
  return ladder(Math.ceil(raw * scale));
}

/** Round up to an even size on a ladder: even numbers up to 32, then steps of about 6 %. */
export function ladder(n: number): number {
  if (n <= 4) return 4;
  if (n <= 32) return n % 2 === 0 ? n : n + 1;
  let s = 32;
  while (s < n) s = 2 * Math.ceil((s * 1.06) / 2);
  return s;
}
