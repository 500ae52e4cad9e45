/**
 * Reference (slow, trustworthy) scalar Fresnel field behind an opaque disc, by Babinet's principle:
 *
 *     U(P) = e^{i k |P|²/(2L)} · [S_all(P) − S_disc(P)] / (iλL),
 *     S_X(P) = ∫∫_X A(Q) e^{iψ(Q)} e^{i k κ |Q|²/2} e^{−i k Q·P / L} d²Q,   κ = 1/L + 1/R,
 *
 * which is exactly U(P) = 1/(iλL) ∫∫_{outside} U_in(Q) e^{i k |P−Q|²/(2L)} d²Q of physics notes §1
 * (the common factor e^{ikL} is omitted, as there). See free-beam.ts and disc.ts for the quadratures.
 */
import type { BenchSetup, ZernikeTerm } from '../../setup/types.ts';
import { deriveScene } from './scene.ts';
import { ProgressMeter } from './progress.ts';
import {
  addAnalyticFreeBeam,
  addNumericFreeBeam,
  numericWork,
  planNumericGrid,
  separableQuadratic,
  type NumericGridInfo,
  type ReferenceAccuracy,
} from './free-beam.ts';
import { circleWork, discRates, planCircle, planStrip, stripWork, subtractCircle, subtractStrip } from './disc.ts';

export interface ComplexGrid {
  nx: number;
  ny: number;
  /** Row-major [iy * nx + ix]. */
  re: Float64Array;
  im: Float64Array;
}

export interface ReferenceOptions {
  /**
   * 'normal' (default) or 'high'; 'draft' truncates the free beam's trapezoid grid at 1e-5 of the peak
   * amplitude instead of 1e-7, which changes the intensity by ≲ 2e-6 of the peak and takes about half the time
   * (README: for a correction that needs to be far below the camera noise, not for validation).
   */
  accuracy?: ReferenceAccuracy;
  /** Called with the completed fraction; returning false cancels (an Error named 'CancelledError' is thrown). */
  onProgress?: (fraction: number) => boolean | void;
  /**
   * The camera points the quadrature is planned for (default: the evaluated ones). A caller that computes a
   * grid in parts passes the whole grid's axes here, so that every part uses the same nodes; they must
   * cover the evaluated points.
   */
  planXsM?: Float64Array;
  planYsM?: Float64Array;
}

/** Options for tests and diagnostics (not part of the public API). */
export interface InternalOptions extends ReferenceOptions {
  /** Multiplies every node count and divides the free-beam grid spacing (convergence studies). Default 1. */
  nodeScale?: number;
  /** 'auto' (default): closed form when ψ is a separable quadratic, else trapezoid grid. */
  freeBeam?: 'auto' | 'numeric';
  /** Largest free-beam grid per axis before a RangeError. Default 6000. */
  maxGridPerAxis?: number;
}

export interface ReferenceInfo {
  freeBeam: 'closed-form' | 'trapezoid';
  grid: NumericGridInfo | null;
  circleRows: number;
  maxChordNodes: number;
  strip: { thetaNodes: number; radialNodes: number } | null;
}

export const DEFAULT_MAX_GRID_PER_AXIS = 6000;

function checkPoints(p: Float64Array, what: string): void {
  for (let i = 0; i < p.length; i++) {
    if (!Number.isFinite(p[i])) throw new RangeError(`${what}[${i}] must be finite; got ${String(p[i])}`);
  }
}

function range(p: Float64Array): [number, number] {
  let lo = Infinity;
  let hi = -Infinity;
  for (let i = 0; i < p.length; i++) {
    if (p[i] < lo) lo = p[i];
    if (p[i] > hi) hi = p[i];
  }
  return [lo, hi];
}

/** The quadrature is only as good as its plan: the evaluated points must lie within the planned ones. */
function checkCovered(p: Float64Array, plan: Float64Array, what: string): void {
  if (p === plan || p.length === 0) return;
  const [lo, hi] = range(p);
  const [plo, phi] = range(plan);
  if (lo < plo || hi > phi) throw new RangeError(`${what} spans [${lo}, ${hi}] m, outside the planned points' [${plo}, ${phi}] m`);
}

/** The reference field with a description of the quadrature used. */
export function referenceFieldWithInfo(
  setup: BenchSetup,
  aberrations: readonly ZernikeTerm[],
  xsM: Float64Array,
  ysM: Float64Array,
  options: InternalOptions = {},
): { field: ComplexGrid; info: ReferenceInfo } {
  const accuracy = options.accuracy ?? 'normal';
  if (accuracy !== 'normal' && accuracy !== 'high' && accuracy !== 'draft') throw new RangeError(`accuracy must be 'draft', 'normal' or 'high'; got ${String(accuracy)}`);
  // The disc's quadratures are the same for 'draft' as for 'normal'.
  const discAccuracy = accuracy === 'high' ? 'high' : 'normal';
  const nodeScale = options.nodeScale ?? 1;
  if (!(nodeScale >= 1 && Number.isFinite(nodeScale))) throw new RangeError(`nodeScale must be ≥ 1; got ${String(nodeScale)}`);
  const maxGrid = options.maxGridPerAxis ?? DEFAULT_MAX_GRID_PER_AXIS;
  checkPoints(xsM, 'xsM');
  checkPoints(ysM, 'ysM');
  const scene = deriveScene(setup, aberrations);
  const nx = xsM.length;
  const ny = ysM.length;
  const re = new Float64Array(nx * ny);
  const im = new Float64Array(nx * ny);

  const planXs = options.planXsM ?? xsM;
  const planYs = options.planYsM ?? ysM;
  if (options.planXsM) checkPoints(planXs, 'planXsM');
  if (options.planYsM) checkPoints(planYs, 'planYsM');
  checkCovered(xsM, planXs, 'xsM');
  checkCovered(ysM, planYs, 'ysM');
  const split = options.freeBeam === 'numeric' ? null : separableQuadratic(scene, setup.zernikeRadiusM);
  const grid = split ? null : planNumericGrid(scene, planXs, planYs, accuracy, nodeScale, maxGrid);
  const rates = discRates(scene, planXs, planYs);
  const circle = planCircle(scene, rates, discAccuracy, nodeScale);
  const strip = planStrip(scene, rates, discAccuracy, nodeScale);
  let maxChord = 0;
  for (let j = 0; j < circle.chordNodes.length; j++) maxChord = Math.max(maxChord, circle.chordNodes[j]);
  const info: ReferenceInfo = {
    freeBeam: split ? 'closed-form' : 'trapezoid',
    grid: grid
      ? { pointsX: grid.pointsX, pointsY: grid.pointsY, spacingXM: grid.spacingXM, spacingYM: grid.spacingYM, truncationRadiusM: grid.truncationRadiusM }
      : null,
    circleRows: circle.rows,
    maxChordNodes: maxChord,
    strip,
  };
  if (nx === 0 || ny === 0) return { field: { nx, ny, re, im }, info };

  const total =
    (grid ? numericWork(grid, nx, ny) : nx * ny) + circleWork(circle, nx, ny) + (strip ? stripWork(strip, nx, ny) : 0);
  const progress = new ProgressMeter(total, options.onProgress);
  progress.report(0);

  // S = S_all − S_disc, accumulated in (re, im).
  if (split) {
    addAnalyticFreeBeam(scene, split, xsM, ysM, re, im);
    progress.advance(nx * ny);
  } else {
    addNumericFreeBeam(scene, grid!, xsM, ysM, re, im, progress);
  }
  subtractCircle(scene, circle, xsM, ysM, re, im, progress);
  if (strip) subtractStrip(scene, strip, xsM, ysM, re, im, progress);

  // U = e^{i k |P|²/(2L)} · S / (iλL).
  const kOver2L = scene.waveNumberRadPerM / (2 * scene.distanceM);
  const invLL = 1 / (scene.wavelengthM * scene.distanceM);
  const qxR = new Float64Array(nx);
  const qxI = new Float64Array(nx);
  for (let fx = 0; fx < nx; fx++) {
    const p = kOver2L * xsM[fx] * xsM[fx];
    qxR[fx] = Math.cos(p);
    qxI[fx] = Math.sin(p);
  }
  for (let fy = 0; fy < ny; fy++) {
    const p = kOver2L * ysM[fy] * ysM[fy];
    const yr = Math.cos(p) * invLL;
    const yi = Math.sin(p) * invLL;
    const row = fy * nx;
    for (let fx = 0; fx < nx; fx++) {
      const pr = yr * qxR[fx] - yi * qxI[fx];
      const pi = yr * qxI[fx] + yi * qxR[fx];
      // S/i = (S_im, −S_re)
      const sr = im[row + fx];
      const si = -re[row + fx];
      re[row + fx] = pr * sr - pi * si;
      im[row + fx] = pr * si + pi * sr;
    }
  }
  progress.report(1);
  return { field: { nx, ny, re, im }, info };
}
