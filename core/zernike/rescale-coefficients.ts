import type { ZernikeCoefficient } from './types.ts';
import { ansiToNM } from './ansi-to-nm.ts';
import { nmToAnsi } from './nm-to-ansi.ts';
import { mergeCoefficients } from './internal/coefficients.ts';
import { jacobiP } from './internal/jacobi.ts';

/** R_n^q(ε) for 0 ≤ q ≤ n, n − q even (valid indices guaranteed by the caller). */
function radial(n: number, q: number, eps: number): number {
  return Math.pow(eps, q) * jacobiP((n - q) / 2, q, 2 * eps * eps - 1);
}

/**
 * Rescales a coefficient set from normalisation radius R1 to R2, ratio = R2/R1 (> 0; smaller or larger).
 *
 * The wavefront is unchanged: Σ c_j Z_j(r/R1) = Σ c'_j Z_j(r/R2) for every r. In unit-disc coordinates
 * of the new radius this reads W'(ρ, θ) = W(ε ρ, θ) with ε = ratio. The conversion is exact (a finite
 * linear map): each term Z(n, m) contributes only to terms of the same signed m and n' ≤ n, with the same
 * parity, through the Janssen–Dirksen identity
 *
 *     R_n^m(ε ρ) = Σ_{n' = m, m+2, …, n} [R_n^{n'}(ε) − R_n^{n'+2}(ε)] R_{n'}^m(ρ),   R_n^{n+2} ≡ 0,
 *
 * so that, with the unit-RMS normalisation (the √2 of m ≠ 0 cancels within a given m),
 *
 *     c'(n', m) = Σ_{n ≥ n'} c(n, m) · √((n+1)/(n'+1)) · [R_n^{n'}(ε) − R_n^{n'+2}(ε)].
 *
 * Sources: A. J. E. M. Janssen and P. Dirksen, "Concise formula for the Zernike coefficients of scaled
 * pupils", J. Microlith. Microfab. Microsyst. 5(3), 030501 (2006); the problem and the low-order closed
 * forms are in J. Schwiegerling, "Scaling Zernike expansion coefficients to different pupil sizes",
 * J. Opt. Soc. Am. A 19(10), 1937–1945 (2002); see also G.-m. Dai, JOSA A 23, 539 (2006) and
 * L. Lundström and P. Unsbo, JOSA A 24, 569 (2007). The identity is polynomial in ε, so it holds for
 * ε > 1 (enlarging, i.e. extrapolating the polynomial beyond the old disc) as well as ε < 1.
 *
 * Returns every term of the closure — for each signed m present, all n' = |m|, |m|+2, … up to the highest
 * input n of that m — sorted by j, zeros included (e.g. pure defocus also yields a piston term, which is
 * exactly 0 when ratio = 1). Duplicate input j are summed.
 *
 * @throws RangeError if ratio is not a finite number > 0, or on invalid coefficients
 */
export function rescaleCoefficients(coeffs: readonly ZernikeCoefficient[], ratio: number): ZernikeCoefficient[] {
  if (!(typeof ratio === 'number' && Number.isFinite(ratio) && ratio > 0)) {
    throw new RangeError(`rescale ratio R2/R1 must be a finite number > 0; got ${String(ratio)}`);
  }
  const merged = mergeCoefficients(coeffs);
  // Signed m → (n → value).
  const byM = new Map<number, Map<number, number>>();
  for (const [j, value] of merged) {
    const { n, m } = ansiToNM(j);
    let row = byM.get(m);
    if (!row) byM.set(m, (row = new Map()));
    row.set(n, (row.get(n) ?? 0) + value);
  }
  const out: ZernikeCoefficient[] = [];
  for (const [m, row] of byM) {
    const am = Math.abs(m);
    const nTop = Math.max(...row.keys());
    for (let np = am; np <= nTop; np += 2) {
      let sum = 0;
      for (const [n, c] of row) {
        if (n < np || c === 0) continue;
        const upper = np + 2 <= n ? radial(n, np + 2, ratio) : 0;
        sum += c * Math.sqrt((n + 1) / (np + 1)) * (radial(n, np, ratio) - upper);
      }
      out.push({ j: nmToAnsi(np, m), value: sum });
    }
  }
  out.sort((p, q) => p.j - q.j);
  return out;
}
