import type { CompiledWavefront, ZernikeCoefficient, ZernikeDerivatives } from './types.ts';
import { ansiToNM } from './ansi-to-nm.ts';
import { mergeCoefficients } from './internal/coefficients.ts';
import { jacobiA, jacobiB, jacobiC } from './internal/jacobi.ts';
import { addProduct } from './internal/product.ts';

/** All terms sharing one |m|: one Jacobi recurrence serves both the cos and the sin terms. */
interface Group {
  m: number;
  kMax: number;
  a: Float64Array;
  b: Float64Array;
  c: Float64Array;
  /** Normalised weights of the cos (m > 0, or m = 0) terms, indexed by k = (n − m)/2. */
  wc: Float64Array;
  /** Normalised weights of the sin (m < 0) terms. */
  ws: Float64Array;
  hasCos: boolean;
  hasSin: boolean;
}

function buildGroups(coeffs: readonly ZernikeCoefficient[]): Group[] {
  const merged = mergeCoefficients(coeffs);
  const byM = new Map<number, Array<{ k: number; sin: boolean; w: number }>>();
  for (const [j, value] of merged) {
    if (value === 0) continue;
    const { n, m } = ansiToNM(j);
    const am = Math.abs(m);
    const norm = am === 0 ? Math.sqrt(n + 1) : Math.sqrt(2 * (n + 1));
    let list = byM.get(am);
    if (!list) byM.set(am, (list = []));
    list.push({ k: (n - am) / 2, sin: m < 0, w: norm * value });
  }
  const groups: Group[] = [];
  for (const am of [...byM.keys()].sort((p, q) => p - q)) {
    const list = byM.get(am)!;
    const kMax = Math.max(...list.map((t) => t.k));
    const g: Group = {
      m: am,
      kMax,
      a: new Float64Array(kMax + 1),
      b: new Float64Array(kMax + 1),
      c: new Float64Array(kMax + 1),
      wc: new Float64Array(kMax + 1),
      ws: new Float64Array(kMax + 1),
      hasCos: false,
      hasSin: false,
    };
    for (let k = 1; k <= kMax; k++) {
      g.a[k] = jacobiA(k, am);
      g.b[k] = jacobiB(k, am);
      g.c[k] = jacobiC(k, am);
    }
    for (const t of list) {
      if (t.sin) {
        g.ws[t.k] = g.ws[t.k]! + t.w;
        g.hasSin = true;
      } else {
        g.wc[t.k] = g.wc[t.k]! + t.w;
        g.hasCos = true;
      }
    }
    groups.push(g);
  }
  return groups;
}

/**
 * Compiles a coefficient set W = Σ c_j Z_j for fast repeated evaluation at unit-disc Cartesian points.
 *
 * Terms are grouped by |m|: per point and group one Jacobi recurrence in u = 2(x²+y²) − 1 (with its
 * derivatives) is run and multiplied by Re/Im (x+iy)^|m|, the powers being built incrementally across
 * groups. Cost per point is O(number of distinct (n, |m|) rows), with no trigonometric calls and no
 * allocation. Evaluation is a polynomial for any (x, y): nothing is masked outside the unit disc.
 *
 * Duplicate j are summed; coefficient units carry through unchanged.
 *
 * @throws RangeError if an index is not an integer ≥ 0 or a value is not finite
 */
export function compileWavefront(coeffs: readonly ZernikeCoefficient[]): CompiledWavefront {
  const groups = buildGroups(coeffs);

  function evaluate(x: number, y: number, out: ZernikeDerivatives): ZernikeDerivatives {
    out.value = out.dx = out.dy = out.dxx = out.dxy = out.dyy = 0;
    const u = 2 * (x * x + y * y) - 1;
    let pr = 1; // z^m
    let pi = 0;
    let qr = 0; // z^(m−1)
    let qi = 0;
    let sr = 0; // z^(m−2)
    let si = 0;
    let mCur = 0;
    for (let gi = 0; gi < groups.length; gi++) {
      const g = groups[gi]!;
      while (mCur < g.m) {
        sr = qr;
        si = qi;
        qr = pr;
        qi = pi;
        const t = pr * x - pi * y;
        pi = pr * y + pi * x;
        pr = t;
        mCur++;
      }
      const { a, b, c, wc, ws } = g;
      // k = 0
      let p0 = 0, d0 = 0, e0 = 0;
      let p1 = 1, d1 = 0, e1 = 0;
      let Sc = wc[0]!, Sc1 = 0, Sc2 = 0;
      let Ss = ws[0]!, Ss1 = 0, Ss2 = 0;
      for (let k = 1; k <= g.kMax; k++) {
        const ak = a[k]!;
        const l = ak * u + b[k]!;
        const ck = c[k]!;
        const p2 = l * p1 - ck * p0;
        const d2 = ak * p1 + l * d1 - ck * d0;
        const e2 = 2 * ak * d1 + l * e1 - ck * e0;
        p0 = p1; d0 = d1; e0 = e1;
        p1 = p2; d1 = d2; e1 = e2;
        const w1 = wc[k]!;
        const w2 = ws[k]!;
        Sc += w1 * p1; Sc1 += w1 * d1; Sc2 += w1 * e1;
        Ss += w2 * p1; Ss1 += w2 * d1; Ss2 += w2 * e1;
      }
      if (g.hasCos) addProduct(out, x, y, g.m, false, Sc, Sc1, Sc2, pr, pi, qr, qi, sr, si);
      if (g.hasSin) addProduct(out, x, y, g.m, true, Ss, Ss1, Ss2, pr, pi, qr, qi, sr, si);
    }
    return out;
  }

  function value(x: number, y: number): number {
    const u = 2 * (x * x + y * y) - 1;
    let pr = 1;
    let pi = 0;
    let mCur = 0;
    let total = 0;
    for (let gi = 0; gi < groups.length; gi++) {
      const g = groups[gi]!;
      while (mCur < g.m) {
        const t = pr * x - pi * y;
        pi = pr * y + pi * x;
        pr = t;
        mCur++;
      }
      const { a, b, c, wc, ws } = g;
      let p0 = 0;
      let p1 = 1;
      let Sc = wc[0]!;
      let Ss = ws[0]!;
      for (let k = 1; k <= g.kMax; k++) {
        const p2 = (a[k]! * u + b[k]!) * p1 - c[k]! * p0;
        p0 = p1;
        p1 = p2;
        Sc += wc[k]! * p1;
        Ss += ws[k]! * p1;
      }
      total += Sc * pr + Ss * pi;
    }
    return total;
  }

  return { evaluate, value };
}
