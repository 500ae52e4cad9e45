/**
 * Fast model: the field in and around the disc's shadow as an integral along the rim.
 *
 * Physics notes §4. With the complex phase Φ(Q) = k·[Ŵ(Q) + |Q−F|²/(2L')] (Ŵ folds the Gaussian
 * amplitude in as an imaginary part), g = ∇Φ and H = ∇∇Φ, the field V = e^{iΦ}·H⁻¹g/(i·gᵀH⁻¹g) has
 * divergence e^{iΦ} exactly when Φ is quadratic. By the divergence theorem the integral over the plane
 * outside the disc becomes
 *     ∫∫_outside e^{iΦ} = −∮_rim V·n_disc dl + Σ_{singular points of V outside the disc} U_all/2,
 * where U_all = ∫∫_{R²} e^{iΦ} (the free beam) and V has two real singular points (zeros of gᵀH⁻¹g),
 * each carrying half the free beam. g and H are evaluated at each rim point, so the rim term is exact
 * for Gaussian beams with decentre, tilt, defocus and astigmatism and approximate for coma and beyond.
 *
 * The rim integral is a periodic trapezoid sum in the polar angle φ. Near the shadow edge a singular
 * point approaches the rim and the integrand gets a pole p close to the real axis; the pole is removed
 * analytically (its trapezoid sum −π·R·cot(Np/2) is known in closed form) and, being half in and half
 * out, it carries U_all/4. The rim sum converges exponentially with N.
 *
 * Intensities are relative to the incident peak intensity at the disc plane.
 */
import type { BenchSetup, ZernikeTerm } from '../../setup/types.ts';
import { edgePoint, edgePointComplex, edgePointSecondComplex, edgeRadius } from '../discEdge.ts';
import { effectiveDistanceM } from '../geometry.ts';
import { emptyDerivs, evalPolynomial, evalPolynomialComplex, evalThirdDerivativesComplex, wavefrontPolynomial, zernikePolynomialM, type Polynomial2D } from '../wavefront.ts';
import { newSaddleResult, solveSaddle, type SaddleContext, type SaddleResult } from './saddle.ts';

export interface FastModelOptions {
  /** Rim samples; chosen from the phase bandwidth when absent. */
  nPhi?: number;
  /** ANSI indices j of Zernike coefficients (waves) to differentiate with respect to. */
  derivativeTerms?: readonly number[];
  /** Also differentiate with respect to the camera point (dU/dPx, dU/dPy). */
  centerDerivatives?: boolean;
  /**
   * Which camera points to compute (row-major over xsM × ysM, 1 = compute); the others are left at 0.
   * For callers that need only part of the grid (a circular region of interest).
   */
  pointMask?: Uint8Array | null;
  /**
   * Apply the next-order (third-derivative) correction where it is trusted (default true). Its derivatives
   * are not computed, so where it is large the Jacobian is that of the first-order model only; a caller
   * that needs the Jacobian of the values it gets (a fit whose model error is corrected otherwise, like the
   * reference-model polish) turns it off.
   */
  thirdOrder?: boolean;
}

export interface FastFieldResult {
  nx: number;
  ny: number;
  re: Float64Array;
  im: Float64Array;
  /** Names of the differentiated parameters: 'z4', …, 'px', 'py'. */
  params: string[];
  dRe: Float64Array[];
  dIm: Float64Array[];
  nPhi: number;
  /** Pixels (row-major) where the saddle point of the free beam could not be found: the model is not valid there. */
  invalid: Uint8Array;
  invalidCount: number;
}

/** Rim samples needed for the phase bandwidth along the rim over the given camera extent. */
export function chooseRimSamples(
  setup: BenchSetup,
  aberrations: readonly ZernikeTerm[],
  xsM: Float64Array,
  ysM: Float64Array,
  /** When given, the largest camera radius |P| that matters (e.g. a circular region), instead of the grid's corners. */
  maxCameraRadiusM?: number,
): number {
  const L = setup.camera.distanceM;
  const lp = effectiveDistanceM(L, setup.beam.curvatureRadiusM);
  const k = (2 * Math.PI) / setup.wavelengthM;
  const poly = wavefrontPolynomial(setup.wavelengthM, setup.zernikeRadiusM, aberrations);
  let fMax = 0;
  if (maxCameraRadiusM !== undefined) fMax = maxCameraRadiusM;
  else for (const x of [xsM[0], xsM[xsM.length - 1]]) for (const y of [ysM[0], ysM[ysM.length - 1]]) fMax = Math.max(fMax, Math.hypot(x, y));
  fMax *= lp / L;
  // max over the rim of |dΦ/dφ| = k·|(∇W + (Q−F)/L')·Q'| ≤ k·(|∇W·Q'| + |Q·Q'|/L' + |F||Q'|/L')
  const d = emptyDerivs();
  let bw = 0;
  const n = 720;
  for (let i = 0; i < n; i++) {
    const p = edgePoint(setup.disc, (2 * Math.PI * i) / n);
    evalPolynomial(poly, p.x, p.y, d);
    const tang = Math.hypot(p.dx, p.dy);
    const b = k * (Math.abs(d.x * p.dx + d.y * p.dy) + Math.abs(p.x * p.dx + p.y * p.dy) / lp + (fMax * tang) / lp);
    bw = Math.max(bw, b);
  }
  // edge harmonics add their own bandwidth
  let hb = 0;
  for (const h of setup.disc.edgeHarmonics) hb = Math.max(hb, h.order * (2 + (k * setup.disc.radiusM * Math.abs(h.amplitudeM)) / lp));
  const need = 1.25 * Math.max(bw, hb) + 48;
  return Math.max(64, Math.ceil(need / 16) * 16);
}

function cotComplex(x: number, y: number): [number, number] {
  // cot(x + iy) = (sin 2x − i sinh 2y)/(cosh 2y − cos 2x)
  const den = Math.cosh(2 * y) - Math.cos(2 * x);
  return [Math.sin(2 * x) / den, -Math.sinh(2 * y) / den];
}

interface RimTables {
  n: number;
  qx: Float64Array;
  qy: Float64Array;
  /** e^{ikŴ(Q_j)} (complex) */
  br: Float64Array;
  bi: Float64Array;
  g0xr: Float64Array; g0xi: Float64Array; g0yr: Float64Array; g0yi: Float64Array;
  mxxr: Float64Array; mxxi: Float64Array; mxyr: Float64Array; mxyi: Float64Array; myyr: Float64Array; myyi: Float64Array;
  /** m = M·ν */
  mvxr: Float64Array; mvxi: Float64Array; mvyr: Float64Array; mvyi: Float64Array;
}

function buildRimTables(setup: BenchSetup, poly: Polynomial2D, n: number, k: number, lp: number): RimTables {
  const w = setup.beam.radiusM;
  const [cx, cy] = setup.beam.centerM;
  const t: RimTables = {
    n,
    qx: new Float64Array(n), qy: new Float64Array(n), br: new Float64Array(n), bi: new Float64Array(n),
    g0xr: new Float64Array(n), g0xi: new Float64Array(n), g0yr: new Float64Array(n), g0yi: new Float64Array(n),
    mxxr: new Float64Array(n), mxxi: new Float64Array(n), mxyr: new Float64Array(n), mxyi: new Float64Array(n),
    myyr: new Float64Array(n), myyi: new Float64Array(n),
    mvxr: new Float64Array(n), mvxi: new Float64Array(n), mvyr: new Float64Array(n), mvyi: new Float64Array(n),
  };
  const d = emptyDerivs();
  const kap = k / lp;
  const gi = 2 / (w * w); // k·(2/(k w²))
  for (let j = 0; j < n; j++) {
    const p = edgePoint(setup.disc, (2 * Math.PI * j) / n);
    evalPolynomial(poly, p.x, p.y, d);
    t.qx[j] = p.x;
    t.qy[j] = p.y;
    const rc2 = (p.x - cx) ** 2 + (p.y - cy) ** 2;
    const amp = Math.exp(-rc2 / (w * w));
    t.br[j] = amp * Math.cos(k * d.v);
    t.bi[j] = amp * Math.sin(k * d.v);
    t.g0xr[j] = k * (d.x + p.x / lp);
    t.g0xi[j] = gi * (p.x - cx);
    t.g0yr[j] = k * (d.y + p.y / lp);
    t.g0yi[j] = gi * (p.y - cy);
    const hxxr = k * d.xx + kap, hxxi = gi;
    const hxyr = k * d.xy, hxyi = 0;
    const hyyr = k * d.yy + kap, hyyi = gi;
    const detr = hxxr * hyyr - hxxi * hyyi - (hxyr * hxyr - hxyi * hxyi);
    const deti = hxxr * hyyi + hxxi * hyyr - 2 * hxyr * hxyi;
    const dd = detr * detr + deti * deti;
    const div = (ar: number, ai: number): [number, number] => [(ar * detr + ai * deti) / dd, (ai * detr - ar * deti) / dd];
    [t.mxxr[j], t.mxxi[j]] = div(hyyr, hyyi);
    [t.myyr[j], t.myyi[j]] = div(hxxr, hxxi);
    [t.mxyr[j], t.mxyi[j]] = div(-hxyr, -hxyi);
    // ν = (Q'y, −Q'x): outward normal times |Q'|
    const nux = p.dy, nuy = -p.dx;
    t.mvxr[j] = t.mxxr[j] * nux + t.mxyr[j] * nuy;
    t.mvxi[j] = t.mxxi[j] * nux + t.mxyi[j] * nuy;
    t.mvyr[j] = t.mxyr[j] * nux + t.myyr[j] * nuy;
    t.mvyi[j] = t.mxyi[j] * nux + t.myyi[j] * nuy;
  }
  return t;
}

/**
 * Complex field U(P) (without any P-only phase factor) at camera points P = (xsM[ix], ysM[iy]),
 * with optional analytic derivatives. Row-major output [iy*nx + ix].
 */
export function fastField(
  setup: BenchSetup,
  aberrations: readonly ZernikeTerm[],
  xsM: Float64Array,
  ysM: Float64Array,
  options: FastModelOptions = {},
): FastFieldResult {
  const lambda = setup.wavelengthM;
  const k = (2 * Math.PI) / lambda;
  const L = setup.camera.distanceM;
  const lp = effectiveDistanceM(L, setup.beam.curvatureRadiusM);
  const kap = k / lp;
  const poly = wavefrontPolynomial(lambda, setup.zernikeRadiusM, aberrations);
  const n = options.nPhi ?? chooseRimSamples(setup, aberrations, xsM, ysM);
  const nx = xsM.length;
  const ny = ysM.length;
  const mask = options.pointMask ?? null;
  if (mask && mask.length !== nx * ny) throw new RangeError(`pointMask has ${mask.length} entries for ${nx}×${ny} points`);
  const dphi = (2 * Math.PI) / n;
  const t = buildRimTables(setup, poly, n, k, lp);

  // --- separable tables, interleaved: X[(ix·n + j)·XS + ·], Y[(iy·n + j)·YS + ·]
  // X: AX (2), n_x = m_x·d_x (2), s_xx = M_xx·d_x² (2), 2·M_xy·d_x (2), d_x (2)
  // Y: E_y (2), n_y = m_y·d_y (2), s_yy = M_yy·d_y² (2), d_y (2)
  const XS = 10;
  const YS = 8;
  const X = new Float64Array(nx * n * XS);
  const Y = new Float64Array(ny * n * YS);
  const fxs = new Float64Array(nx);
  const fys = new Float64Array(ny);
  for (let ix = 0; ix < nx; ix++) {
    const fx = (xsM[ix] * lp) / L;
    fxs[ix] = fx;
    for (let j = 0; j < n; j++) {
      const o = (ix * n + j) * XS;
      const u = t.qx[j] - fx;
      const ph = (k * u * u) / (2 * lp);
      const c = Math.cos(ph), s = Math.sin(ph);
      X[o] = t.br[j] * c - t.bi[j] * s;
      X[o + 1] = t.br[j] * s + t.bi[j] * c;
      const dr = t.g0xr[j] - kap * fx, di = t.g0xi[j];
      X[o + 2] = t.mvxr[j] * dr - t.mvxi[j] * di;
      X[o + 3] = t.mvxr[j] * di + t.mvxi[j] * dr;
      const d2r = dr * dr - di * di, d2i = 2 * dr * di;
      X[o + 4] = t.mxxr[j] * d2r - t.mxxi[j] * d2i;
      X[o + 5] = t.mxxr[j] * d2i + t.mxxi[j] * d2r;
      X[o + 6] = 2 * (t.mxyr[j] * dr - t.mxyi[j] * di);
      X[o + 7] = 2 * (t.mxyr[j] * di + t.mxyi[j] * dr);
      X[o + 8] = dr;
      X[o + 9] = di;
    }
  }
  for (let iy = 0; iy < ny; iy++) {
    const fy = (ysM[iy] * lp) / L;
    fys[iy] = fy;
    for (let j = 0; j < n; j++) {
      const o = (iy * n + j) * YS;
      const u = t.qy[j] - fy;
      const ph = (k * u * u) / (2 * lp);
      Y[o] = Math.cos(ph);
      Y[o + 1] = Math.sin(ph);
      const dr = t.g0yr[j] - kap * fy, di = t.g0yi[j];
      Y[o + 2] = t.mvyr[j] * dr - t.mvyi[j] * di;
      Y[o + 3] = t.mvyr[j] * di + t.mvyi[j] * dr;
      const d2r = dr * dr - di * di, d2i = 2 * dr * di;
      Y[o + 4] = t.myyr[j] * d2r - t.myyi[j] * d2i;
      Y[o + 5] = t.myyr[j] * d2i + t.myyi[j] * d2r;
      Y[o + 6] = dr;
      Y[o + 7] = di;
    }
  }

  // --- derivative set-up
  const terms = options.derivativeTerms ?? [];
  const params: string[] = terms.map((j) => `z${j}`);
  const wantCenter = !!options.centerDerivatives;
  if (wantCenter) params.push('px', 'py');
  const np = params.length;
  const nTerms = terms.length;
  const outRe = new Float64Array(nx * ny);
  const outIm = new Float64Array(nx * ny);
  const dRe = params.map(() => new Float64Array(nx * ny));
  const dIm = params.map(() => new Float64Array(nx * ny));

  // Rim sums Σ_j h_j (and their derivatives), without the factor −Δφ.
  const rimRe = new Float64Array(nx * ny);
  const rimIm = new Float64Array(nx * ny);
  if (np > 0) {
    const tables = derivativeTables(setup, t, terms, lambda, k, kap, n, nx, ny, X, Y, fxs, fys, lp, wantCenter);
    rimSumsWithDerivatives(X, Y, tables, n, nx, ny, rimRe, rimIm, dRe, dIm, mask);
  }
  // Next-order correction for non-quadratic wavefronts, blended out near the shadow edge where its
  // expansion (in powers of 1/s) fails: full weight when the camera point is more than 2·d0 from the rim
  // (in the disc plane), none within d0, d0 = 12·a/N.
  const third = options.thirdOrder === false ? null : thirdOrderTable(setup, t, poly, n, k);
  let corrRe: Float64Array | null = null;
  let corrIm: Float64Array | null = null;
  let corrEps: Float64Array | null = null;
  if (third) {
    corrRe = new Float64Array(nx * ny);
    corrIm = new Float64Array(nx * ny);
    corrEps = new Float64Array(nx * ny);
    rimSumsThirdOrder(X, Y, third, n, nx, ny, corrRe, corrIm, corrEps, np === 0 ? rimRe : null, np === 0 ? rimIm : null, mask);
  } else if (np === 0) rimSums(X, Y, n, nx, ny, rimRe, rimIm, mask);
  const d0 = (12 * setup.disc.radiusM) / n;

  const termUnitPolys = terms.map((jz) => zernikePolynomialM([{ j: jz, value: 1 }], setup.zernikeRadiusM, lambda));
  const fbd = new Float64Array(2 * np);
  const ctx: SaddleContext = { k, lpM: lp, gamma: 1 / (k * setup.beam.radiusM ** 2), cx: setup.beam.centerM[0], cy: setup.beam.centerM[1], poly };
  const sad = newSaddleResult();
  const invalid = new Uint8Array(nx * ny);
  let invalidCount = 0;
  const rd = emptyDerivs();
  const pre = 1 / (lambda * L); // |1/(iλL)|; the factor 1/i is applied at the end
  const startQ = new Float64Array(4);
  let haveStart = false;
  for (let iy = 0; iy < ny; iy++) {
    haveStart = false;
    for (let ix = 0; ix < nx; ix++) {
      const pix = iy * nx + ix;
      if (mask && !mask[pix]) continue;
      // ∫∫_outside = −Δφ·Σh − Σ_near R·π·cot(Np/2) + U_all·(n_far_out/2 + n_near/4)
      const fx = fxs[ix], fy = fys[iy];
      let sumR = rimRe[pix], sumI = rimIm[pix];
      if (corrRe && corrIm) {
        const dist = Math.abs(Math.hypot(fx, fy) - edgeRadius(setup.disc, Math.atan2(fy, fx)).r);
        const x = Math.min(1, Math.max(0, (dist - d0) / d0));
        // …and where the correction itself is large (low Fresnel numbers) the expansion is not trusted:
        // full weight for max|ε| ≤ 0.05, none above 0.15.
        const y = Math.min(1, Math.max(0, (0.15 - corrEps![pix]) / 0.1));
        const wgt = x * x * (3 - 2 * x) * y * y * (3 - 2 * y);
        sumR += wgt * (corrRe[pix] - sumR);
        sumI += wgt * (corrIm[pix] - sumI);
      }
      let totR = -dphi * sumR, totI = -dphi * sumI;
      // Rim-sum derivatives → dU = (1/(iλL))·(−Δφ)·Σδh, with dF/dP = L'/L for the camera point.
      for (let p = 0; p < np; p++) {
        const sc = p >= nTerms ? lp / L : 1;
        const vr = -dphi * dRe[p][pix] * sc, vi = -dphi * dIm[p][pix] * sc;
        dRe[p][pix] = pre * vi;
        dIm[p][pix] = -pre * vr;
      }
      // Deep inside the shadow both singular points lie well inside the disc: no free-beam term.
      evalPolynomial(poly, fx, fy, rd);
      const q0x = fx - lp * rd.x, q0y = fy - lp * rd.y;
      const rim0 = edgeRadius(setup.disc, Math.atan2(q0y, q0x)).r;
      const slack = 0.02 * rim0 + 2 * lp * ctx.gamma * Math.hypot(fx - ctx.cx, fy - ctx.cy);
      if (Math.hypot(q0x, q0y) >= rim0 * (1 - 30 / n) - slack) {
        const e0 = edgePart(setup, ctx, fx, fy, n, sad, haveStart ? startQ : null);
        if (!e0) {
          invalid[pix] = 1;
          invalidCount++;
        } else {
          startQ.set(sad.q);
          haveStart = true;
          totR += e0[0];
          totI += e0[1];
          // Derivatives of the free-beam and pole terms, exact (edgePartDerivatives; the rim sum is
          // differentiated above). dU = −i·d(tot)/(λL).
          if (np > 0) {
            edgePartDerivatives(setup, sad, poly, termUnitPolys, n, k, kap, fx, fy, wantCenter, fbd);
            for (let p = 0; p < np; p++) {
              const sc = p >= nTerms ? lp / L : 1;
              dRe[p][pix] += pre * fbd[2 * p + 1] * sc;
              dIm[p][pix] -= pre * fbd[2 * p] * sc;
            }
          }
        }
      }
      // U = tot/(iλL) = −i·tot/(λL)
      outRe[pix] = pre * totI;
      outIm[pix] = -pre * totR;
    }
  }
  return { nx, ny, re: outRe, im: outIm, params, dRe, dIm, nPhi: n, invalid, invalidCount };
}

interface DerivativeTables {
  nTerms: number;
  center: boolean;
  /** terms interleaved: XA[((ix·n + j)·nT + t)·6] = δn_x (2), δs_x (2), 2·δM_xy·d_x (2); YA[((iy·n + j)·nT + t)·4] = δn_y (2), δs_y (2); KA[j·nT + t] = k·Z_t */
  XA: Float64Array;
  YA: Float64Array;
  KA: Float64Array;
  /** centre: XC[(ix·n + j)·3] = −2κ·M_xx·d_x (2), phase rate x; YC[(iy·n + j)·3] = −2κ·M_yy·d_y (2), phase rate y;
   * JC[j·8] = −κ·m_x (2), −κ·m_y (2), −2κ·M_xy (2) */
  XC: Float64Array;
  YC: Float64Array;
  JC: Float64Array;
}

function derivativeTables(
  setup: BenchSetup,
  t: RimTables,
  terms: readonly number[],
  lambda: number,
  k: number,
  kap: number,
  n: number,
  nx: number,
  ny: number,
  X: Float64Array,
  Y: Float64Array,
  fxs: Float64Array,
  fys: Float64Array,
  lp: number,
  center: boolean,
): DerivativeTables {
  // Terms interleaved so the kernel walks memory in order: XA[((ix·n + j)·nT + t)·6 + ·], YA[((iy·n + j)·nT + t)·4 + ·], KA[j·nT + t].
  const nT = terms.length;
  const XA = new Float64Array(nx * n * nT * 6);
  const YA = new Float64Array(ny * n * nT * 4);
  const KA = new Float64Array(n * nT);
  const dphi = (2 * Math.PI) / n;
  const d = emptyDerivs();
  for (let tt = 0; tt < nT; tt++) {
    const jz = terms[tt];
    const tp = zernikePolynomialM([{ j: jz, value: 1 }], setup.zernikeRadiusM, lambda);
    const kz = new Float64Array(n);
    const dmv = new Float64Array(4 * n);
    const dM = new Float64Array(6 * n);
    const mdg = new Float64Array(2 * n);
    const dg = new Float64Array(2 * n);
    for (let j = 0; j < n; j++) {
      const p = edgePoint(setup.disc, j * dphi);
      evalPolynomial(tp, p.x, p.y, d);
      kz[j] = k * d.v;
      const dgx = k * d.x, dgy = k * d.y;
      dg[2 * j] = dgx;
      dg[2 * j + 1] = dgy;
      // δH = k∇∇Z (real); δM = −M·δH·M
      const hxx = k * d.xx, hxy = k * d.xy, hyy = k * d.yy;
      const Mxxr = t.mxxr[j], Mxxi = t.mxxi[j], Mxyr = t.mxyr[j], Mxyi = t.mxyi[j], Myyr = t.myyr[j], Myyi = t.myyi[j];
      // P = δH·M
      const p11r = hxx * Mxxr + hxy * Mxyr, p11i = hxx * Mxxi + hxy * Mxyi;
      const p12r = hxx * Mxyr + hxy * Myyr, p12i = hxx * Mxyi + hxy * Myyi;
      const p21r = hxy * Mxxr + hyy * Mxyr, p21i = hxy * Mxxi + hyy * Mxyi;
      const p22r = hxy * Mxyr + hyy * Myyr, p22i = hxy * Mxyi + hyy * Myyi;
      // Q = M·P ; δM = −Q
      const q11r = Mxxr * p11r - Mxxi * p11i + Mxyr * p21r - Mxyi * p21i;
      const q11i = Mxxr * p11i + Mxxi * p11r + Mxyr * p21i + Mxyi * p21r;
      const q12r = Mxxr * p12r - Mxxi * p12i + Mxyr * p22r - Mxyi * p22i;
      const q12i = Mxxr * p12i + Mxxi * p12r + Mxyr * p22i + Mxyi * p22r;
      const q22r = Mxyr * p12r - Mxyi * p12i + Myyr * p22r - Myyi * p22i;
      const q22i = Mxyr * p12i + Mxyi * p12r + Myyr * p22i + Myyi * p22r;
      dM[6 * j] = -q11r; dM[6 * j + 1] = -q11i; dM[6 * j + 2] = -q12r; dM[6 * j + 3] = -q12i; dM[6 * j + 4] = -q22r; dM[6 * j + 5] = -q22i;
      const nux = p.dy, nuy = -p.dx;
      dmv[4 * j] = dM[6 * j] * nux + dM[6 * j + 2] * nuy;
      dmv[4 * j + 1] = dM[6 * j + 1] * nux + dM[6 * j + 3] * nuy;
      dmv[4 * j + 2] = dM[6 * j + 2] * nux + dM[6 * j + 4] * nuy;
      dmv[4 * j + 3] = dM[6 * j + 3] * nux + dM[6 * j + 5] * nuy;
      mdg[2 * j] = t.mvxr[j] * dgx + t.mvyr[j] * dgy;
      mdg[2 * j + 1] = t.mvxi[j] * dgx + t.mvyi[j] * dgy;
    }
    for (let j = 0; j < n; j++) KA[j * nT + tt] = kz[j];
    for (let ix = 0; ix < nx; ix++) {
      for (let j = 0; j < n; j++) {
        const o = ix * n + j;
        const w = (o * nT + tt) * 6;
        const dr = X[o * 10 + 8], di = X[o * 10 + 9];
        // δn_x = δm_x·d_x + m·δg0
        XA[w] = dmv[4 * j] * dr - dmv[4 * j + 1] * di + mdg[2 * j];
        XA[w + 1] = dmv[4 * j] * di + dmv[4 * j + 1] * dr + mdg[2 * j + 1];
        // δs_x = δM_xx·d_x² + 2(δg0x·M_xx + δg0y·M_xy)·d_x
        const d2r = dr * dr - di * di, d2i = 2 * dr * di;
        const cr = 2 * (dg[2 * j] * t.mxxr[j] + dg[2 * j + 1] * t.mxyr[j]);
        const ci = 2 * (dg[2 * j] * t.mxxi[j] + dg[2 * j + 1] * t.mxyi[j]);
        XA[w + 2] = dM[6 * j] * d2r - dM[6 * j + 1] * d2i + cr * dr - ci * di;
        XA[w + 3] = dM[6 * j] * d2i + dM[6 * j + 1] * d2r + cr * di + ci * dr;
        XA[w + 4] = 2 * (dM[6 * j + 2] * dr - dM[6 * j + 3] * di);
        XA[w + 5] = 2 * (dM[6 * j + 2] * di + dM[6 * j + 3] * dr);
      }
    }
    for (let iy = 0; iy < ny; iy++) {
      for (let j = 0; j < n; j++) {
        const o = iy * n + j;
        const w = (o * nT + tt) * 4;
        const dr = Y[o * 8 + 6], di = Y[o * 8 + 7];
        YA[w] = dmv[4 * j + 2] * dr - dmv[4 * j + 3] * di;
        YA[w + 1] = dmv[4 * j + 2] * di + dmv[4 * j + 3] * dr;
        const d2r = dr * dr - di * di, d2i = 2 * dr * di;
        const cr = 2 * (dg[2 * j] * t.mxyr[j] + dg[2 * j + 1] * t.myyr[j]);
        const ci = 2 * (dg[2 * j] * t.mxyi[j] + dg[2 * j + 1] * t.myyi[j]);
        YA[w + 2] = dM[6 * j + 4] * d2r - dM[6 * j + 5] * d2i + cr * dr - ci * di;
        YA[w + 3] = dM[6 * j + 4] * d2i + dM[6 * j + 5] * d2r + cr * di + ci * dr;
      }
    }
  }
  const XC = new Float64Array(center ? nx * n * 3 : 0);
  const YC = new Float64Array(center ? ny * n * 3 : 0);
  const JC = new Float64Array(center ? n * 6 : 0);
  if (center) {
    for (let j = 0; j < n; j++) {
      JC[6 * j] = -kap * t.mvxr[j];
      JC[6 * j + 1] = -kap * t.mvxi[j];
      JC[6 * j + 2] = -kap * t.mvyr[j];
      JC[6 * j + 3] = -kap * t.mvyi[j];
      JC[6 * j + 4] = -2 * kap * t.mxyr[j];
      JC[6 * j + 5] = -2 * kap * t.mxyi[j];
    }
    for (let ix = 0; ix < nx; ix++) {
      for (let j = 0; j < n; j++) {
        const o = ix * n + j;
        const dr = X[o * 10 + 8], di = X[o * 10 + 9];
        XC[o * 3] = -2 * kap * (t.mxxr[j] * dr - t.mxxi[j] * di);
        XC[o * 3 + 1] = -2 * kap * (t.mxxr[j] * di + t.mxxi[j] * dr);
        XC[o * 3 + 2] = (-k * (t.qx[j] - fxs[ix])) / lp;
      }
    }
    for (let iy = 0; iy < ny; iy++) {
      for (let j = 0; j < n; j++) {
        const o = iy * n + j;
        const dr = Y[o * 8 + 6], di = Y[o * 8 + 7];
        YC[o * 3] = -2 * kap * (t.myyr[j] * dr - t.myyi[j] * di);
        YC[o * 3 + 1] = -2 * kap * (t.myyr[j] * di + t.myyi[j] * dr);
        YC[o * 3 + 2] = (-k * (t.qy[j] - fys[iy])) / lp;
      }
    }
  }
  return { nTerms: terms.length, center, XA, YA, KA, XC, YC, JC };
}

/**
 * Rim sums and their analytic derivatives. For h = E·q/i with q = n/s:
 *   δh = E·[(δn − q·δs)/s + i·δφ·q]/i
 * where δφ is the change of the phase of E (k·Z_t on the rim for a Zernike term, −k(Q−F)/L' for the
 * camera point). The camera-point derivatives carry dF/dP = L'/L, applied by the caller… here: the sums
 * are in F and are scaled by L'/L below via `pScale`.
 */
function rimSumsWithDerivatives(
  X: Float64Array,
  Y: Float64Array,
  D: DerivativeTables,
  n: number,
  nx: number,
  ny: number,
  outRe: Float64Array,
  outIm: Float64Array,
  dRe: Float64Array[],
  dIm: Float64Array[],
  mask: Uint8Array | null,
): void {
  const nT = D.nTerms;
  const np = nT + (D.center ? 2 : 0);
  const acc = new Float64Array(2 * np);
  for (let iy = 0; iy < ny; iy++) {
    for (let ix = 0; ix < nx; ix++) {
      if (mask && !mask[iy * nx + ix]) continue;
      let sr = 0, si = 0;
      acc.fill(0);
      for (let j = 0; j < n; j++) {
        const xa = (ix * n + j) * 10;
        const yb = (iy * n + j) * 8;
        const axr = X[xa], axi = X[xa + 1];
        const eyr = Y[yb], eyi = Y[yb + 1];
        const er = axr * eyr - axi * eyi;
        const ei = axr * eyi + axi * eyr;
        const nr = X[xa + 2] + Y[yb + 2];
        const ni = X[xa + 3] + Y[yb + 3];
        const x2r = X[xa + 6], x2i = X[xa + 7], dyr = Y[yb + 6], dyi = Y[yb + 7];
        const ddr = X[xa + 4] + Y[yb + 4] + x2r * dyr - x2i * dyi;
        const ddi = X[xa + 5] + Y[yb + 5] + x2r * dyi + x2i * dyr;
        const inv = 1 / (ddr * ddr + ddi * ddi);
        const isr = ddr * inv, isi = -ddi * inv; // 1/s
        const qr = nr * isr - ni * isi, qi = nr * isi + ni * isr; // q = n/s
        sr += er * qi + ei * qr;
        si -= er * qr - ei * qi;
        const XA = D.XA, YA = D.YA, KA = D.KA;
        let xo = (ix * n + j) * nT * 6;
        let yo = (iy * n + j) * nT * 4;
        for (let tt = 0; tt < nT; tt++, xo += 6, yo += 4) {
          const dnr = XA[xo] + YA[yo], dni = XA[xo + 1] + YA[yo + 1];
          const dsr = XA[xo + 2] + YA[yo + 2] + XA[xo + 4] * dyr - XA[xo + 5] * dyi;
          const dsi = XA[xo + 3] + YA[yo + 3] + XA[xo + 4] * dyi + XA[xo + 5] * dyr;
          const ur = dnr - (qr * dsr - qi * dsi), ui = dni - (qr * dsi + qi * dsr);
          const kz = KA[j * nT + tt];
          const vr = ur * isr - ui * isi - kz * qi;
          const vi = ur * isi + ui * isr + kz * qr;
          acc[2 * tt] += er * vi + ei * vr;
          acc[2 * tt + 1] -= er * vr - ei * vi;
        }
        if (D.center) {
          const xo = (ix * n + j) * 3, yo = (iy * n + j) * 3, jo = j * 6;
          const dxr = X[xa + 8], dxi = X[xa + 9];
          // x: δn = −κ m_x, δs = −2κ(M_xx d_x + M_xy d_y), phase rate −k(Qx − Fx)/L'
          {
            const dnr = D.JC[jo], dni = D.JC[jo + 1];
            const dsr = D.XC[xo] + D.JC[jo + 4] * dyr - D.JC[jo + 5] * dyi;
            const dsi = D.XC[xo + 1] + D.JC[jo + 4] * dyi + D.JC[jo + 5] * dyr;
            const ur = dnr - (qr * dsr - qi * dsi), ui = dni - (qr * dsi + qi * dsr);
            const ph = D.XC[xo + 2];
            const vr = ur * isr - ui * isi - ph * qi;
            const vi = ur * isi + ui * isr + ph * qr;
            acc[2 * nT] += er * vi + ei * vr;
            acc[2 * nT + 1] -= er * vr - ei * vi;
          }
          // y: δn = −κ m_y, δs = −2κ(M_xy d_x + M_yy d_y)
          {
            const dnr = D.JC[jo + 2], dni = D.JC[jo + 3];
            const dsr = D.YC[yo] + D.JC[jo + 4] * dxr - D.JC[jo + 5] * dxi;
            const dsi = D.YC[yo + 1] + D.JC[jo + 4] * dxi + D.JC[jo + 5] * dxr;
            const ur = dnr - (qr * dsr - qi * dsi), ui = dni - (qr * dsi + qi * dsr);
            const ph = D.YC[yo + 2];
            const vr = ur * isr - ui * isi - ph * qi;
            const vi = ur * isi + ui * isr + ph * qr;
            acc[2 * nT + 2] += er * vi + ei * vr;
            acc[2 * nT + 3] -= er * vr - ei * vi;
          }
        }
      }
      const pix = iy * nx + ix;
      outRe[pix] = sr;
      outIm[pix] = si;
      for (let p = 0; p < np; p++) {
        dRe[p][pix] = acc[2 * p];
        dIm[p][pix] = acc[2 * p + 1];
      }
    }
  }
}

/**
 * Σ_j h_j for every camera point, h = E·n/(i·s) (see fastField), over interleaved tables:
 * XT[(ix·n + j)·10 + ·] = AX (2), n_x (2), s_xx (2), 2·M_xy·d_x (2), d_x (2);
 * YT[(iy·n + j)·8 + ·] = E_y (2), n_y (2), s_yy (2), d_y (2).
 */
function rimSums(XT: Float64Array, YT: Float64Array, n: number, nx: number, ny: number, outRe: Float64Array, outIm: Float64Array, mask: Uint8Array | null): void {
  for (let iy = 0; iy < ny; iy++) {
    const yo = iy * n * 8;
    for (let ix = 0; ix < nx; ix++) {
      if (mask && !mask[iy * nx + ix]) continue;
      let xa = ix * n * 10;
      let yb = yo;
      let sr = 0;
      let si = 0;
      for (let j = 0; j < n; j++, xa += 10, yb += 8) {
        const axr = XT[xa], axi = XT[xa + 1];
        const eyr = YT[yb], eyi = YT[yb + 1];
        const er = axr * eyr - axi * eyi;
        const ei = axr * eyi + axi * eyr;
        const nr = XT[xa + 2] + YT[yb + 2];
        const ni = XT[xa + 3] + YT[yb + 3];
        const x2r = XT[xa + 6], x2i = XT[xa + 7], dyr = YT[yb + 6], dyi = YT[yb + 7];
        const ddr = XT[xa + 4] + YT[yb + 4] + x2r * dyr - x2i * dyi;
        const ddi = XT[xa + 5] + YT[yb + 5] + x2r * dyi + x2i * dyr;
        // h = E·n/(i·s) = E·n·conj(s)·(−i)/|s|²
        const inv = 1 / (ddr * ddr + ddi * ddi);
        const qr = (nr * ddr + ni * ddi) * inv;
        const qi = (ni * ddr - nr * ddi) * inv;
        sr += er * qi + ei * qr;
        si -= er * qr - ei * qi;
      }
      outRe[iy * nx + ix] = sr;
      outIm[iy * nx + ix] = si;
    }
  }
}

/**
 * Next-order correction for wavefronts with third derivatives (coma, trefoil, spherical …).
 * For a non-quadratic Φ, ∇·V = e^{iΦ}·(1 + ε) with
 *   ε = [T(u,u,u)/s − Σ_l u_l·Σ_jk M_jk·T_jkl]/(i·s),  u = H⁻¹g, s = gᵀu, T = ∇∇∇Φ = k·∇∇∇W,
 * (derived here from the divergence of V; M = H⁻¹). Treating ε as a slowly varying amplitude and applying
 * the same divergence identity once more gives ∫∫ e^{iΦ} ≈ −∮ (1 − ε)·V·n. The rim sums of values are
 * recomputed with that factor; derivatives keep the first-order form.
 * Per rim sample: C[j·14 + ·] = M_xx (2), M_xy (2), M_yy (2), A_x (2), A_y (2), T_xxx, T_xxy, T_xyy, T_yyy,
 * with A_l = Σ_jk M_jk·T_jkl.
 */
function thirdOrderTable(setup: BenchSetup, t: RimTables, poly: Polynomial2D, n: number, k: number): Float64Array | null {
  if (poly.degree < 3) return null;
  const C = new Float64Array(n * 14);
  let any = false;
  for (let j = 0; j < n; j++) {
    const [txxx, txxy, txyy, tyyy] = evalThirdDerivatives(poly, t.qx[j], t.qy[j]).map((v) => k * v);
    if (txxx || txxy || txyy || tyyy) any = true;
    const o = j * 14;
    C[o] = t.mxxr[j]; C[o + 1] = t.mxxi[j];
    C[o + 2] = t.mxyr[j]; C[o + 3] = t.mxyi[j];
    C[o + 4] = t.myyr[j]; C[o + 5] = t.myyi[j];
    C[o + 6] = t.mxxr[j] * txxx + 2 * t.mxyr[j] * txxy + t.myyr[j] * txyy;
    C[o + 7] = t.mxxi[j] * txxx + 2 * t.mxyi[j] * txxy + t.myyi[j] * txyy;
    C[o + 8] = t.mxxr[j] * txxy + 2 * t.mxyr[j] * txyy + t.myyr[j] * tyyy;
    C[o + 9] = t.mxxi[j] * txxy + 2 * t.mxyi[j] * txyy + t.myyi[j] * tyyy;
    C[o + 10] = txxx; C[o + 11] = txxy; C[o + 12] = txyy; C[o + 13] = tyyy;
  }
  void setup;
  return any ? C : null;
}

/** Third derivatives [W_xxx, W_xxy, W_xyy, W_yyy] of a polynomial at a real point. */
function evalThirdDerivatives(p: Polynomial2D, x: number, y: number): [number, number, number, number] {
  let a = 0, b = 0, c = 0, d = 0;
  for (let m = 0; m < p.coef.length; m++) {
    const px = p.px[m], py = p.py[m], cf = p.coef[m];
    const term = (dx: number, dy: number) => {
      if (px < dx || py < dy) return 0;
      let f = cf;
      for (let i = 0; i < dx; i++) f *= px - i;
      for (let i = 0; i < dy; i++) f *= py - i;
      return f * Math.pow(x, px - dx) * Math.pow(y, py - dy);
    };
    a += term(3, 0);
    b += term(2, 1);
    c += term(1, 2);
    d += term(0, 3);
  }
  return [a, b, c, d];
}

function rimSumsThirdOrder(
  XT: Float64Array,
  YT: Float64Array,
  C: Float64Array,
  n: number,
  nx: number,
  ny: number,
  outRe: Float64Array,
  outIm: Float64Array,
  /** largest |ε| over the rim for each camera point (the size of the correction) */
  outMaxEps: Float64Array,
  /** when given, also the first-order sums (the same pass) */
  firstRe: Float64Array | null = null,
  firstIm: Float64Array | null = null,
  mask: Uint8Array | null = null,
): void {
  for (let iy = 0; iy < ny; iy++) {
    const yo = iy * n * 8;
    for (let ix = 0; ix < nx; ix++) {
      if (mask && !mask[iy * nx + ix]) continue;
      let xa = ix * n * 10;
      let yb = yo;
      let co = 0;
      let sr = 0;
      let si = 0;
      let maxEps2 = 0;
      let fr1 = 0;
      let fi1 = 0;
      for (let j = 0; j < n; j++, xa += 10, yb += 8, co += 14) {
        const axr = XT[xa], axi = XT[xa + 1];
        const eyr = YT[yb], eyi = YT[yb + 1];
        const er = axr * eyr - axi * eyi;
        const ei = axr * eyi + axi * eyr;
        const nr = XT[xa + 2] + YT[yb + 2];
        const ni = XT[xa + 3] + YT[yb + 3];
        const x2r = XT[xa + 6], x2i = XT[xa + 7], dyr = YT[yb + 6], dyi = YT[yb + 7];
        const ddr = XT[xa + 4] + YT[yb + 4] + x2r * dyr - x2i * dyi;
        const ddi = XT[xa + 5] + YT[yb + 5] + x2r * dyi + x2i * dyr;
        const inv = 1 / (ddr * ddr + ddi * ddi);
        const isr = ddr * inv, isi = -ddi * inv; // 1/s
        let qr = nr * isr - ni * isi;
        let qi = nr * isi + ni * isr;
        fr1 += er * qi + ei * qr;
        fi1 -= er * qr - ei * qi;
        // u = M·d
        const dxr = XT[xa + 8], dxi = XT[xa + 9];
        const mxxr = C[co], mxxi = C[co + 1], mxyr = C[co + 2], mxyi = C[co + 3], myyr = C[co + 4], myyi = C[co + 5];
        const uxr = mxxr * dxr - mxxi * dxi + mxyr * dyr - mxyi * dyi;
        const uxi = mxxr * dxi + mxxi * dxr + mxyr * dyi + mxyi * dyr;
        const uyr = mxyr * dxr - mxyi * dxi + myyr * dyr - myyi * dyi;
        const uyi = mxyr * dxi + mxyi * dxr + myyr * dyi + myyi * dyr;
        // T(u,u,u) = Txxx ux³ + 3 Txxy ux² uy + 3 Txyy ux uy² + Tyyy uy³
        const ux2r = uxr * uxr - uxi * uxi, ux2i = 2 * uxr * uxi;
        const uy2r = uyr * uyr - uyi * uyi, uy2i = 2 * uyr * uyi;
        const ux3r = ux2r * uxr - ux2i * uxi, ux3i = ux2r * uxi + ux2i * uxr;
        const uy3r = uy2r * uyr - uy2i * uyi, uy3i = uy2r * uyi + uy2i * uyr;
        const x2yr = ux2r * uyr - ux2i * uyi, x2yi = ux2r * uyi + ux2i * uyr;
        const xy2r = uy2r * uxr - uy2i * uxi, xy2i = uy2r * uxi + uy2i * uxr;
        const Txxx = C[co + 10], Txxy = C[co + 11], Txyy = C[co + 12], Tyyy = C[co + 13];
        const tur = Txxx * ux3r + 3 * Txxy * x2yr + 3 * Txyy * xy2r + Tyyy * uy3r;
        const tui = Txxx * ux3i + 3 * Txxy * x2yi + 3 * Txyy * xy2i + Tyyy * uy3i;
        // a = T(u,u,u)/s − (A_x u_x + A_y u_y)
        const ar = tur * isr - tui * isi - (C[co + 6] * uxr - C[co + 7] * uxi + C[co + 8] * uyr - C[co + 9] * uyi);
        const ai = tur * isi + tui * isr - (C[co + 6] * uxi + C[co + 7] * uxr + C[co + 8] * uyi + C[co + 9] * uyr);
        // ε = a/(i·s) = −i·a/s ;  factor (1 − ε)
        const asr = ar * isr - ai * isi, asi = ar * isi + ai * isr;
        const e2 = asr * asr + asi * asi;
        if (e2 > maxEps2) maxEps2 = e2;
        const fr = 1 - asi, fi = asr; // 1 − (−i)(asr + i·asi) = 1 − asi + i·asr
        const q2r = qr * fr - qi * fi;
        qi = qr * fi + qi * fr;
        qr = q2r;
        sr += er * qi + ei * qr;
        si -= er * qr - ei * qi;
      }
      outRe[iy * nx + ix] = sr;
      outIm[iy * nx + ix] = si;
      outMaxEps[iy * nx + ix] = Math.sqrt(maxEps2);
      if (firstRe && firstIm) {
        firstRe[iy * nx + ix] = fr1;
        firstIm[iy * nx + ix] = fi1;
      }
    }
  }
}

/**
 * Near poles of the last singularWeight call (at most two), POLE numbers each: the root t of the quadratic
 * form and the other root o, the pole p (complex φ), cot(Np/2) and the residue R, all as (re, im).
 */
const POLE = 10;
const lastPoles = new Float64Array(2 * POLE);
let lastWeight = 0;
let lastNearPoles = 0;

/** Free-beam and pole terms for one camera point: U_all·(n_far_out/2 + n_near/4) − Σ_near R·π·cot(Np/2). */
function edgePart(setup: BenchSetup, ctx: SaddleContext, fx: number, fy: number, n: number, sad: SaddleResult, start?: Float64Array | null): [number, number] | null {
  if (!solveSaddle(ctx, fx, fy, sad, start).ok) {
    if (!start || !solveSaddle(ctx, fx, fy, sad).ok) return null;
  }
  const weight = singularWeight(setup, sad, n);
  let cr = 0, ci = 0;
  for (let q = 0; q < lastNearPoles; q++) {
    const o = q * POLE;
    const Rr = lastPoles[o + 8], Ri = lastPoles[o + 9], ctr = lastPoles[o + 6], cti = lastPoles[o + 7];
    cr += Math.PI * (Rr * ctr - Ri * cti);
    ci += Math.PI * (Rr * cti + Ri * ctr);
  }
  lastWeight = weight;
  return [weight * sad.allRe - cr, weight * sad.allIm - ci];
}

const cplxScratch = new Float64Array(12);

const thirdScratch = new Float64Array(8);
const poleEdge = new Float64Array(8);
/** Per near pole, the parts of its correction that do not depend on the parameter (see edgePartDerivatives). */
const PP = 30;
const polePre = new Float64Array(2 * PP);

/**
 * Exact derivatives of the edge part weight·U_all − Σ_near π·R·cot(Np/2) (edgePart, whose results for this
 * camera point are in `sad`, `lastWeight` and `lastPoles`), with respect to the Zernike coefficients
 * (`termPolys`, waves) and, when `center`, the point F in the disc plane. By implicit differentiation: for a
 * parameter c with ∂Φ/∂c, ∂g/∂c and ∂H/∂c at the saddle Q* (g = ∇Φ, H = ∇∇Φ, M = H⁻¹, T = k∇∇∇W),
 *   dQ* = −M·∂g,  dΦ0 = ∂Φ/∂c (∇Φ(Q*) = 0),  dH = ∂H + T·dQ*,  dU_all = U_all·(i·dΦ0 − ½·tr(M·dH)),
 * the roots of H11 t² + 2H12 t + H22 = 0 move by dt = −(dH11 t² + 2dH12 t + dH22)/(2(H11 t + H12)),
 * the pole (z_x − t·z_y = 0, z = Q(p) − Q*) by dp = (dQ*x − t·dQ*y + dt·z_y)/(Q'x − t·Q'y), and the residue
 * R = e^{iΦ0}·A/(i·H11·B·D) (A = z·ν, B = Q'x − t·Q'y, D = z_x − o·z_y at p) by
 *   dR/R = i·dΦ0 + dA/A − dH11/H11 − dB/B − dD/D;  d cot(Np/2) = −(N/2)·(1 + cot²)·dp.
 * For a Zernike term ∂Φ = k·Z, ∂g = k∇Z, ∂H = k∇∇Z; for F: ∂Φ/∂F = −κ·(Q* − F), ∂g = −κ·e, ∂H = 0.
 * Returns (re, im) of each derivative into out[2p], out[2p+1].
 */
function edgePartDerivatives(
  setup: BenchSetup,
  sad: SaddleResult,
  poly: Polynomial2D,
  termPolys: Polynomial2D[],
  n: number,
  k: number,
  kap: number,
  fx: number,
  fy: number,
  center: boolean,
  out: Float64Array,
): void {
  const h = sad.h;
  const h11r = h[0], h11i = h[1], h12r = h[2], h12i = h[3], h22r = h[4], h22i = h[5];
  // M = H⁻¹
  const detr = h11r * h22r - h11i * h22i - (h12r * h12r - h12i * h12i);
  const deti = h11r * h22i + h11i * h22r - 2 * h12r * h12i;
  const dd = detr * detr + deti * deti;
  const idr = detr / dd, idi = -deti / dd;
  const m11r = h22r * idr - h22i * idi, m11i = h22r * idi + h22i * idr;
  const m22r = h11r * idr - h11i * idi, m22i = h11r * idi + h11i * idr;
  const m12r = -(h12r * idr - h12i * idi), m12i = -(h12r * idi + h12i * idr);
  const [qxr, qxi, qyr, qyi] = [sad.q[0], sad.q[1], sad.q[2], sad.q[3]];
  const T = evalThirdDerivativesComplex(poly, qxr, qxi, qyr, qyi, thirdScratch);
  const t1r = k * T[0], t1i = k * T[1], t2r = k * T[2], t2i = k * T[3], t3r = k * T[4], t3i = k * T[5], t4r = k * T[6], t4i = k * T[7];
  const weight = lastWeight;
  const uwr = weight * sad.allRe, uwi = weight * sad.allIm;
  // 1/H11
  const h11m = h11r * h11r + h11i * h11i;
  const ih11r = h11r / h11m, ih11i = -h11i / h11m;
  const nPoles = lastNearPoles;
  for (let q = 0; q < nPoles; q++) {
    const o = q * POLE, w = q * PP;
    const tr = lastPoles[o], ti = lastPoles[o + 1], or = lastPoles[o + 2], oi = lastPoles[o + 3];
    const pr = lastPoles[o + 4], pi = lastPoles[o + 5];
    const e = edgePointComplex(setup.disc, pr, pi, poleEdge);
    const s2 = edgePointSecondComplex(setup.disc, pr, pi);
    const zxr = e[0] - qxr, zxi = e[1] - qxi, zyr = e[2] - qyr, zyi = e[3] - qyi;
    const dxr = e[4], dxi = e[5], dyr = e[6], dyi = e[7]; // Q'
    // A = zx·Q'y − zy·Q'x ; B = Q'x − t·Q'y ; D = zx − o·zy
    const Ar = zxr * dyr - zxi * dyi - (zyr * dxr - zyi * dxi);
    const Ai = zxr * dyi + zxi * dyr - (zyr * dxi + zyi * dxr);
    const Br = dxr - (tr * dyr - ti * dyi), Bi = dxi - (tr * dyi + ti * dyr);
    const Dr = zxr - (or * zyr - oi * zyi), Di = zxi - (or * zyi + oi * zyr);
    const Am = Ar * Ar + Ai * Ai, Bm = Br * Br + Bi * Bi, Dm = Dr * Dr + Di * Di;
    // 1/(2(H11 t + H12)), 1/(2(H11 o + H12))
    const ptr = 2 * (h11r * tr - h11i * ti + h12r), pti = 2 * (h11r * ti + h11i * tr + h12i);
    const ptm = ptr * ptr + pti * pti;
    const por = 2 * (h11r * or - h11i * oi + h12r), poi = 2 * (h11r * oi + h11i * or + h12i);
    const pom = por * por + poi * poi;
    const cr = lastPoles[o + 6], ci = lastPoles[o + 7];
    // (N/2)·(1 + cot²)
    const c2r = 1 + cr * cr - ci * ci, c2i = 2 * cr * ci;
    polePre[w] = tr; polePre[w + 1] = ti; polePre[w + 2] = or; polePre[w + 3] = oi;
    polePre[w + 4] = zxr; polePre[w + 5] = zxi; polePre[w + 6] = zyr; polePre[w + 7] = zyi;
    polePre[w + 8] = dxr; polePre[w + 9] = dxi; polePre[w + 10] = dyr; polePre[w + 11] = dyi;
    polePre[w + 12] = s2[0]; polePre[w + 13] = s2[1]; polePre[w + 14] = s2[2]; polePre[w + 15] = s2[3];
    polePre[w + 16] = Ar / Am; polePre[w + 17] = -Ai / Am; // 1/A
    polePre[w + 18] = Br / Bm; polePre[w + 19] = -Bi / Bm; // 1/B
    polePre[w + 20] = Dr / Dm; polePre[w + 21] = -Di / Dm; // 1/D
    polePre[w + 22] = ptr / ptm; polePre[w + 23] = -pti / ptm;
    polePre[w + 24] = por / pom; polePre[w + 25] = -poi / pom;
    polePre[w + 26] = (n / 2) * c2r; polePre[w + 27] = (n / 2) * c2i;
    polePre[w + 28] = cr; polePre[w + 29] = ci;
  }
  const nTerms = termPolys.length;
  const np = nTerms + (center ? 2 : 0);
  for (let p = 0; p < np; p++) {
    // ∂Φ, ∂g (→ dQ*), ∂H
    let fr: number, fi: number, dqxr: number, dqxi: number, dqyr: number, dqyi: number;
    let a11r = 0, a11i = 0, a12r = 0, a12i = 0, a22r = 0, a22i = 0;
    if (p < nTerms) {
      const d = evalPolynomialComplex(termPolys[p], qxr, qxi, qyr, qyi, cplxScratch);
      fr = k * d[0]; fi = k * d[1];
      const gxr = k * d[2], gxi = k * d[3], gyr = k * d[4], gyi = k * d[5];
      dqxr = -(m11r * gxr - m11i * gxi + m12r * gyr - m12i * gyi);
      dqxi = -(m11r * gxi + m11i * gxr + m12r * gyi + m12i * gyr);
      dqyr = -(m12r * gxr - m12i * gxi + m22r * gyr - m22i * gyi);
      dqyi = -(m12r * gxi + m12i * gxr + m22r * gyi + m22i * gyr);
      a11r = k * d[6]; a11i = k * d[7]; a12r = k * d[8]; a12i = k * d[9]; a22r = k * d[10]; a22i = k * d[11];
    } else if (p === nTerms) {
      fr = -kap * (qxr - fx); fi = -kap * qxi;
      dqxr = kap * m11r; dqxi = kap * m11i; dqyr = kap * m12r; dqyi = kap * m12i;
    } else {
      fr = -kap * (qyr - fy); fi = -kap * qyi;
      dqxr = kap * m12r; dqxi = kap * m12i; dqyr = kap * m22r; dqyi = kap * m22i;
    }
    // dH = ∂H + T·dQ*
    const dh11r = a11r + (t1r * dqxr - t1i * dqxi) + (t2r * dqyr - t2i * dqyi);
    const dh11i = a11i + (t1r * dqxi + t1i * dqxr) + (t2r * dqyi + t2i * dqyr);
    const dh12r = a12r + (t2r * dqxr - t2i * dqxi) + (t3r * dqyr - t3i * dqyi);
    const dh12i = a12i + (t2r * dqxi + t2i * dqxr) + (t3r * dqyi + t3i * dqyr);
    const dh22r = a22r + (t3r * dqxr - t3i * dqxi) + (t4r * dqyr - t4i * dqyi);
    const dh22i = a22i + (t3r * dqxi + t3i * dqxr) + (t4r * dqyi + t4i * dqyr);
    // i·dΦ0 − ½·tr(M·dH)
    const trr = m11r * dh11r - m11i * dh11i + 2 * (m12r * dh12r - m12i * dh12i) + m22r * dh22r - m22i * dh22i;
    const tri = m11r * dh11i + m11i * dh11r + 2 * (m12r * dh12i + m12i * dh12r) + m22r * dh22i + m22i * dh22r;
    const gr = -fi - 0.5 * trr, gi = fr - 0.5 * tri;
    let outR = gr * uwr - gi * uwi, outI = gr * uwi + gi * uwr;
    // dH11/H11
    const lhr = dh11r * ih11r - dh11i * ih11i, lhi = dh11r * ih11i + dh11i * ih11r;
    for (let q = 0; q < nPoles; q++) {
      const o = q * POLE, w = q * PP;
      const tr = polePre[w], ti = polePre[w + 1], or = polePre[w + 2], oi = polePre[w + 3];
      const zxr = polePre[w + 4], zxi = polePre[w + 5], zyr = polePre[w + 6], zyi = polePre[w + 7];
      const dxr = polePre[w + 8], dxi = polePre[w + 9], dyr = polePre[w + 10], dyi = polePre[w + 11];
      const sxr = polePre[w + 12], sxi = polePre[w + 13], syr = polePre[w + 14], syi = polePre[w + 15];
      // dt = −(dH11 t² + 2dH12 t + dH22)/(2(H11 t + H12)), likewise do
      const tt2r = tr * tr - ti * ti, tt2i = 2 * tr * ti;
      let nr = dh11r * tt2r - dh11i * tt2i + 2 * (dh12r * tr - dh12i * ti) + dh22r;
      let ni = dh11r * tt2i + dh11i * tt2r + 2 * (dh12r * ti + dh12i * tr) + dh22i;
      const dtr = -(nr * polePre[w + 22] - ni * polePre[w + 23]), dti = -(nr * polePre[w + 23] + ni * polePre[w + 22]);
      const oo2r = or * or - oi * oi, oo2i = 2 * or * oi;
      nr = dh11r * oo2r - dh11i * oo2i + 2 * (dh12r * or - dh12i * oi) + dh22r;
      ni = dh11r * oo2i + dh11i * oo2r + 2 * (dh12r * oi + dh12i * or) + dh22i;
      const dor = -(nr * polePre[w + 24] - ni * polePre[w + 25]), doi = -(nr * polePre[w + 25] + ni * polePre[w + 24]);
      // dp = (dQ*x − t·dQ*y + dt·zy)/B
      nr = dqxr - (tr * dqyr - ti * dqyi) + (dtr * zyr - dti * zyi);
      ni = dqxi - (tr * dqyi + ti * dqyr) + (dtr * zyi + dti * zyr);
      const ibr = polePre[w + 18], ibi = polePre[w + 19];
      const dpr = nr * ibr - ni * ibi, dpi = nr * ibi + ni * ibr;
      // dz = Q'·dp − dQ*
      const dzxr = dxr * dpr - dxi * dpi - dqxr, dzxi = dxr * dpi + dxi * dpr - dqxi;
      const dzyr = dyr * dpr - dyi * dpi - dqyr, dzyi = dyr * dpi + dyi * dpr - dqyi;
      // Q''·dp
      const exr = sxr * dpr - sxi * dpi, exi = sxr * dpi + sxi * dpr;
      const eyr = syr * dpr - syi * dpi, eyi = syr * dpi + syi * dpr;
      // dA = dzx·Q'y + zx·Q''y·dp − dzy·Q'x − zy·Q''x·dp
      const dAr = dzxr * dyr - dzxi * dyi + (zxr * eyr - zxi * eyi) - (dzyr * dxr - dzyi * dxi) - (zyr * exr - zyi * exi);
      const dAi = dzxr * dyi + dzxi * dyr + (zxr * eyi + zxi * eyr) - (dzyr * dxi + dzyi * dxr) - (zyr * exi + zyi * exr);
      // dB = Q''x·dp − dt·Q'y − t·Q''y·dp
      const dBr = exr - (dtr * dyr - dti * dyi) - (tr * eyr - ti * eyi);
      const dBi = exi - (dtr * dyi + dti * dyr) - (tr * eyi + ti * eyr);
      // dD = dzx − do·zy − o·dzy
      const dDr = dzxr - (dor * zyr - doi * zyi) - (or * dzyr - oi * dzyi);
      const dDi = dzxi - (dor * zyi + doi * zyr) - (or * dzyi + oi * dzyr);
      // dR/R = i·dΦ0 + dA/A − dH11/H11 − dB/B − dD/D
      const iar = polePre[w + 16], iai = polePre[w + 17], idr2 = polePre[w + 20], idi2 = polePre[w + 21];
      const lr = -fi + (dAr * iar - dAi * iai) - lhr - (dBr * ibr - dBi * ibi) - (dDr * idr2 - dDi * idi2);
      const li = fr + (dAr * iai + dAi * iar) - lhi - (dBr * ibi + dBi * ibr) - (dDr * idi2 + dDi * idr2);
      const Rr = lastPoles[o + 8], Ri = lastPoles[o + 9];
      const dRr = Rr * lr - Ri * li, dRi = Rr * li + Ri * lr;
      // dC = π·(dR·cot − R·(N/2)(1 + cot²)·dp)
      const ctr = polePre[w + 28], cti = polePre[w + 29];
      const kr = polePre[w + 26], ki = polePre[w + 27];
      const kdr = kr * dpr - ki * dpi, kdi = kr * dpi + ki * dpr;
      outR -= Math.PI * (dRr * ctr - dRi * cti - (Rr * kdr - Ri * kdi));
      outI -= Math.PI * (dRr * cti + dRi * ctr - (Rr * kdi + Ri * kdr));
    }
    out[2 * p] = outR;
    out[2 * p + 1] = outI;
  }
}

const rootScratch = new Float64Array(4);

/**
 * Weight of the free beam U_all for one camera point (½ per singular point outside the disc, ¼ per
 * singular point close to the rim); the close ones' poles, cot(Np/2) and residues R go to `lastPoles`
 * (their corrections are R·π·cot(Np/2)).
 */
function singularWeight(setup: BenchSetup, sad: SaddleResult, n: number): number {
  lastNearPoles = 0;
  const h = sad.h;
  const h11r = h[0], h11i = h[1], h12r = h[2], h12i = h[3], h22r = h[4], h22i = h[5];
  // roots t of H11 t² + 2 H12 t + H22 = 0
  const discR = h12r * h12r - h12i * h12i - (h11r * h22r - h11i * h22i);
  const discI = 2 * h12r * h12i - (h11r * h22i + h11i * h22r);
  const m = Math.hypot(discR, discI);
  let sqr = Math.sqrt(Math.max(0, (m + discR) / 2));
  let sqi = Math.sqrt(Math.max(0, (m - discR) / 2));
  if (discI < 0) sqi = -sqi;
  const h11m = h11r * h11r + h11i * h11i;
  const roots = rootScratch;
  for (let q = 0; q < 2; q++) {
    const sgn = q === 0 ? 1 : -1;
    const nr = -h12r + sgn * sqr, ni = -h12i + sgn * sqi;
    roots[2 * q] = (nr * h11r + ni * h11i) / h11m;
    roots[2 * q + 1] = (ni * h11r - nr * h11i) / h11m;
  }
  const [Ax, Bx, Ay, By] = [sad.q[0], sad.q[1], sad.q[2], sad.q[3]];
  let weight = 0;
  for (let r = 0; r < 2; r++) {
    const tr = roots[2 * r], ti = roots[2 * r + 1];
    const or = roots[2 - 2 * r], oi = roots[3 - 2 * r];
    if (Math.abs(ti) < 1e-12) continue; // degenerate; cannot happen with a Gaussian amplitude
    const u = (tr * By - Bx) / ti;
    const qsx = Ax + tr * u + ti * By;
    const qsy = Ay + u;
    const theta = Math.atan2(qsy, qsx);
    const { r: rEdge } = edgeRadius(setup.disc, theta);
    const excess = Math.hypot(qsx, qsy) - rEdge;
    if (Math.abs(excess) * n > 25 * rEdge) {
      if (excess > 0) weight += 0.5;
      continue;
    }
    // pole p: (Qx(p) − Q*x) − t·(Qy(p) − Q*y) = 0, Newton in complex φ
    let pr = theta, pi = 0;
    let okNewton = false;
    for (let it = 0; it < 30; it++) {
      const e = edgePointComplex(setup.disc, pr, pi);
      const fr = e[0] - Ax - (tr * (e[2] - Ay) - ti * (e[3] - By));
      const fi = e[1] - Bx - (tr * (e[3] - By) + ti * (e[2] - Ay));
      const dr = e[4] - (tr * e[6] - ti * e[7]);
      const di = e[5] - (tr * e[7] + ti * e[6]);
      const dd = dr * dr + di * di;
      const sr = (fr * dr + fi * di) / dd, si = (fi * dr - fr * di) / dd;
      pr -= sr;
      pi -= si;
      if (Math.hypot(sr, si) < 1e-14) {
        okNewton = true;
        break;
      }
    }
    if (!okNewton || Math.abs(pi) * n > 10) {
      if (excess > 0) weight += 0.5;
      continue;
    }
    weight += 0.25;
    // residue R = e^{iΦ0}·(z·ν)/(i·s'(p)), s = H11·f_t·f_o, s' = H11·f_t'·f_o
    const e = edgePointComplex(setup.disc, pr, pi);
    const zxr = e[0] - Ax, zxi = e[1] - Bx, zyr = e[2] - Ay, zyi = e[3] - By;
    // ν = (Q'y, −Q'x)
    const nuxr = e[6], nuxi = e[7], nuyr = -e[4], nuyi = -e[5];
    const znr = zxr * nuxr - zxi * nuxi + zyr * nuyr - zyi * nuyi;
    const zni = zxr * nuxi + zxi * nuxr + zyr * nuyi + zyi * nuyr;
    const ftr = e[4] - (tr * e[6] - ti * e[7]);
    const fti = e[5] - (tr * e[7] + ti * e[6]);
    const fOr = zxr - (or * zyr - oi * zyi);
    const fOi = zxi - (or * zyi + oi * zyr);
    // s' = H11·ft'·fo
    const ar = ftr * fOr - fti * fOi, ai = ftr * fOi + fti * fOr;
    const spr = h11r * ar - h11i * ai, spi = h11r * ai + h11i * ar;
    // i·s'
    const isr = -spi, isi = spr;
    const den = isr * isr + isi * isi;
    const qr = (znr * isr + zni * isi) / den, qi = (zni * isr - znr * isi) / den;
    const mag = Math.exp(sad.expRe);
    const epr = mag * Math.cos(sad.expIm), epi = mag * Math.sin(sad.expIm);
    const Rr = epr * qr - epi * qi, Ri = epr * qi + epi * qr;
    const [cr, ci] = cotComplex((n * pr) / 2, (n * pi) / 2);
    const o = lastNearPoles * POLE;
    lastPoles[o] = tr; lastPoles[o + 1] = ti; lastPoles[o + 2] = or; lastPoles[o + 3] = oi;
    lastPoles[o + 4] = pr; lastPoles[o + 5] = pi; lastPoles[o + 6] = cr; lastPoles[o + 7] = ci;
    lastPoles[o + 8] = Rr; lastPoles[o + 9] = Ri;
    lastNearPoles++;
  }
  return weight;
}

/** |U|² relative to the incident peak intensity at the disc plane. */
export function fastIntensity(setup: BenchSetup, aberrations: readonly ZernikeTerm[], xsM: Float64Array, ysM: Float64Array, options: FastModelOptions = {}): Float64Array {
  const f = fastField(setup, aberrations, xsM, ysM, options);
  const out = new Float64Array(f.re.length);
  for (let i = 0; i < out.length; i++) out[i] = f.re[i] * f.re[i] + f.im[i] * f.im[i];
  return out;
}
