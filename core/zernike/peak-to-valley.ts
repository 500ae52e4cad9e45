import type { CompiledWavefront, PeakToValleyOptions, ZernikeCoefficient, ZernikeDerivatives } from './types.ts';
import { ansiToNM } from './ansi-to-nm.ts';
import { compileWavefront } from './compile-wavefront.ts';
import { mergeCoefficients } from './internal/coefficients.ts';
import { assertIndex } from './internal/validate.ts';

/**
 * Moves (x, y) uphill on f = sign·W inside the closed unit disc from a good starting sample.
 * Each iteration tries a damped Newton (or gradient) step projected back onto the disc and, on the rim,
 * a Newton step along the rim angle; only steps that strictly increase f are accepted, so the result
 * never gets worse than the start. Returns W at the final point.
 */
function polish(w: CompiledWavefront, x0: number, y0: number, sign: number): number {
  const d: ZernikeDerivatives = { value: 0, dx: 0, dy: 0, dxx: 0, dxy: 0, dyy: 0 };
  let x = x0;
  let y = y0;
  let f = sign * w.value(x, y);
  for (let iter = 0; iter < 100; iter++) {
    w.evaluate(x, y, d);
    const gx = sign * d.dx;
    const gy = sign * d.dy;
    const hxx = sign * d.dxx;
    const hxy = sign * d.dxy;
    const hyy = sign * d.dyy;
    let bestF = f;
    let bestX = x;
    let bestY = y;
    const tryPoint = (px: number, py: number): boolean => {
      const r2 = px * px + py * py;
      if (r2 > 1) {
        const s = 1 / Math.sqrt(r2);
        px *= s;
        py *= s;
      }
      const fp = sign * w.value(px, py);
      if (fp > bestF) {
        bestF = fp;
        bestX = px;
        bestY = py;
        return true;
      }
      return false;
    };

    // Free (interior) step: Newton if the Hessian of f is negative definite, else steepest ascent.
    const det = hxx * hyy - hxy * hxy;
    let px: number;
    let py: number;
    if (hxx < 0 && det > 0) {
      px = -(hyy * gx - hxy * gy) / det;
      py = -(-hxy * gx + hxx * gy) / det;
    } else {
      const g = Math.hypot(gx, gy);
      px = g > 0 ? (0.1 * gx) / g : 0;
      py = g > 0 ? (0.1 * gy) / g : 0;
    }
    for (let t = 1, i = 0; i < 40 && (px !== 0 || py !== 0); i++, t *= 0.5) {
      if (tryPoint(x + t * px, y + t * py)) break;
    }

    // Rim step: Newton in the polar angle when the point sits on the rim.
    const r = Math.hypot(x, y);
    if (r > 1 - 1e-12) {
      const c = x / r;
      const s = y / r;
      const ft = -s * gx + c * gy; // ∂f/∂θ at ρ = 1
      const ftt = s * s * hxx - 2 * s * c * hxy + c * c * hyy - (c * gx + s * gy);
      let dt = ftt < 0 ? -ft / ftt : Math.sign(ft) * 0.1;
      if (Math.abs(dt) > 0.5) dt = Math.sign(dt) * 0.5;
      for (let i = 0; i < 40 && dt !== 0; i++, dt *= 0.5) {
        const th = Math.atan2(s, c) + dt;
        if (tryPoint(Math.cos(th), Math.sin(th))) break;
      }
    }

    if (bestF <= f) break;
    f = bestF;
    x = bestX;
    y = bestY;
  }
  return sign * f;
}

/**
 * Peak-to-valley (max − min) of W = Σ c_j Z_j over the closed unit disc, computed numerically.
 *
 * W is sampled on a polar grid (the centre, then `samples − 1` circles up to and including the rim, each
 * with about 2π·i points but at least 4(|m|max + 1)); the highest and the lowest samples are then refined
 * by a projected Newton search on the disc using the analytic derivatives. The refinement only accepts
 * improvements, so the result lies between the grid estimate and the true P-V, and equals the true P-V
 * to rounding whenever the grid lands in the basin of the global extremes (which a grid much finer than
 * the highest order guarantees in practice).
 *
 * @returns P-V in the unit of the coefficients; 0 for an empty set
 * @throws RangeError on invalid coefficients or `samples` not an integer ≥ 2
 */
export function peakToValley(coeffs: readonly ZernikeCoefficient[], options: PeakToValleyOptions = {}): number {
  const merged = mergeCoefficients(coeffs);
  const skip = options.excludePistonTilt === true;
  const terms: ZernikeCoefficient[] = [];
  let nMax = 0;
  let mMax = 0;
  for (const [j, value] of merged) {
    if ((skip && j <= 2) || value === 0) continue;
    const { n, m } = ansiToNM(j);
    nMax = Math.max(nMax, n);
    mMax = Math.max(mMax, Math.abs(m));
    terms.push({ j, value });
  }
  const samples = options.samples ?? Math.max(65, 8 * nMax + 1);
  assertIndex(samples, 2, 'peakToValley samples');
  if (terms.length === 0) return 0;

  const w = compileWavefront(terms);
  let maxV = -Infinity;
  let minV = Infinity;
  let maxX = 0, maxY = 0, minX = 0, minY = 0;
  for (let i = 0; i < samples; i++) {
    const rho = i / (samples - 1);
    const nTheta = i === 0 ? 1 : Math.max(Math.ceil(2 * Math.PI * i), 4 * (mMax + 1));
    for (let t = 0; t < nTheta; t++) {
      const th = (2 * Math.PI * t) / nTheta;
      const x = rho * Math.cos(th);
      const y = rho * Math.sin(th);
      const v = w.value(x, y);
      if (v > maxV) {
        maxV = v;
        maxX = x;
        maxY = y;
      }
      if (v < minV) {
        minV = v;
        minX = x;
        minY = y;
      }
    }
  }
  const peak = polish(w, maxX, maxY, 1);
  const valley = polish(w, minX, minY, -1);
  return peak - valley;
}
