/**
 * The Bessel function of the first kind of order zero, J₀(x), for any real x. Pure.
 *
 * - |x| ≤ 25: Miller's backward recurrence J_{n−1} = (2n/x)·J_n − J_{n+1}, started far above x and
 *   normalised with J₀ + 2·(J₂ + J₄ + …) = 1 (Abramowitz & Stegun 9.1.27 and 9.1.46; Miller's algorithm,
 *   A&S 9.12 and the introduction to Table 9.1). Stable for every x; about 1e-15 absolute.
 * - |x| > 25: Hankel's asymptotic expansion J₀(x) = √(2/(πx))·(P·cos χ − Q·sin χ), χ = x − π/4, with the
 *   series P and Q of A&S 9.2.5, 9.2.9 and 9.2.10, summed until the terms stop shrinking.
 */

/** J₀(x). Even in x; J₀(0) = 1. */
export function besselJ0(x: number): number {
  if (Number.isNaN(x)) return Number.NaN;
  const ax = Math.abs(x);
  if (ax === Number.POSITIVE_INFINITY) return 0;
  if (ax < 1e-8) return 1 - (ax * ax) / 4;
  if (ax <= 25) return millerJ0(ax);
  return hankelJ0(ax);
}

function millerJ0(x: number): number {
  // Start index: even, well above x (the recurrence grows J_n by about 2n/x per step downwards).
  let start = 2 * Math.floor((x + 20 + Math.sqrt(40 * x)) / 2);
  if (start < 20) start = 20;
  let jNext = 0; // J_{n+1}
  let jCur = 1e-30; // J_n (arbitrary scale)
  let evenSum = 0; // J₂ + J₄ + … (same scale)
  for (let n = start; n > 0; n--) {
    const jPrev = ((2 * n) / x) * jCur - jNext; // J_{n−1}
    jNext = jCur;
    jCur = jPrev;
    if (Math.abs(jCur) > 1e250) {
      // rescale to avoid overflow
      jCur *= 1e-250;
      jNext *= 1e-250;
      evenSum *= 1e-250;
    }
    if ((n - 1) % 2 === 0 && n - 1 > 0) evenSum += jCur;
  }
  return jCur / (jCur + 2 * evenSum);
}

function hankelJ0(x: number): number {
  // P ~ Σ (−1)^k a_{2k}/x^{2k}, Q ~ Σ (−1)^(k+1) a_{2k+1}/x^{2k+1}, a_m = Π_{i=1..m} (2i−1)² / (m!·8^m) for μ = 0.
  let p = 1;
  let q = 0;
  let term = 1; // a_m / x^m with sign folded in below
  let prevAbs = Number.POSITIVE_INFINITY;
  for (let m = 1; m < 60; m++) {
    term *= ((2 * m - 1) * (2 * m - 1)) / (8 * m * x);
    const a = Math.abs(term);
    if (a >= prevAbs || a < 1e-17) break;
    prevAbs = a;
    // m odd → Q term with sign (−1)^((m+1)/2) (Q = −1/(8x) + …); m even → P term with sign (−1)^(m/2)
    if (m % 2 === 1) q += ((m + 1) / 2) % 2 === 0 ? term : -term;
    else p += (m / 2) % 2 === 0 ? term : -term;
  }
  const chi = x - Math.PI / 4;
  return Math.sqrt(2 / (Math.PI * x)) * (p * Math.cos(chi) - q * Math.sin(chi));
}
