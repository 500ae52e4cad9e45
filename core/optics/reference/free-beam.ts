/**
 * The free (unobstructed) beam term of the Babinet split,
 *
 *     S_all(P) = ∫∫_{R²} g(Q) · e^{i k κ |Q|²/2} · e^{−i k Q·P / L} d²Q,   g = A · e^{iψ},
 *
 * (the P-only phase and the 1/(iλL) factor are applied by the caller).
 *
 * Two routes:
 *  - closed form, when the aberration phase ψ is a separable quadratic (piston, tilts, defocus,
 *    vertical astigmatism — any ψ = p(x) + q(y) with deg p, q ≤ 2): the integrand factorises into
 *    two 1-D complex Gaussians, ∫ exp(−A x² + B x + C) dx = √(π/A)·exp(B²/(4A) + C), Re A > 0;
 *  - otherwise a 2-D trapezoid rule on a uniform grid centred on the beam axis, truncated where
 *    the amplitude falls below ε, with spacing chosen so that every alias of the chirped integrand
 *    lands outside the grid (spectral accuracy), evaluated as a separable matrix product.
 */
import type { DerivedScene } from './scene.ts';
import type { ProgressMeter } from './progress.ts';

/**
 * 'normal' and 'high' as in ./field.ts; 'draft' truncates the free beam's trapezoid grid at 1e-5 of the
 * peak amplitude instead of 1e-7 (the rest as 'normal').
 */
export type ReferenceAccuracy = 'draft' | 'normal' | 'high';

export interface QuadraticSplit {
  /** ψ(x, 0) = px[0] + px[1]·x + px[2]·x²  (x in metres, radians). */
  px: [number, number, number];
  /** ψ(0, y) − ψ(0, 0) = py[1]·y + py[2]·y². */
  py: [number, number, number];
}

/**
 * Detects ψ(x, y) = p(x) + q(y) with p, q quadratic by exact three-point fits on the axes and a
 * check at off-axis probe points. Returns null for any other wavefront.
 */
export function separableQuadratic(scene: DerivedScene, zernikeRadiusM: number): QuadraticSplit | null {
  const wf = scene.wavefront;
  if (wf.isZero) return { px: [0, 0, 0], py: [0, 0, 0] };
  const s = zernikeRadiusM;
  const f0 = wf.phaseRad(0, 0);
  const fxp = wf.phaseRad(s, 0);
  const fxm = wf.phaseRad(-s, 0);
  const fyp = wf.phaseRad(0, s);
  const fym = wf.phaseRad(0, -s);
  const px: [number, number, number] = [f0, (fxp - fxm) / (2 * s), (fxp + fxm - 2 * f0) / (2 * s * s)];
  const py: [number, number, number] = [0, (fyp - fym) / (2 * s), (fyp + fym - 2 * f0) / (2 * s * s)];
  const probes = [
    [0.37, -0.81],
    [-1.3, 0.55],
    [2.1, 1.7],
    [-0.6, -2.4],
    [3.1, 0],
    [0, -2.9],
    [-2.2, 2.6],
    [0.5, 0],
  ];
  let scale = Math.max(1, Math.abs(f0), Math.abs(fxp), Math.abs(fyp));
  let worst = 0;
  for (const [u, v] of probes) {
    const x = u * s;
    const y = v * s;
    const exact = wf.phaseRad(x, y);
    const model = px[0] + px[1] * x + px[2] * x * x + py[1] * y + py[2] * y * y;
    scale = Math.max(scale, Math.abs(exact));
    worst = Math.max(worst, Math.abs(exact - model));
  }
  return worst <= 1e-9 * scale ? { px, py } : null;
}

/**
 * One axis of the closed form: out[f] = ∫ exp(−(x−c)²/w² + i(p0 + p1 x + p2 x²) + i k κ x²/2 − i (k/L) x P_f) dx.
 */
function gaussianAxis(
  P: Float64Array,
  c: number,
  w: number,
  k: number,
  kappa: number,
  kOverL: number,
  p: readonly [number, number, number],
  outRe: Float64Array,
  outIm: Float64Array,
): void {
  const ar = 1 / (w * w);
  const ai = -(0.5 * k * kappa + p[2]);
  const a2 = ar * ar + ai * ai;
  // π/A and its principal square root (Re(π/A) > 0).
  const qr = (Math.PI * ar) / a2;
  const qi = (-Math.PI * ai) / a2;
  const qm = Math.hypot(qr, qi);
  const sr = Math.sqrt(0.5 * (qm + qr));
  const si = Math.sign(qi) * Math.sqrt(0.5 * (qm - qr));
  // 1/(4A)
  const ir = ar / (4 * a2);
  const ii = -ai / (4 * a2);
  const br = (2 * c) / (w * w);
  const cr = -(c * c) / (w * w);
  const ci = p[0];
  for (let f = 0; f < P.length; f++) {
    const bi = p[1] - kOverL * P[f];
    const b2r = br * br - bi * bi;
    const b2i = 2 * br * bi;
    const er = b2r * ir - b2i * ii + cr;
    const ei = b2r * ii + b2i * ir + ci;
    const mag = Math.exp(er);
    const zr = mag * Math.cos(ei);
    const zi = mag * Math.sin(ei);
    outRe[f] = sr * zr - si * zi;
    outIm[f] = sr * zi + si * zr;
  }
}

/** Adds the closed-form free beam to S (row-major, rows = ys). */
export function addAnalyticFreeBeam(
  scene: DerivedScene,
  split: QuadraticSplit,
  xs: Float64Array,
  ys: Float64Array,
  sRe: Float64Array,
  sIm: Float64Array,
): void {
  const nx = xs.length;
  const ny = ys.length;
  const kOverL = scene.waveNumberRadPerM / scene.distanceM;
  const axRe = new Float64Array(nx);
  const axIm = new Float64Array(nx);
  const ayRe = new Float64Array(ny);
  const ayIm = new Float64Array(ny);
  gaussianAxis(xs, scene.beamCenterXM, scene.beamRadiusM, scene.waveNumberRadPerM, scene.inverseEffectiveDistancePerM, kOverL, split.px, axRe, axIm);
  gaussianAxis(ys, scene.beamCenterYM, scene.beamRadiusM, scene.waveNumberRadPerM, scene.inverseEffectiveDistancePerM, kOverL, split.py, ayRe, ayIm);
  for (let fy = 0; fy < ny; fy++) {
    const yr = ayRe[fy];
    const yi = ayIm[fy];
    const row = fy * nx;
    for (let fx = 0; fx < nx; fx++) {
      sRe[row + fx] += yr * axRe[fx] - yi * axIm[fx];
      sIm[row + fx] += yr * axIm[fx] + yi * axRe[fx];
    }
  }
}

export interface NumericGridInfo {
  /** Grid points per axis (x, y). */
  pointsX: number;
  pointsY: number;
  /** Grid spacing (x, y), metres. */
  spacingXM: number;
  spacingYM: number;
  /** Half-width of the truncation disc around the beam axis, metres. */
  truncationRadiusM: number;
}

export interface NumericGridPlan extends NumericGridInfo {
  /** Half counts (nodes at ±(i + 1/2)·h). */
  halfX: number;
  halfY: number;
}

/** Amplitude below which the beam is truncated, per accuracy level. */
const TRUNCATION = { draft: 1e-5, normal: 1e-7, high: 1e-10 } as const;
/** Factor by which the sampling frequency exceeds the highest local frequency of the integrand. */
const MARGIN = { draft: 1.1, normal: 1.1, high: 1.3 } as const;

/** Chooses the grid for the trapezoid route; throws a RangeError when it would exceed maxPerAxis. */
export function planNumericGrid(
  scene: DerivedScene,
  xs: Float64Array,
  ys: Float64Array,
  accuracy: ReferenceAccuracy,
  nodeScale: number,
  maxPerAxis: number,
): NumericGridPlan {
  const { wavelengthM: lambda, inverseEffectiveDistancePerM: kappa, beamRadiusM: w, beamCenterXM: cx, beamCenterYM: cy, distanceM: L } = scene;
  const lnInv = Math.log(1 / TRUNCATION[accuracy]);
  const Xg = w * Math.sqrt(lnInv);
  const gPsi = scene.wavefront.maxGradient(cx, cy, Xg) / (2 * Math.PI);
  const env = Math.sqrt(lnInv) / (Math.PI * w);
  const axisFreq = (c: number, P: Float64Array): number => {
    let pmin = Infinity;
    let pmax = -Infinity;
    for (let i = 0; i < P.length; i++) {
      if (P[i] < pmin) pmin = P[i];
      if (P[i] > pmax) pmax = P[i];
    }
    let lin = 0;
    for (const q of [c - Xg, c + Xg]) for (const p of [pmin, pmax]) lin = Math.max(lin, Math.abs(kappa * q - p / L));
    return lin / lambda + gPsi + env;
  };
  const hx = 1 / (MARGIN[accuracy] * axisFreq(cx, xs) * nodeScale);
  const hy = 1 / (MARGIN[accuracy] * axisFreq(cy, ys) * nodeScale);
  const halfX = Math.ceil(Xg / hx + 0.5);
  const halfY = Math.ceil(Xg / hy + 0.5);
  if (2 * halfX > maxPerAxis || 2 * halfY > maxPerAxis) {
    throw new RangeError(
      `reference model: the free-beam grid would need ${2 * halfX} × ${2 * halfY} points (limit ${maxPerAxis} per axis). ` +
        `The chirp of the beam over its ${(2 * Xg * 1e3).toFixed(1)} mm truncated width is too fine to sample: ` +
        `reduce the beam radius, the aberration (non-separable terms), the curvature 1/L' = 1/L + 1/R, or the extent of the camera points.`,
    );
  }
  return { pointsX: 2 * halfX, pointsY: 2 * halfY, spacingXM: hx, spacingYM: hy, truncationRadiusM: Xg, halfX, halfY };
}

/** Work units of the trapezoid route, for progress reporting. */
export function numericWork(plan: NumericGridPlan, nx: number, ny: number): number {
  return plan.halfY * (0.8 * plan.halfX * nx * 2 + nx * ny);
}

/** Row pairs per block in addNumericFreeBeam (columnRowSums and accumulateBlock are written out for 4). */
const RB = 4;

/**
 * The coefficients of a block of RB row pairs for every x node, interleaved [i·RB + r]: Cp = c(+u) + c(−u) and
 * Cm = c(+u) − c(−u), each summed (s) and differenced (d) over ±v, real (R) and imaginary (I) parts.
 */
interface BlockCoefficients {
  psR: Float64Array;
  psI: Float64Array;
  msR: Float64Array;
  msI: Float64Array;
  pdR: Float64Array;
  pdI: Float64Array;
  mdR: Float64Array;
  mdI: Float64Array;
}

/** A block's row sums D and E for every column of a chunk, interleaved [f·RB + r]. */
interface BlockSums {
  dR: Float64Array;
  dI: Float64Array;
  eR: Float64Array;
  eI: Float64Array;
}

/**
 * D = Σ_i cosℓ·Cps − i·sinℓ·Cms and E likewise with Cpd, Cmd, for one column: its cos/sin table starts at
 * `base`, its sums go to index q … q + 3. The inner loops of addNumericFreeBeam are kept in small functions,
 * which the JIT optimises on the first call.
 */
function columnRowSums(base: number, q: number, iMax: number, cosL: Float64Array, sinL: Float64Array, k: BlockCoefficients, out: BlockSums): void {
  const cpsR = k.psR, cpsI = k.psI, cmsR = k.msR, cmsI = k.msI;
  const cpdR = k.pdR, cpdI = k.pdI, cmdR = k.mdR, cmdI = k.mdI;
  let d0r = 0, d0i = 0, e0r = 0, e0i = 0;
  let d1r = 0, d1i = 0, e1r = 0, e1i = 0;
  let d2r = 0, d2i = 0, e2r = 0, e2i = 0;
  let d3r = 0, d3i = 0, e3r = 0, e3i = 0;
  for (let i = 0, o = 0; i < iMax; i++, o += RB) {
    const c = cosL[base + i];
    const s = sinL[base + i];
    d0r += c * cpsR[o] + s * cmsI[o];
    d0i += c * cpsI[o] - s * cmsR[o];
    e0r += c * cpdR[o] + s * cmdI[o];
    e0i += c * cpdI[o] - s * cmdR[o];
    d1r += c * cpsR[o + 1] + s * cmsI[o + 1];
    d1i += c * cpsI[o + 1] - s * cmsR[o + 1];
    e1r += c * cpdR[o + 1] + s * cmdI[o + 1];
    e1i += c * cpdI[o + 1] - s * cmdR[o + 1];
    d2r += c * cpsR[o + 2] + s * cmsI[o + 2];
    d2i += c * cpsI[o + 2] - s * cmsR[o + 2];
    e2r += c * cpdR[o + 2] + s * cmdI[o + 2];
    e2i += c * cpdI[o + 2] - s * cmdR[o + 2];
    d3r += c * cpsR[o + 3] + s * cmsI[o + 3];
    d3i += c * cpsI[o + 3] - s * cmsR[o + 3];
    e3r += c * cpdR[o + 3] + s * cmdI[o + 3];
    e3i += c * cpdI[o + 3] - s * cmdR[o + 3];
  }
  const { dR, dI, eR, eI } = out;
  dR[q] = d0r; dI[q] = d0i; eR[q] = e0r; eI[q] = e0i;
  dR[q + 1] = d1r; dI[q + 1] = d1i; eR[q + 1] = e1r; eI[q + 1] = e1i;
  dR[q + 2] = d2r; dI[q + 2] = d2i; eR[q + 2] = e2r; eI[q + 2] = e2i;
  dR[q + 3] = d3r; dI[q + 3] = d3i; eR[q + 3] = e3r; eI[q + 3] = e3i;
}

/** The coefficients of row pair r of a block for every x node (see BlockCoefficients). */
function fillRowCoefficients(
  r: number,
  iLim: number,
  Mx: number,
  u: Float64Array,
  ev: number,
  invW2: number,
  cx: number,
  halfKKappa: number,
  phYp: number,
  phYm: number,
  yp: number,
  ym: number,
  wf: DerivedScene['wavefront'],
  k: BlockCoefficients,
): void {
  const cpsR = k.psR, cpsI = k.psI, cmsR = k.msR, cmsI = k.msI;
  const cpdR = k.pdR, cpdI = k.pdI, cmdR = k.mdR, cmdI = k.mdI;
  for (let i = 0; i < Mx; i++) {
    const o = i * RB + r;
    if (i >= iLim) {
      cpsR[o] = cpsI[o] = cmsR[o] = cmsI[o] = cpdR[o] = cpdI[o] = cmdR[o] = cmdI[o] = 0;
      continue;
    }
    const ui = u[i];
    const amp = ev * Math.exp(-ui * ui * invW2);
    const xp = cx + ui;
    const xm = cx - ui;
    // Phases of the four nodes (chirp + aberration); the amplitude is common to all four.
    const ppx = halfKKappa * xp * xp;
    const pmx = halfKKappa * xm * xm;
    const a1 = ppx + phYp + wf.phaseRad(xp, yp); // (+u, +v)
    const a2 = pmx + phYp + wf.phaseRad(xm, yp); // (−u, +v)
    const a3 = ppx + phYm + wf.phaseRad(xp, ym); // (+u, −v)
    const a4 = pmx + phYm + wf.phaseRad(xm, ym); // (−u, −v)
    const c1r = amp * Math.cos(a1), c1i = amp * Math.sin(a1);
    const c2r = amp * Math.cos(a2), c2i = amp * Math.sin(a2);
    const c3r = amp * Math.cos(a3), c3i = amp * Math.sin(a3);
    const c4r = amp * Math.cos(a4), c4i = amp * Math.sin(a4);
    // Cp(±v) = c(+u) + c(−u), Cm(±v) = c(+u) − c(−u); then sums (s) and differences (d) over ±v.
    const pPr = c1r + c2r, pPi = c1i + c2i, mPr = c1r - c2r, mPi = c1i - c2i;
    const pMr = c3r + c4r, pMi = c3i + c4i, mMr = c3r - c4r, mMi = c3i - c4i;
    cpsR[o] = pPr + pMr;
    cpsI[o] = pPi + pMi;
    cmsR[o] = mPr + mMr;
    cmsI[o] = mPi + mMi;
    cpdR[o] = pPr - pMr;
    cpdI[o] = pPi - pMi;
    cmdR[o] = mPr - mMr;
    cmdI[o] = mPi - mMi;
  }
}

/** Adds one block's D and E, turned by the rows' e^{∓iη}, to the accumulator (see columnRowSums). */
function accumulateBlock(
  ny: number,
  nx: number,
  f0: number,
  nc: number,
  cosEta: Float64Array,
  sinEta: Float64Array,
  sums: BlockSums,
  bRe: Float64Array,
  bIm: Float64Array,
): void {
  const { dR, dI, eR, eI } = sums;
  for (let fy = 0; fy < ny; fy++) {
    const t = fy * RB;
    const c0 = cosEta[t], c1 = cosEta[t + 1], c2 = cosEta[t + 2], c3 = cosEta[t + 3];
    const s0 = sinEta[t], s1 = sinEta[t + 1], s2 = sinEta[t + 2], s3 = sinEta[t + 3];
    const row = fy * nx + f0;
    for (let f = 0, q = 0; f < nc; f++, q += RB) {
      bRe[row + f] +=
        c0 * dR[q] + s0 * eI[q] + c1 * dR[q + 1] + s1 * eI[q + 1] + c2 * dR[q + 2] + s2 * eI[q + 2] + c3 * dR[q + 3] + s3 * eI[q + 3];
      bIm[row + f] +=
        c0 * dI[q] - s0 * eR[q] + c1 * dI[q + 1] - s1 * eR[q + 1] + c2 * dI[q + 2] - s2 * eR[q + 2] + c3 * dI[q + 3] - s3 * eR[q + 3];
    }
  }
}

/**
 * Adds the trapezoid-rule free beam to S. Nodes sit at Q = c + (±(i+½)hx, ±(j+½)hy); the four
 * mirror images of each (u, v) share one cos/sin table, and mirrored rows share one pass.
 */
export function addNumericFreeBeam(
  scene: DerivedScene,
  plan: NumericGridPlan,
  xs: Float64Array,
  ys: Float64Array,
  sRe: Float64Array,
  sIm: Float64Array,
  progress: ProgressMeter,
): void {
  const nx = xs.length;
  const ny = ys.length;
  const { waveNumberRadPerM: k, inverseEffectiveDistancePerM: kappa, beamRadiusM: w, beamCenterXM: cx, beamCenterYM: cy, distanceM: L } = scene;
  const kOverL = k / L;
  const { halfX: Mx, halfY: My, spacingXM: hx, spacingYM: hy, truncationRadiusM: Xg } = plan;
  const wf = scene.wavefront;
  const invW2 = 1 / (w * w);
  const halfKKappa = 0.5 * k * kappa;
  const rCut = Xg * 1.02 + Math.max(hx, hy);

  // Block accumulator, later multiplied by the offset phase e^{−i k c·P / L}.
  const bRe = new Float64Array(nx * ny);
  const bIm = new Float64Array(nx * ny);

  // Per-x-node data (independent of the row).
  const u = new Float64Array(Mx);
  const gxp = new Float64Array(2 * Mx); // e^{i k κ (cx + u)²/2}
  const gxm = new Float64Array(2 * Mx); // e^{i k κ (cx − u)²/2}
  for (let i = 0; i < Mx; i++) {
    const ui = (i + 0.5) * hx;
    u[i] = ui;
    const pp = halfKKappa * (cx + ui) * (cx + ui);
    const pm = halfKKappa * (cx - ui) * (cx - ui);
    gxp[2 * i] = Math.cos(pp);
    gxp[2 * i + 1] = Math.sin(pp);
    gxm[2 * i] = Math.cos(pm);
    gxm[2 * i + 1] = Math.sin(pm);
  }

  // Row pairs are processed in blocks of RB so that each cos/sin table entry, once loaded, serves
  // RB row pairs (the table is larger than the cache for big grids).
  const coef: BlockCoefficients = {
    psR: new Float64Array(RB * Mx),
    psI: new Float64Array(RB * Mx),
    msR: new Float64Array(RB * Mx),
    msI: new Float64Array(RB * Mx),
    pdR: new Float64Array(RB * Mx),
    pdI: new Float64Array(RB * Mx),
    mdR: new Float64Array(RB * Mx),
    mdI: new Float64Array(RB * Mx),
  };
  const cosEta = new Float64Array(RB * ny);
  const sinEta = new Float64Array(RB * ny);

  // Column chunks keep the cos/sin table below ~2^22 entries each.
  const chunk = Math.max(1, Math.min(nx, Math.floor((1 << 22) / Mx)));
  const cosL = new Float64Array(chunk * Mx);
  const sinL = new Float64Array(chunk * Mx);
  const sums: BlockSums = {
    dR: new Float64Array(RB * chunk),
    dI: new Float64Array(RB * chunk),
    eR: new Float64Array(RB * chunk),
    eI: new Float64Array(RB * chunk),
  };

  // Number of row pairs inside the truncation disc.
  let rows = 0;
  while (rows < My && (rows + 0.5) * hy <= rCut) rows++;

  for (let f0 = 0; f0 < nx; f0 += chunk) {
    const f1 = Math.min(nx, f0 + chunk);
    const nc = f1 - f0;
    for (let f = 0; f < nc; f++) {
      const px = kOverL * xs[f0 + f];
      const base = f * Mx;
      for (let i = 0; i < Mx; i++) {
        const l = px * u[i];
        cosL[base + i] = Math.cos(l);
        sinL[base + i] = Math.sin(l);
      }
    }
    for (let j0 = 0; j0 < rows; j0 += RB) {
      let iMax = 0;
      let work = 0;
      for (let r = 0; r < RB; r++) {
        const j = j0 + r;
        // Rows past the end of the disc get zero coefficients.
        let iLim = 0;
        const v = (j + 0.5) * hy;
        if (j < rows) {
          const half = Math.sqrt(Math.max(0, rCut * rCut - v * v));
          iLim = Math.min(Mx, Math.max(0, Math.ceil(half / hx - 0.5)));
        }
        const yp = cy + v;
        const ym = cy - v;
        const phYp = halfKKappa * yp * yp;
        const phYm = halfKKappa * ym * ym;
        const ev = Math.exp(-v * v * invW2) * hx * hy;
        fillRowCoefficients(r, iLim, Mx, u, ev, invW2, cx, halfKKappa, phYp, phYm, yp, ym, wf, coef);
        if (iLim > iMax) iMax = iLim;
        work += iLim * nc * 2 + nc * ny;
        // Mirrored rows: e^{∓iη}, η = k v P_y / L → cosη·D − i·sinη·E.
        const pv = j < rows ? kOverL * v : 0;
        for (let fy = 0; fy < ny; fy++) {
          const eta = pv * ys[fy];
          cosEta[fy * RB + r] = j < rows ? Math.cos(eta) : 0;
          sinEta[fy * RB + r] = j < rows ? Math.sin(eta) : 0;
        }
      }
      // Row sums for every column of the chunk: D = Σ_i cosℓ·Cps − i·sinℓ·Cms, E likewise with Cpd, Cmd.
      for (let f = 0; f < nc; f++) columnRowSums(f * Mx, f * RB, iMax, cosL, sinL, coef, sums);
      accumulateBlock(ny, nx, f0, nc, cosEta, sinEta, sums, bRe, bIm);
      progress.advance(work);
    }
  }
  // Offset phase of the grid centre.
  const oxR = new Float64Array(nx);
  const oxI = new Float64Array(nx);
  for (let fx = 0; fx < nx; fx++) {
    const p = -kOverL * cx * xs[fx];
    oxR[fx] = Math.cos(p);
    oxI[fx] = Math.sin(p);
  }
  for (let fy = 0; fy < ny; fy++) {
    const p = -kOverL * cy * ys[fy];
    const yr = Math.cos(p);
    const yi = Math.sin(p);
    const row = fy * nx;
    for (let fx = 0; fx < nx; fx++) {
      const or = yr * oxR[fx] - yi * oxI[fx];
      const oi = yr * oxI[fx] + yi * oxR[fx];
      const br = bRe[row + fx];
      const bi = bIm[row + fx];
      sRe[row + fx] += br * or - bi * oi;
      sIm[row + fx] += br * oi + bi * or;
    }
  }
}
