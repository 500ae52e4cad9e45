import type { NM } from './types.ts';
import { assertIndex, triangular, triangularRoot } from './internal/validate.ts';

/**
 * (n, m) of Noll's single index (R. J. Noll, "Zernike polynomials and atmospheric turbulence",
 * J. Opt. Soc. Am. 66, 207–211 (1976), Table 1). Noll indices start at 1.
 *
 * Within a radial order n the index increases with |m|; for m ≠ 0 each |m| takes two consecutive
 * indices, the even one for the cos term (returned as m > 0) and the odd one for the sin term
 * (returned as m < 0). The polynomials themselves are identical to the ANSI ones with the same (n, m).
 *
 * @param j Noll index, an integer ≥ 1
 * @throws RangeError if j is not a safe integer ≥ 1
 * @example nollToNM(4) // { n: 2, m: 0 };  nollToNM(5) // { n: 2, m: -2 };  nollToNM(6) // { n: 2, m: 2 }
 */
export function nollToNM(j: number): NM {
  assertIndex(j, 1, 'Noll index j');
  // Row n holds Noll indices T(n)+1 … T(n+1).
  const n = triangularRoot(j - 1);
  const k = j - triangular(n); // position in the row, 1 … n+1
  // |m| runs 0,2,2,4,4,… (n even) or 1,1,3,3,… (n odd).
  const absM = n % 2 === 0 ? 2 * Math.floor(k / 2) : 2 * Math.floor((k - 1) / 2) + 1;
  if (absM === 0) return { n, m: 0 };
  return { n, m: j % 2 === 0 ? absM : -absM };
}
