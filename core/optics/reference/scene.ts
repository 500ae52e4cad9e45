/**
 * Checked, derived quantities of a bench setup for the reference model (SI units throughout).
 *
 * The kernel phase of the Fresnel integral with the nominal beam curvature folded in is
 *
 *     φ(Q, P) = k·[ κ·|Q|²/2 − Q·P/L + |P|²/(2L) ],   κ = 1/L + 1/R = 1/L',
 *
 * which is what physics notes §1 writes as k·|Q − F|²/(2L') plus a P-only phase. Working with κ
 * (never dividing by it) keeps the camera-at-focus case (κ = 0) and converging beams (R < 0) regular.
 */
import type { BenchSetup, ZernikeTerm } from '../../setup/types.ts';
import { compileWavefront } from '../../zernike/index.ts';

export interface EdgeShape {
  /** Nominal disc radius a. */
  radiusM: number;
  /** True when the edge is the circle r = a (no ellipticity, no harmonics). */
  isCircle: boolean;
  /** Upper bound of r(θ). */
  maxRadiusM: number;
  /** Upper bound of |r(θ) − a|. */
  maxDeviationM: number;
  /** Highest angular order present in r(θ) (2 for ellipticity). */
  maxOrder: number;
  /** r(θ). */
  radius(thetaRad: number): number;
  /** The angular terms of r(θ) − a: ellipticity as (2, a·e), then every non-zero harmonic. */
  terms: { order: number; amplitudeM: number }[];
}

export interface Wavefront {
  /** True when there is no aberration at all. */
  isZero: boolean;
  /** Aberration phase 2π·W/λ (radians) at lab point (x, y) metres. */
  phaseRad(xM: number, yM: number): number;
  /** Upper bound (with 10 % margin) of |∇ phase| (rad/m) over the disc |Q − centre| ≤ radius. */
  maxGradient(centerXM: number, centerYM: number, radiusM: number): number;
}

export interface DerivedScene {
  wavelengthM: number;
  /** Wavenumber k = 2π/λ. */
  waveNumberRadPerM: number;
  /** Camera distance L. */
  distanceM: number;
  /** κ = 1/L + 1/R = 1/L' (zero when the camera sits at the focus, negative beyond it). */
  inverseEffectiveDistancePerM: number;
  /** 1/e² intensity radius w. */
  beamRadiusM: number;
  beamCenterXM: number;
  beamCenterYM: number;
  edge: EdgeShape;
  wavefront: Wavefront;
}

function requirePositive(value: number, what: string): void {
  if (!(Number.isFinite(value) && value > 0)) throw new RangeError(`${what} must be a finite number > 0; got ${String(value)}`);
}

function requireFinite(value: number, what: string): void {
  if (!Number.isFinite(value)) throw new RangeError(`${what} must be a finite number; got ${String(value)}`);
}

function buildEdge(setup: BenchSetup): EdgeShape {
  const disc = setup.disc;
  const a = disc.radiusM;
  requirePositive(a, 'disc.radiusM');
  const e = disc.ellipticity;
  const thetaE = disc.ellipseAngleRad;
  requireFinite(e, 'disc.ellipticity');
  requireFinite(thetaE, 'disc.ellipseAngleRad');
  const harmonics = disc.edgeHarmonics ?? [];
  const orders: number[] = [];
  const amps: number[] = [];
  const phases: number[] = [];
  let maxDev = Math.abs(a * e);
  let maxOrder = e !== 0 ? 2 : 0;
  for (const h of harmonics) {
    if (!Number.isInteger(h.order) || h.order < 0) {
      throw new RangeError(`disc edge harmonic order must be an integer ≥ 0; got ${String(h.order)}`);
    }
    requireFinite(h.amplitudeM, 'disc edge harmonic amplitudeM');
    requireFinite(h.phaseRad, 'disc edge harmonic phaseRad');
    if (h.amplitudeM === 0) continue;
    orders.push(h.order);
    amps.push(h.amplitudeM);
    phases.push(h.phaseRad);
    maxDev += Math.abs(h.amplitudeM);
    if (h.order > maxOrder) maxOrder = h.order;
  }
  const nh = orders.length;
  const radius = (th: number): number => {
    let r = a * (1 + e * Math.cos(2 * (th - thetaE)));
    for (let i = 0; i < nh; i++) r += amps[i] * Math.cos(orders[i] * th - phases[i]);
    return r;
  };
  const isCircle = e === 0 && nh === 0;
  if (!isCircle) {
    // The edge must describe a star-shaped disc: r(θ) > 0 all round. r is a trigonometric
    // polynomial of order maxOrder, so 64 samples per period of the highest order resolve it.
    const ns = Math.max(512, 64 * maxOrder);
    let rMin = Infinity;
    for (let i = 0; i < ns; i++) rMin = Math.min(rMin, radius((2 * Math.PI * i) / ns));
    if (!(rMin > 0)) {
      throw new RangeError(`the disc edge r(θ) reaches ${rMin.toExponential(3)} m: the disc must be star-shaped about its centre (r(θ) > 0)`);
    }
  }
  const terms: { order: number; amplitudeM: number }[] = [];
  if (e !== 0) terms.push({ order: 2, amplitudeM: a * e });
  for (let i = 0; i < nh; i++) terms.push({ order: orders[i], amplitudeM: amps[i] });
  return { radiusM: a, isCircle, maxRadiusM: a + maxDev, maxDeviationM: maxDev, maxOrder, radius, terms };
}

function buildWavefront(aberrations: readonly ZernikeTerm[], zernikeRadiusM: number): Wavefront {
  requirePositive(zernikeRadiusM, 'zernikeRadiusM');
  const coeffs: { j: number; value: number }[] = [];
  for (const t of aberrations) {
    if (!Number.isInteger(t.j) || t.j < 0) throw new RangeError(`Zernike index j must be an integer ≥ 0; got ${String(t.j)}`);
    requireFinite(t.waves, `Zernike coefficient of j = ${t.j}`);
    if (t.waves !== 0) coeffs.push({ j: t.j, value: t.waves });
  }
  const isZero = coeffs.length === 0;
  const compiled = compileWavefront(coeffs);
  const inv = 1 / zernikeRadiusM;
  const twoPi = 2 * Math.PI;
  const der = { value: 0, dx: 0, dy: 0, dxx: 0, dxy: 0, dyy: 0 };
  const phaseRad = isZero ? () => 0 : (x: number, y: number): number => twoPi * compiled.value(x * inv, y * inv);
  const maxGradient = (cx: number, cy: number, radius: number): number => {
    if (isZero) return 0;
    // Polynomial of modest degree: a polar sampling including the boundary finds its largest
    // gradient; a 10 % margin covers the maximum falling between samples.
    const nr = 24;
    const na = 96;
    let g = 0;
    for (let ir = 0; ir <= nr; ir++) {
      const r = (radius * ir) / nr;
      for (let ia = 0; ia < na; ia++) {
        const th = (twoPi * ia) / na;
        compiled.evaluate((cx + r * Math.cos(th)) * inv, (cy + r * Math.sin(th)) * inv, der);
        const gi = Math.hypot(der.dx, der.dy);
        if (gi > g) g = gi;
        if (ir === 0) break;
      }
    }
    return 1.1 * twoPi * g * inv;
  };
  return { isZero, phaseRad, maxGradient };
}

export function deriveScene(setup: BenchSetup, aberrations: readonly ZernikeTerm[]): DerivedScene {
  const lambda = setup.wavelengthM;
  requirePositive(lambda, 'wavelengthM');
  const L = setup.camera.distanceM;
  requirePositive(L, 'camera.distanceM');
  const w = setup.beam.radiusM;
  requirePositive(w, 'beam.radiusM');
  const [cx, cy] = setup.beam.centerM;
  requireFinite(cx, 'beam.centerM[0]');
  requireFinite(cy, 'beam.centerM[1]');
  const R = setup.beam.curvatureRadiusM;
  if (Number.isNaN(R) || R === 0) throw new RangeError(`beam.curvatureRadiusM must be non-zero (±Infinity when collimated); got ${String(R)}`);
  const kappa = 1 / L + 1 / R;
  return {
    wavelengthM: lambda,
    waveNumberRadPerM: (2 * Math.PI) / lambda,
    distanceM: L,
    inverseEffectiveDistancePerM: kappa,
    beamRadiusM: w,
    beamCenterXM: cx,
    beamCenterYM: cy,
    edge: buildEdge(setup),
    wavefront: buildWavefront(aberrations, setup.zernikeRadiusM),
  };
}
