/** Input checks shared by the public functions. Internal: not exported from index.ts. */

/** Throws a RangeError unless `value` is a safe integer ≥ `min`. */
export function assertIndex(value: number, min: number, what: string): void {
  if (!Number.isSafeInteger(value) || value < min) {
    throw new RangeError(`${what} must be an integer ≥ ${min}; got ${String(value)}`);
  }
}

/** Throws a RangeError unless (n, m) is a valid Zernike index pair: integers, n ≥ 0, |m| ≤ n, n − |m| even. */
export function assertNM(n: number, m: number): void {
  if (!Number.isSafeInteger(n) || n < 0) {
    throw new RangeError(`Zernike radial order n must be an integer ≥ 0; got ${String(n)}`);
  }
  if (!Number.isSafeInteger(m)) {
    throw new RangeError(`Zernike azimuthal frequency m must be an integer; got ${String(m)}`);
  }
  if (Math.abs(m) > n || (n - Math.abs(m)) % 2 !== 0) {
    throw new RangeError(`invalid Zernike indices (n, m) = (${n}, ${m}): need |m| ≤ n and n − |m| even`);
  }
}

/** Throws a RangeError unless `value` is a finite number. */
export function assertFinite(value: number, what: string): void {
  if (!Number.isFinite(value)) {
    throw new RangeError(`${what} must be a finite number; got ${String(value)}`);
  }
}

/** Triangular number T(n) = n(n+1)/2, exact while the result is a safe integer (n(n+1) is even). */
export function triangular(n: number): number {
  return (n * (n + 1)) / 2;
}

/** Largest n ≥ 0 with T(n) ≤ t, for a safe integer t ≥ 0 (robust to rounding in the square root). */
export function triangularRoot(t: number): number {
  let n = Math.floor((Math.sqrt(8 * t + 1) - 1) / 2);
  while (n > 0 && triangular(n) > t) n -= 1;
  while (triangular(n + 1) <= t) n += 1;
  return n;
}
