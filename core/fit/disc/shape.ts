/**
 * The disc's edge shape as fit parameters, and its derivatives for the fit's Jacobian.
 *
 * Parameterisation (one for every order, dimensionless): in the disc's OWN frame (the lab frame when the
 * disc is at rotation 0),
 *     r(θ) = a·(1 + Σ_n [c_n·cos nθ + s_n·sin nθ]),   n = 2, 3, 4.
 * Order 2 is the ellipticity: c₂ = e·cos 2φ, s₂ = e·sin 2φ (φ the axis angle, as DiscSpec's
 * a·(1 + e·cos 2(θ − φ))); these two components have no singularity at e = 0, unlike (e, φ). Orders 3 and 4
 * are edge harmonics of amplitude a·√(c_n² + s_n²) and phase atan2(s_n, c_n) (DiscSpec's
 * amplitudeM·cos(nθ − phaseRad)).
 *
 * A frame whose disc is turned by α (counter-clockwise, lab frame, looking downstream) sees
 * r_lab(θ) = r_own(θ − α): the shape turns with the disc, the beam's Zernike terms stay in the lab frame.
 *
 * Derivatives: analytic, by the shape derivative of the area integral (Hadamard's formula). The field is
 * U(P) = 1/(iλL)·∫∫_outside b(Q)·e^{ik|Q−F|²/(2L')} d²Q with b the incident amplitude and aberration phase
 * (core/optics/fast/rimModel.ts); moving the edge outward by δr(θ) removes the strip r·δr·dθ, so
 *     ∂U/∂q = −1/(iλL)·∮ b(Q(θ))·e^{ik|Q(θ)−F|²/(2L')}·r(θ)·∂r/∂q dθ,
 * summed by the periodic trapezoid rule on the fast model's rim samples. It is the derivative of the exact
 * Fresnel integral; test/fit/disc-shape.test.ts checks it against central differences of the fast model.
 */
import type { BenchSetup, DiscSpec, EdgeHarmonic, ZernikeTerm } from '../../setup/types.ts';
import { edgePoint } from '../../optics/discEdge.ts';
import { effectiveDistanceM } from '../../optics/geometry.ts';
import { emptyDerivs, evalPolynomial, wavefrontPolynomial } from '../../optics/wavefront.ts';

/** Edge orders the fit can free. */
export const DISC_SHAPE_ORDERS = [2, 3, 4] as const;

/** One order's relative edge coefficients (disc's own frame): r gains a·(cos·cos nθ + sin·sin nθ). */
export interface DiscShapeTerm {
  order: number;
  cos: number;
  sin: number;
}

/** Parameter names of the free shape orders, in layout order: disc2c, disc2s, disc3c, … */
export function discShapeParameterNames(orders: readonly number[]): string[] {
  return orders.flatMap((n) => [`disc${n}c`, `disc${n}s`]);
}

/** Check a list of free orders: each of 2, 3, 4 at most once. */
export function checkDiscOrders(orders: readonly number[]): string | null {
  for (const n of orders) if (!(DISC_SHAPE_ORDERS as readonly number[]).includes(n)) return `disc edge order ${n} cannot be fitted: choose from 2 (ellipticity), 3, 4`;
  if (new Set(orders).size !== orders.length) return `a disc edge order is listed twice in ${orders.join(',')}`;
  return null;
}

/** Shape terms of a DiscSpec (lab frame = the disc's own frame at rotation 0), orders 2–4, relative to its radius. */
export function shapeTermsOfDisc(disc: DiscSpec): DiscShapeTerm[] {
  const out = new Map<number, DiscShapeTerm>();
  const add = (order: number, c: number, s: number) => {
    const t = out.get(order) ?? { order, cos: 0, sin: 0 };
    t.cos += c;
    t.sin += s;
    out.set(order, t);
  };
  if (disc.ellipticity !== 0) add(2, disc.ellipticity * Math.cos(2 * disc.ellipseAngleRad), disc.ellipticity * Math.sin(2 * disc.ellipseAngleRad));
  for (const h of disc.edgeHarmonics) {
    if (h.order < 2 || h.order > 4) continue;
    add(h.order, (h.amplitudeM / disc.radiusM) * Math.cos(h.phaseRad), (h.amplitudeM / disc.radiusM) * Math.sin(h.phaseRad));
  }
  return [...out.values()].sort((a, b) => a.order - b.order);
}

/**
 * The lab-frame disc of a frame: `base` with its ellipticity and its edge harmonics of orders 2–4 replaced
 * by `terms` (disc's own frame, relative to base.radiusM) turned by `rotationRad`. Other harmonics of the
 * base (e.g. a fine corrugation) are kept as they are.
 */
export function discWithShape(base: DiscSpec, terms: readonly DiscShapeTerm[], rotationRad: number): DiscSpec {
  let ellipticity = 0;
  let ellipseAngleRad = 0;
  const harmonics: EdgeHarmonic[] = base.edgeHarmonics.filter((h) => h.order < 2 || h.order > 4);
  for (const t of terms) {
    const amp = Math.hypot(t.cos, t.sin);
    if (amp === 0) continue;
    const phase = Math.atan2(t.sin, t.cos);
    if (t.order === 2) {
      ellipticity = amp;
      ellipseAngleRad = phase / 2 + rotationRad;
    } else harmonics.push({ order: t.order, amplitudeM: amp * base.radiusM, phaseRad: phase + t.order * rotationRad });
  }
  return { radiusM: base.radiusM, ellipticity, ellipseAngleRad, edgeHarmonics: harmonics };
}

/** Terms from the free parameters p[offset …] (cos, sin per order) merged over fixed terms. */
export function shapeTermsFromParams(orders: readonly number[], p: ArrayLike<number>, offset: number, fixed: readonly DiscShapeTerm[] = []): DiscShapeTerm[] {
  const out = fixed.filter((t) => !orders.includes(t.order)).map((t) => ({ ...t }));
  orders.forEach((n, i) => out.push({ order: n, cos: p[offset + 2 * i], sin: p[offset + 2 * i + 1] }));
  return out.sort((a, b) => a.order - b.order);
}

/**
 * ∂U/∂q for the shape parameters (orders × [cos, sin], disc's own frame, frame rotation α), at camera
 * points (xsM[ix], ysM[iy]), in the convention of fastField (U without P-only phase factors).
 * `setup.disc` must already be the frame's lab-frame disc. Row-major [iy·nx + ix].
 */
export function discShapeFieldDerivatives(
  setup: BenchSetup,
  aberrations: readonly ZernikeTerm[],
  xsM: Float64Array,
  ysM: Float64Array,
  nPhi: number,
  orders: readonly number[],
  rotationRad: number,
): { dRe: Float64Array[]; dIm: Float64Array[] } {
  const lambda = setup.wavelengthM;
  const k = (2 * Math.PI) / lambda;
  const L = setup.camera.distanceM;
  const lp = effectiveDistanceM(L, setup.beam.curvatureRadiusM);
  const a = setup.disc.radiusM;
  const w = setup.beam.radiusM;
  const [bcx, bcy] = setup.beam.centerM;
  const poly = wavefrontPolynomial(lambda, setup.zernikeRadiusM, aberrations);
  const n = nPhi;
  const np = 2 * orders.length;
  const nx = xsM.length;
  const ny = ysM.length;
  const dphi = (2 * Math.PI) / n;
  // Rim tables: Q_j, b_j, and the weights −Δθ·r·∂r/∂q/(λL) for each parameter.
  const qx = new Float64Array(n);
  const qy = new Float64Array(n);
  const br = new Float64Array(n);
  const bi = new Float64Array(n);
  const wt = new Float64Array(n * np);
  const d = emptyDerivs();
  const pre = -dphi / (lambda * L);
  for (let j = 0; j < n; j++) {
    const th = j * dphi;
    const q = edgePoint(setup.disc, th);
    qx[j] = q.x;
    qy[j] = q.y;
    evalPolynomial(poly, q.x, q.y, d);
    const amp = Math.exp(-((q.x - bcx) ** 2 + (q.y - bcy) ** 2) / (w * w));
    br[j] = amp * Math.cos(k * d.v);
    bi[j] = amp * Math.sin(k * d.v);
    const r = Math.hypot(q.x, q.y);
    for (let o = 0; o < orders.length; o++) {
      const arg = orders[o] * (th - rotationRad);
      wt[j * np + 2 * o] = pre * r * a * Math.cos(arg);
      wt[j * np + 2 * o + 1] = pre * r * a * Math.sin(arg);
    }
  }
  // Separable kernel: X[ix, j] = b_j·e^{ik(qx−fx)²/(2L')}, Y[iy, j] = e^{ik(qy−fy)²/(2L')}.
  const X = new Float64Array(2 * nx * n);
  const Y = new Float64Array(2 * ny * n);
  const half = k / (2 * lp);
  for (let ix = 0; ix < nx; ix++) {
    const fx = (xsM[ix] * lp) / L;
    for (let j = 0; j < n; j++) {
      const ph = half * (qx[j] - fx) ** 2;
      const c = Math.cos(ph), s = Math.sin(ph);
      X[2 * (ix * n + j)] = br[j] * c - bi[j] * s;
      X[2 * (ix * n + j) + 1] = br[j] * s + bi[j] * c;
    }
  }
  for (let iy = 0; iy < ny; iy++) {
    const fy = (ysM[iy] * lp) / L;
    for (let j = 0; j < n; j++) {
      const ph = half * (qy[j] - fy) ** 2;
      Y[2 * (iy * n + j)] = Math.cos(ph);
      Y[2 * (iy * n + j) + 1] = Math.sin(ph);
    }
  }
  const dRe = Array.from({ length: np }, () => new Float64Array(nx * ny));
  const dIm = Array.from({ length: np }, () => new Float64Array(nx * ny));
  const acc = new Float64Array(2 * np);
  for (let iy = 0; iy < ny; iy++) {
    const yo = 2 * iy * n;
    for (let ix = 0; ix < nx; ix++) {
      const xo = 2 * ix * n;
      acc.fill(0);
      for (let j = 0; j < n; j++) {
        const xr = X[xo + 2 * j], xi = X[xo + 2 * j + 1];
        const yr = Y[yo + 2 * j], yi = Y[yo + 2 * j + 1];
        const er = xr * yr - xi * yi;
        const ei = xr * yi + xi * yr;
        const wo = j * np;
        for (let q = 0; q < np; q++) {
          acc[2 * q] += er * wt[wo + q];
          acc[2 * q + 1] += ei * wt[wo + q];
        }
      }
      // acc = Σ (…)·(−Δθ/(λL))·r·∂r/∂q = λL-scaled ∂tot; ∂U = ∂tot/(iλL) → (re, im) = (acc_im, −acc_re)
      const pix = iy * nx + ix;
      for (let q = 0; q < np; q++) {
        dRe[q][pix] = acc[2 * q + 1];
        dIm[q][pix] = -acc[2 * q];
      }
    }
  }
  return { dRe, dIm };
}
