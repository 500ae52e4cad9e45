import type { Monomial } from './types.ts';
import { ansiToNM } from './ansi-to-nm.ts';

function factorial(n: number): bigint {
  let f = 1n;
  for (let i = 2; i <= n; i++) f *= BigInt(i);
  return f;
}

function binomial(n: number, k: number): bigint {
  return factorial(n) / (factorial(k) * factorial(n - k));
}

/**
 * Exact Cartesian monomial expansion of the ANSI Zernike polynomial Z_j:
 *
 *     Z_j(x, y) = Σ coef · x^px · y^py.
 *
 * Built from R_n^m(ρ)/ρ^m = Σ_s (−1)^s (n−s)! / (s! ((n+m)/2−s)! ((n−m)/2−s)!) (x²+y²)^{(n−m)/2−s}
 * (Born & Wolf App. VII; Noll 1976 eq. 2) and ρ^m cos mθ = Re (x+iy)^m, ρ^m sin mθ = Im (x+iy)^m,
 * multiplied out in exact integer (BigInt) arithmetic. Each coefficient is that integer times the
 * normalisation √(n+1) or √(2(n+1)), so it carries at most two roundings.
 *
 * Monomials with a zero coefficient are omitted. The result is sorted by total degree px + py,
 * then by px descending. Note that for high orders the monomial coefficients grow quickly and summing
 * them suffers cancellation; use `zernikeXY` or `compileWavefront` for evaluation.
 *
 * @throws RangeError on an invalid ANSI index
 * @example zernikeMonomials(4) // [{px:0,py:0,coef:−√3}, {px:2,py:0,coef:2√3}, {px:0,py:2,coef:2√3}]
 */
export function zernikeMonomials(j: number): Monomial[] {
  const { n, m } = ansiToNM(j);
  const am = Math.abs(m);
  const k = (n - am) / 2;
  const half = (n + am) / 2;

  // Angular factor Re/Im (x + iy)^am as integer monomials x^(am−q) y^q.
  const angular: Array<[number, bigint]> = []; // [q, coefficient]
  for (let q = 0; q <= am; q++) {
    if (m >= 0 && q % 2 === 0) angular.push([q, (q / 2) % 2 === 0 ? binomial(am, q) : -binomial(am, q)]);
    if (m < 0 && q % 2 === 1) angular.push([q, ((q - 1) / 2) % 2 === 0 ? binomial(am, q) : -binomial(am, q)]);
  }

  const acc = new Map<number, bigint>(); // key px * (n + 1) + py
  for (let s = 0; s <= k; s++) {
    const r = factorial(n - s) / (factorial(s) * factorial(half - s) * factorial(k - s));
    const radial = s % 2 === 0 ? r : -r;
    const t = k - s; // (x² + y²)^t
    for (let i = 0; i <= t; i++) {
      const ct = radial * binomial(t, i);
      for (const [q, ca] of angular) {
        const px = 2 * i + am - q;
        const py = 2 * (t - i) + q;
        const key = px * (n + 1) + py;
        acc.set(key, (acc.get(key) ?? 0n) + ct * ca);
      }
    }
  }

  const norm = am === 0 ? Math.sqrt(n + 1) : Math.sqrt(2 * (n + 1));
  const out: Monomial[] = [];
  for (const [key, c] of acc) {
    if (c === 0n) continue;
    out.push({ px: Math.floor(key / (n + 1)), py: key % (n + 1), coef: Number(c) * norm });
  }
  out.sort((a, b) => a.px + a.py - (b.px + b.py) || b.px - a.px);
  return out;
}
