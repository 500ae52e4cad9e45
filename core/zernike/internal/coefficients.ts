import type { ZernikeCoefficient } from '../types.ts';
import { assertFinite, assertIndex } from './validate.ts';

/**
 * Validates a coefficient set and merges it into a map j → summed value (duplicate j are summed).
 * Internal: not exported from index.ts.
 *
 * @throws RangeError if an index is not an integer ≥ 0 or a value is not finite
 */
export function mergeCoefficients(coeffs: readonly ZernikeCoefficient[]): Map<number, number> {
  if (!Array.isArray(coeffs)) throw new TypeError('coefficients must be an array of { j, value }');
  const merged = new Map<number, number>();
  for (const c of coeffs) {
    assertIndex(c.j, 0, 'coefficient index j');
    assertFinite(c.value, `coefficient value of j = ${c.j}`);
    merged.set(c.j, (merged.get(c.j) ?? 0) + c.value);
  }
  return merged;
}
