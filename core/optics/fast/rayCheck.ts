/**
 * Validity check of the rim model (physics notes §3, "Validity of the rim model").
 *
 * Strongly aberrated light from outside the rim can be bent into the shadow; the rim integral then
 * misses it. Geometric rays leave the disc plane at ρ and reach the effective camera plane at
 * F = ρ + L'·∇W(ρ) (camera point P = F·L/L'). The check traces rays from the lit beam outside the rim and
 * reports those that land well inside the geometric shadow within the analysed region, and any fold of
 * the ray map (a caustic), where the single-saddle free-beam term is not valid either.
 */
import type { BenchSetup, ZernikeTerm } from '../../setup/types.ts';
import { edgeRadius } from '../discEdge.ts';
import { effectiveDistanceM } from '../geometry.ts';
import { emptyDerivs, evalPolynomial, wavefrontPolynomial } from '../wavefront.ts';

export interface CameraRegion {
  xMinM: number;
  xMaxM: number;
  yMinM: number;
  yMaxM: number;
}

export interface RayCheckResult {
  ok: boolean;
  /** Fraction of the traced beam power outside the rim that lands inside the shadow in the region. */
  strayPowerFraction: number;
  /** True when the ray map folds (a caustic) where it lands in the region. */
  caustic: boolean;
  message: string | null;
}

export function rayCheck(setup: BenchSetup, aberrations: readonly ZernikeTerm[], region: CameraRegion): RayCheckResult {
  const L = setup.camera.distanceM;
  const lp = effectiveDistanceM(L, setup.beam.curvatureRadiusM);
  const poly = wavefrontPolynomial(setup.wavelengthM, setup.zernikeRadiusM, aberrations);
  const w = setup.beam.radiusM;
  const [cx, cy] = setup.beam.centerM;
  // Margin: a few Fresnel scales inside the edge, where edge diffraction dominates anyway.
  const margin = 2 * Math.sqrt(setup.wavelengthM * lp);
  const rOuter = Math.hypot(cx, cy) + 3 * w;
  const nr = 96;
  const nt = 360;
  const d = emptyDerivs();
  let total = 0;
  let stray = 0;
  let caustic = false;
  for (let it = 0; it < nt; it++) {
    const th = (2 * Math.PI * (it + 0.5)) / nt;
    const c = Math.cos(th), s = Math.sin(th);
    const r0 = edgeRadius(setup.disc, th).r;
    if (rOuter <= r0) continue;
    for (let ir = 0; ir < nr; ir++) {
      const rho = r0 + ((ir + 0.5) / nr) * (rOuter - r0);
      const x = rho * c, y = rho * s;
      const amp2 = Math.exp((-2 * ((x - cx) ** 2 + (y - cy) ** 2)) / (w * w));
      const weight = amp2 * rho; // power in the annular cell ∝ I·ρ
      total += weight;
      evalPolynomial(poly, x, y, d);
      const fx = x + lp * d.x, fy = y + lp * d.y;
      const px = (fx * L) / lp, py = (fy * L) / lp;
      const inRegion = px >= region.xMinM && px <= region.xMaxM && py >= region.yMinM && py <= region.yMaxM;
      if (!inRegion) continue;
      const det = (1 + lp * d.xx) * (1 + lp * d.yy) - lp * lp * d.xy * d.xy;
      if (det <= 0 && amp2 > 1e-6) caustic = true;
      const rf = Math.hypot(fx, fy);
      if (rf < edgeRadius(setup.disc, Math.atan2(fy, fx)).r - margin) stray += weight;
    }
  }
  const frac = total > 0 ? stray / total : 0;
  const ok = frac < 1e-6 && !caustic;
  let message: string | null = null;
  if (!ok) {
    message = caustic
      ? 'the aberration is strong enough to fold the beam (a caustic) inside the analysed region; the rim model is not valid there'
      : `light from outside the disc rim is bent into the shadow (${(frac * 100).toPrecision(2)} % of the beam power outside the rim lands inside it); the rim model misses it`;
  }
  return { ok, strayPowerFraction: frac, caustic, message };
}
