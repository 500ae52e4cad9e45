/**
 * The disc term of the Babinet split,
 *
 *     S_disc(P) = ∫∫_{disc} g(Q) · e^{i k κ |Q|²/2} · e^{−i k Q·P / L} d²Q,
 *
 * for a star-shaped disc r(θ) = a(1 + e cos 2(θ − θe)) + Σ A_h cos(n_h θ − φ_h).
 *
 * Split exactly as ∫∫_disc = ∫∫_{|Q| ≤ a} + ∫_0^{2π} ∫_a^{r(θ)} ρ dρ dθ:
 *  - the circle of radius a by "row–chord" Gauss–Legendre quadrature: y = a·sin s with s on
 *    Gauss–Legendre nodes in [−π/2, π/2] (removes the square-root behaviour of the chord at the
 *    top and bottom), and Gauss–Legendre nodes along each chord |x| ≤ a·cos s. Every row shares one
 *    y, so the sum is separable (row transform, then column transform);
 *  - the edge strip between the circle and the true edge (of either sign, so it also removes what
 *    lies outside a non-round edge) in polar coordinates: trapezoid rule in θ (periodic integrand,
 *    spectrally accurate) and Gauss–Legendre in ρ on [a, r(θ)].
 * Both integrands are analytic, so both quadratures converge exponentially. Unlike a chord
 * decomposition of the true edge this needs no root finding and also handles non-convex edges
 * (a corrugated rim whose rows cross the edge many times).
 *
 * Contributions are SUBTRACTED from S (Babinet: outside = all − disc).
 */
import type { DerivedScene } from './scene.ts';
import type { ProgressMeter } from './progress.ts';
import { gaussLegendreHalf, glNodeCount } from './gauss-legendre.ts';

export interface DiscRates {
  /** Upper bound of |∇ log integrand| (phase and log-amplitude) over the disc region, for all camera points. */
  ratePerM: number;
  /** max |P_x| and max |P_y| over the camera points. */
  pxMaxM: number;
  pyMaxM: number;
  /** The slowly varying part: gradient bound of the aberration phase plus the amplitude slope bound. */
  slowRatePerM: number;
}

export function discRates(scene: DerivedScene, xs: Float64Array, ys: Float64Array): DiscRates {
  let pxMax = 0;
  let pyMax = 0;
  for (let i = 0; i < xs.length; i++) pxMax = Math.max(pxMax, Math.abs(xs[i]));
  for (let i = 0; i < ys.length; i++) pyMax = Math.max(pyMax, Math.abs(ys[i]));
  const rMax = scene.edge.maxRadiusM;
  const gPsi = scene.wavefront.maxGradient(0, 0, rMax);
  const amp = (2 * (rMax + Math.hypot(scene.beamCenterXM, scene.beamCenterYM))) / (scene.beamRadiusM * scene.beamRadiusM);
  const slow = gPsi + amp;
  const rate = scene.waveNumberRadPerM * (Math.abs(scene.inverseEffectiveDistancePerM) * rMax + Math.hypot(pxMax, pyMax) / scene.distanceM) + slow;
  return { ratePerM: rate, pxMaxM: pxMax, pyMaxM: pyMax, slowRatePerM: slow };
}

export interface CirclePlan {
  /** Gauss–Legendre nodes in s (full rule size). */
  rows: number;
  /** Chord node count of each positive row (full rule sizes), length rows/2. */
  chordNodes: Int32Array;
}

export function planCircle(scene: DerivedScene, rates: DiscRates, accuracy: 'normal' | 'high', nodeScale: number): CirclePlan {
  const a = scene.edge.radiusM;
  const rows = glNodeCount((Math.PI / 2) * a * rates.ratePerM, accuracy, nodeScale);
  const rule = gaussLegendreHalf(rows);
  const chordNodes = new Int32Array(rows / 2);
  const kx = scene.waveNumberRadPerM * Math.abs(scene.inverseEffectiveDistancePerM);
  const kp = (scene.waveNumberRadPerM * rates.pxMaxM) / scene.distanceM;
  for (let j = 0; j < rows / 2; j++) {
    const h = a * Math.cos((Math.PI / 2) * rule.t[j]);
    chordNodes[j] = glNodeCount(h * (kx * h + kp + rates.slowRatePerM), accuracy, nodeScale);
  }
  return { rows, chordNodes };
}

export function circleWork(plan: CirclePlan, nx: number, ny: number): number {
  let w = 0;
  for (let j = 0; j < plan.chordNodes.length; j++) w += (plan.chordNodes[j] / 2) * nx * 6 + nx * ny;
  return w;
}

/** Subtracts the integral over the circle |Q| ≤ a from S. */
export function subtractCircle(
  scene: DerivedScene,
  plan: CirclePlan,
  xs: Float64Array,
  ys: Float64Array,
  sRe: Float64Array,
  sIm: Float64Array,
  progress: ProgressMeter,
): void {
  const nx = xs.length;
  const ny = ys.length;
  const a = scene.edge.radiusM;
  const { waveNumberRadPerM: k, inverseEffectiveDistancePerM: kappa, beamRadiusM: w, beamCenterXM: cx, beamCenterYM: cy, distanceM: L } = scene;
  const kOverL = k / L;
  const halfKKappa = 0.5 * k * kappa;
  const invW2 = 1 / (w * w);
  const wf = scene.wavefront;
  const rowRule = gaussLegendreHalf(plan.rows);
  let maxChord = 0;
  for (let j = 0; j < plan.chordNodes.length; j++) maxChord = Math.max(maxChord, plan.chordNodes[j]);
  const mh = maxChord / 2;
  const xk = new Float64Array(mh);
  const cpsR = new Float64Array(mh);
  const cpsI = new Float64Array(mh);
  const cmsR = new Float64Array(mh);
  const cmsI = new Float64Array(mh);
  const cpdR = new Float64Array(mh);
  const cpdI = new Float64Array(mh);
  const cmdR = new Float64Array(mh);
  const cmdI = new Float64Array(mh);
  const dR = new Float64Array(nx);
  const dI = new Float64Array(nx);
  const eR = new Float64Array(nx);
  const eI = new Float64Array(nx);

  for (let j = 0; j < rowRule.t.length; j++) {
    const s = (Math.PI / 2) * rowRule.t[j];
    const ws = (Math.PI / 2) * rowRule.w[j];
    const y = a * Math.sin(s);
    const h = a * Math.cos(s);
    const chord = gaussLegendreHalf(plan.chordNodes[j]);
    const m = chord.t.length;
    const ey = y - cy;
    const eyn = -y - cy;
    const ampYp = Math.exp(-ey * ey * invW2);
    const ampYm = Math.exp(-eyn * eyn * invW2);
    for (let i = 0; i < m; i++) {
      const x = h * chord.t[i];
      xk[i] = kOverL * x;
      // Area weight (π/2)·W_j·(a cos s)·h·w_i, minus sign for the Babinet subtraction.
      const wt = -ws * h * h * chord.w[i];
      const chirp = halfKKappa * (x * x + y * y);
      const exP = x - cx;
      const exM = -x - cx;
      const axp = Math.exp(-exP * exP * invW2);
      const axm = Math.exp(-exM * exM * invW2);
      const m1 = wt * axp * ampYp;
      const m2 = wt * axm * ampYp;
      const m3 = wt * axp * ampYm;
      const m4 = wt * axm * ampYm;
      const a1 = chirp + wf.phaseRad(x, y);
      const a2 = chirp + wf.phaseRad(-x, y);
      const a3 = chirp + wf.phaseRad(x, -y);
      const a4 = chirp + wf.phaseRad(-x, -y);
      const c1r = m1 * Math.cos(a1), c1i = m1 * Math.sin(a1);
      const c2r = m2 * Math.cos(a2), c2i = m2 * Math.sin(a2);
      const c3r = m3 * Math.cos(a3), c3i = m3 * Math.sin(a3);
      const c4r = m4 * Math.cos(a4), c4i = m4 * Math.sin(a4);
      const pPr = c1r + c2r, pPi = c1i + c2i, mPr = c1r - c2r, mPi = c1i - c2i;
      const pMr = c3r + c4r, pMi = c3i + c4i, mMr = c3r - c4r, mMi = c3i - c4i;
      cpsR[i] = pPr + pMr;
      cpsI[i] = pPi + pMi;
      cmsR[i] = mPr + mMr;
      cmsI[i] = mPi + mMi;
      cpdR[i] = pPr - pMr;
      cpdI[i] = pPi - pMi;
      cmdR[i] = mPr - mMr;
      cmdI[i] = mPi - mMi;
    }
    dR.fill(0);
    dI.fill(0);
    eR.fill(0);
    eI.fill(0);
    for (let i = 0; i < m; i++) {
      const q = xk[i];
      const psr = cpsR[i], psi = cpsI[i], msr = cmsR[i], msi = cmsI[i];
      const pdr = cpdR[i], pdi = cpdI[i], mdr = cmdR[i], mdi = cmdI[i];
      for (let f = 0; f < nx; f++) {
        const l = q * xs[f];
        const c = Math.cos(l);
        const sn = Math.sin(l);
        dR[f] += c * psr + sn * msi;
        dI[f] += c * psi - sn * msr;
        eR[f] += c * pdr + sn * mdi;
        eI[f] += c * pdi - sn * mdr;
      }
    }
    const pv = kOverL * y;
    for (let fy = 0; fy < ny; fy++) {
      const eta = pv * ys[fy];
      const c = Math.cos(eta);
      const sn = Math.sin(eta);
      const row = fy * nx;
      for (let f = 0; f < nx; f++) {
        sRe[row + f] += c * dR[f] + sn * eI[f];
        sIm[row + f] += c * dI[f] - sn * eR[f];
      }
    }
    progress.advance((m / 2) * nx * 6 + nx * ny);
  }
}

export interface StripPlan {
  /** Trapezoid nodes in θ. */
  thetaNodes: number;
  /** Gauss–Legendre nodes across the strip (full rule size). */
  radialNodes: number;
}

export function planStrip(
  scene: DerivedScene,
  rates: DiscRates,
  accuracy: 'normal' | 'high',
  nodeScale: number,
): StripPlan | null {
  const edge = scene.edge;
  if (edge.isCircle) return null;
  const { waveNumberRadPerM: k, distanceM: L } = scene;
  const rMax = edge.maxRadiusM;
  const pMax = Math.hypot(rates.pxMaxM, rates.pyMaxM);
  const tol = accuracy === 'high' ? 1e-15 : 1e-12;
  // The θ-integrand is a product of factors whose Fourier series are known in bound:
  //  - at fixed radius, e^{−ik Q·P/L} (and the slowly varying amplitude and aberration) has
  //    Bessel-type content up to order ≈ β₀ = k·r·|P|/L + (slow rate)·r;
  //  - each edge term of order n and amplitude A moves the edge radially, modulating the phase
  //    by β = A·(radial rate) at order n: content at n·m with weight ≤ J_m(β)-like;
  //  - ellipticity is the order-2 term of amplitude a·e.
  // The trapezoid rule with N points is exact for orders below N, so N must exceed the sum of
  // the significant orders of the factors.
  let order = besselOrderBound(k * rMax * pMax / L + rates.slowRatePerM * rMax, tol, accuracy);
  for (const t of edge.terms) order += t.order * besselOrderBound(Math.abs(t.amplitudeM) * rates.ratePerM, tol, accuracy);
  const thetaNodes = 2 * Math.ceil((order * nodeScale + 8) / 2);
  const radialNodes = glNodeCount(0.5 * edge.maxDeviationM * rates.ratePerM, accuracy, nodeScale);
  return { thetaNodes, radialNodes };
}

/**
 * Order M beyond which the Fourier coefficients J_m(β) of e^{iβ cos θ} are negligible: the smaller of
 * the asymptotic count β + c·β^{1/3} + c₀ (from the transition region of J_m for m ≈ β) and the
 * first m with the bound |J_m(β)| ≤ (β/2)^m / m! (Abramowitz & Stegun 9.1.62, from memory) below tol.
 */
export function besselOrderBound(beta: number, tol: number, accuracy: 'normal' | 'high'): number {
  const b = Math.max(0, beta);
  const asym = accuracy === 'high' ? b + 11 * Math.cbrt(b) + 14 : b + 8 * Math.cbrt(b) + 8;
  if (b === 0) return 1;
  let logBound = 0; // log((β/2)^m / m!)
  const lh = Math.log(b / 2);
  const lt = Math.log(tol);
  for (let m = 1; m < asym; m++) {
    logBound += lh - Math.log(m);
    if (m > b / 2 && logBound < lt) return m + 1;
  }
  return Math.ceil(asym);
}

export function stripWork(plan: StripPlan, nx: number, ny: number): number {
  return plan.thetaNodes * plan.radialNodes * (nx * ny + 4 * (nx + ny));
}

/** Subtracts the strip between the circle r = a and the true edge r(θ) from S. */
export function subtractStrip(
  scene: DerivedScene,
  plan: StripPlan,
  xs: Float64Array,
  ys: Float64Array,
  sRe: Float64Array,
  sIm: Float64Array,
  progress: ProgressMeter,
): void {
  const nx = xs.length;
  const ny = ys.length;
  const a = scene.edge.radiusM;
  const { waveNumberRadPerM: k, inverseEffectiveDistancePerM: kappa, beamRadiusM: w, beamCenterXM: cx, beamCenterYM: cy, distanceM: L } = scene;
  const kOverL = k / L;
  const halfKKappa = 0.5 * k * kappa;
  const invW2 = 1 / (w * w);
  const wf = scene.wavefront;
  const rule = gaussLegendreHalf(plan.radialNodes);
  const nt = plan.thetaNodes;
  const dTheta = (2 * Math.PI) / nt;
  const nh = rule.t.length;
  const nb = 2 * nh;
  // All radial nodes of one θ form a block: ex[n·nx + f] = e^{−ik x_n P_x/L},
  // ey[fy·nb + n] = c_n·e^{−ik y_n P_y/L}; then S[fy, f] −= Σ_n ey·ex with the row of S in cache.
  const exR = new Float64Array(nb * nx);
  const exI = new Float64Array(nb * nx);
  const eyR = new Float64Array(nb * ny);
  const eyI = new Float64Array(nb * ny);
  const work = nb * (nx * ny + 4 * (nx + ny));
  for (let mTheta = 0; mTheta < nt; mTheta++) {
    const th = mTheta * dTheta;
    const d = scene.edge.radius(th) - a;
    if (d === 0) {
      progress.advance(work);
      continue;
    }
    const ct = Math.cos(th);
    const st = Math.sin(th);
    for (let n = 0; n < nb; n++) {
      const t = n < nh ? -rule.t[n] : rule.t[n - nh];
      const wn = n < nh ? rule.w[n] : rule.w[n - nh];
      const rho = a + 0.5 * d * (1 + t);
      const x = rho * ct;
      const y = rho * st;
      const ex = x - cx;
      const ey = y - cy;
      const wt = -dTheta * 0.5 * d * wn * rho * Math.exp(-(ex * ex + ey * ey) * invW2);
      const ph = halfKKappa * rho * rho + wf.phaseRad(x, y);
      const cr = wt * Math.cos(ph);
      const ci = wt * Math.sin(ph);
      const qx = -kOverL * x;
      const qy = -kOverL * y;
      const off = n * nx;
      for (let f = 0; f < nx; f++) {
        const l = qx * xs[f];
        exR[off + f] = Math.cos(l);
        exI[off + f] = Math.sin(l);
      }
      for (let f = 0; f < ny; f++) {
        const l = qy * ys[f];
        const c = Math.cos(l);
        const sn = Math.sin(l);
        eyR[f * nb + n] = cr * c - ci * sn;
        eyI[f * nb + n] = cr * sn + ci * c;
      }
    }
    for (let fy = 0; fy < ny; fy++) {
      const row = fy * nx;
      const yo = fy * nb;
      for (let f = 0; f < nx; f++) {
        let sr = 0;
        let si = 0;
        for (let n = 0, o = f; n < nb; n++, o += nx) {
          const yr = eyR[yo + n];
          const yi = eyI[yo + n];
          const xr = exR[o];
          const xi = exI[o];
          sr += yr * xr - yi * xi;
          si += yr * xi + yi * xr;
        }
        sRe[row + f] += sr;
        sIm[row + f] += si;
      }
    }
    progress.advance(work);
  }
}
