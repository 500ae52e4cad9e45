/**
 * Test helpers for the Zernike library: our own quadrature over the unit disc and a seeded RNG.
 * Nothing here comes from core/zernike, so the tests stay independent of the code under test.
 */

/**
 * Gauss–Legendre nodes and weights on [−1, 1], by Newton iteration on the three-term recurrence of the
 * Legendre polynomials (Abramowitz & Stegun 25.4.29 and 22.7.10; the classic "gauleg" routine of
 * Press et al., Numerical Recipes, §4.5). Exact for polynomials of degree ≤ 2n − 1.
 */
export function gaussLegendre(n: number): { nodes: Float64Array; weights: Float64Array } {
  const nodes = new Float64Array(n);
  const weights = new Float64Array(n);
  for (let i = 0; i < Math.ceil(n / 2); i++) {
    let z = Math.cos((Math.PI * (i + 0.75)) / (n + 0.5));
    let dp = 0;
    for (let iter = 0; iter < 100; iter++) {
      let p1 = 1;
      let p2 = 0;
      for (let k = 1; k <= n; k++) {
        const p3 = p2;
        p2 = p1;
        p1 = ((2 * k - 1) * z * p2 - (k - 1) * p3) / k;
      }
      dp = (n * (z * p1 - p2)) / (z * z - 1);
      const dz = p1 / dp;
      z -= dz;
      if (Math.abs(dz) < 1e-16) break;
    }
    nodes[i] = -z;
    nodes[n - 1 - i] = z;
    const w = 2 / ((1 - z * z) * dp * dp);
    weights[i] = w;
    weights[n - 1 - i] = w;
  }
  return { nodes, weights };
}

export interface DiscRule {
  x: Float64Array;
  y: Float64Array;
  rho: Float64Array;
  theta: Float64Array;
  /** Weights such that Σ w f ≈ ∫∫_disc f dA (area π). */
  w: Float64Array;
}

/**
 * Product rule on the unit disc: Gauss–Legendre in ρ ∈ [0, 1] (with the Jacobian ρ) × trapezoid in θ
 * (exact for trigonometric polynomials of degree < nTheta). Exact for f·ρ polynomial of degree
 * ≤ 2·nRho − 1 in ρ and angular frequency < nTheta.
 */
export function discRule(nRho: number, nTheta: number): DiscRule {
  const gl = gaussLegendre(nRho);
  const N = nRho * nTheta;
  const r: DiscRule = {
    x: new Float64Array(N),
    y: new Float64Array(N),
    rho: new Float64Array(N),
    theta: new Float64Array(N),
    w: new Float64Array(N),
  };
  let idx = 0;
  for (let i = 0; i < nRho; i++) {
    const rho = 0.5 * (gl.nodes[i]! + 1);
    const wr = 0.5 * gl.weights[i]! * rho;
    for (let t = 0; t < nTheta; t++) {
      const th = (2 * Math.PI * t) / nTheta;
      r.rho[idx] = rho;
      r.theta[idx] = th;
      r.x[idx] = rho * Math.cos(th);
      r.y[idx] = rho * Math.sin(th);
      r.w[idx] = wr * ((2 * Math.PI) / nTheta);
      idx++;
    }
  }
  return r;
}

/** Seeded uniform RNG on [0, 1) (mulberry32), so that test inputs are reproducible. */
export function rng(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/** n random points uniformly distributed over the disc of radius `radius`. */
export function randomDiscPoints(n: number, seed: number, radius = 1): Array<[number, number]> {
  const u = rng(seed);
  const pts: Array<[number, number]> = [];
  for (let i = 0; i < n; i++) {
    const r = radius * Math.sqrt(u());
    const th = 2 * Math.PI * u();
    pts.push([r * Math.cos(th), r * Math.sin(th)]);
  }
  return pts;
}
