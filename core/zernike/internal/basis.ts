import { ansiToNM } from '../ansi-to-nm.ts';
import { jacobiA, jacobiB, jacobiC } from './jacobi.ts';

/**
 * Evaluates a fixed list of ANSI terms at one point at a time, sharing the Jacobi recurrence between
 * terms of the same |m| and the powers of z = x + iy between all terms (the Cartesian form of
 * internal/product.ts). Internal: not exported from index.ts.
 */
export interface BasisEvaluator {
  /** Writes Z_{jList[t]}(x, y) into row[t] for every t. */
  row(x: number, y: number, row: Float64Array): void;
}

export function basisEvaluator(jList: readonly number[]): BasisEvaluator {
  const J = jList.length;
  const am = new Int32Array(J);
  const kk = new Int32Array(J);
  const sin = new Uint8Array(J);
  const norm = new Float64Array(J);
  let mMax = 0;
  const kMaxByM = new Map<number, number>();
  for (let t = 0; t < J; t++) {
    const { n, m } = ansiToNM(jList[t]!);
    am[t] = Math.abs(m);
    kk[t] = (n - Math.abs(m)) / 2;
    sin[t] = m < 0 ? 1 : 0;
    norm[t] = m === 0 ? Math.sqrt(n + 1) : Math.sqrt(2 * (n + 1));
    mMax = Math.max(mMax, Math.abs(m));
    kMaxByM.set(Math.abs(m), Math.max(kMaxByM.get(Math.abs(m)) ?? 0, kk[t]!));
  }
  // Per |m|: recurrence coefficients and a scratch table of P_k values.
  const ms = [...kMaxByM.keys()].sort((p, q) => p - q);
  const coef = new Map<number, { a: Float64Array; b: Float64Array; c: Float64Array; p: Float64Array }>();
  for (const m of ms) {
    const kMax = kMaxByM.get(m)!;
    const e = { a: new Float64Array(kMax + 1), b: new Float64Array(kMax + 1), c: new Float64Array(kMax + 1), p: new Float64Array(kMax + 1) };
    for (let k = 1; k <= kMax; k++) {
      e.a[k] = jacobiA(k, m);
      e.b[k] = jacobiB(k, m);
      e.c[k] = jacobiC(k, m);
    }
    coef.set(m, e);
  }
  const tables = ms.map((m) => coef.get(m)!);
  const tableOf = new Map<number, Float64Array>(ms.map((m) => [m, coef.get(m)!.p]));
  const pTable = Array.from({ length: J }, (_, t) => tableOf.get(am[t]!)!);
  const zr = new Float64Array(mMax + 1);
  const zi = new Float64Array(mMax + 1);

  return {
    row(x: number, y: number, row: Float64Array): void {
      const u = 2 * (x * x + y * y) - 1;
      for (let g = 0; g < tables.length; g++) {
        const { a, b, c, p } = tables[g]!;
        let p0 = 0;
        let p1 = 1;
        p[0] = 1;
        for (let k = 1; k < p.length; k++) {
          const p2 = (a[k]! * u + b[k]!) * p1 - c[k]! * p0;
          p0 = p1;
          p1 = p2;
          p[k] = p2;
        }
      }
      zr[0] = 1;
      zi[0] = 0;
      for (let m = 1; m <= mMax; m++) {
        zr[m] = zr[m - 1]! * x - zi[m - 1]! * y;
        zi[m] = zr[m - 1]! * y + zi[m - 1]! * x;
      }
      for (let t = 0; t < J; t++) {
        const m = am[t]!;
        row[t] = norm[t]! * pTable[t]![kk[t]!]! * (sin[t] ? zi[m]! : zr[m]!);
      }
    },
  };
}
