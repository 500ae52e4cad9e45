/**
 * The Fisher information of the fit's frame model for a round pattern, from radial profiles.
 *
 * For an ideal beam centred on a round disc the expected frame is rotationally symmetric, I = I(r), and
 * invariant under the mirror y → −y. The change of the frame caused by a Zernike term of azimuthal order
 * m is then, to first order, A(r)·cos(mφ) for the cos-type term (m > 0), A(r)·sin(|m|φ) for its sin-type
 * partner (the same A, the term being the partner turned by π/(2|m|)), and A(r) for m = 0. The pattern
 * centre gives −I'(r)·cos φ and −I'(r)·sin φ, the scale I(r), the background 1 and the camera distance a
 * radial profile as well. The Fisher information of independent pixels with Gaussian noise of variance
 * σ²(r) (Kay 1993, §3.9),
 *     F_pq = Σ_pixels ∂μ/∂θ_p · ∂μ/∂θ_q / σ²,
 * becomes, with the sum over pixels of pitch p written as an area integral over the circular region,
 *     F_pq = w_pq / p² · ∫₀^R A_p(r)·A_q(r)/σ²(r) · r dr,
 * with w = 2π for two m = 0 parameters, π for two parameters of the same |m| ≥ 1 and the same type
 * (cos or sin), and 0 otherwise (orthogonality of the angular factors over a full turn).
 *
 * This is the same information as core/fit/crb.ts computes on the full frame at pixel level (super-pixels
 * of 1×1), at the cost of one radial line of the fast model instead of a whole frame. It holds only at a
 * rotationally symmetric working point (no aberrations, beam centred on the disc, round disc).
 * Pure.
 */
import type { ModelLayout } from '../fit/frameModel.ts';
import { fastField } from '../optics/fast/rimModel.ts';
import { effectiveDistanceM } from '../optics/geometry.ts';
import type { BenchSetup } from '../setup/types.ts';
import { ansiToNM, nmToAnsi } from '../zernike/index.ts';

export interface RadialNoise {
  /** Expected counts per unit relative intensity. */
  countsPerUnitIntensity: number;
  gainCountsPerElectron: number;
  readNoiseCounts: number;
  averagedFrames: number;
}

export interface RadialProfile {
  /** Radii of the samples on the camera, m. */
  radiiM: Float64Array;
  /** Relative intensity at each radius. */
  intensity: Float64Array;
}

/**
 * Largest radial step that resolves the pattern: 1/16 of the ring period λL/(2a) (the derivative patterns
 * oscillate at half of it), 1/20 of the edge-fringe scale M·√(λL'/2), and at most one pixel.
 */
export function radialStepM(setup: BenchSetup): number {
  const L = setup.camera.distanceM;
  const lp = effectiveDistanceM(L, setup.beam.curvatureRadiusM);
  const ringPeriodM = (setup.wavelengthM * L) / (2 * setup.disc.radiusM);
  const fringeM = (L / lp) * Math.sqrt((setup.wavelengthM * lp) / 2);
  return Math.min(ringPeriodM / 16, fringeM / 20, setup.camera.pixelPitchM);
}

/** Relative intensity of the ideal pattern along a radius, out to radiusM (step: radialStepM). */
export function radialIntensity(setup: BenchSetup, radiusM: number): RadialProfile {
  const step = radialStepM(setup);
  const n = Math.max(1, Math.ceil(radiusM / step));
  const radiiM = Float64Array.from({ length: n }, (_, i) => Math.min(radiusM, (i + 0.5) * step));
  const f = fastField(setup, [], radiiM, Float64Array.of(0));
  const intensity = new Float64Array(n);
  for (let i = 0; i < n; i++) intensity[i] = f.re[i] * f.re[i] + f.im[i] * f.im[i];
  return { radiiM, intensity };
}

type AngularKind = { m: number; kind: 'cos' | 'sin' | 'radial' };

/**
 * Fisher matrix (np × np, row-major, in the layout's parameter order: coefficients, centre x, centre y,
 * scale, background, then the distance offset when freed) for one frame whose analysed region is a circle
 * of radius regionRadiusM around the pattern centre. Only `layout.nFrames = 1` and `freeDiscRadius = false`.
 */
export function radialFisher(
  setup: BenchSetup,
  layout: ModelLayout,
  regionRadiusM: number,
  noise: RadialNoise,
  /** binningPx: the fit's super-pixel size; samplesPerPixel: a fixed radial sampling instead of radialStepM. */
  options: { binningPx?: number; samplesPerPixel?: number } = {},
): Float64Array {
  const binning = Math.max(1, Math.floor(options.binningPx ?? 1));
  if (layout.nFrames !== 1 || layout.freeDiscRadius) throw new RangeError('radialFisher: one frame, disc radius fixed');
  const terms = layout.terms;
  const pitch = setup.camera.pixelPitchM;
  // Samples per super-pixel width along r: enough for the finest structure (see radialStepM).
  const cellM = binning * pitch;
  const perCell = options.samplesPerPixel !== undefined ? options.samplesPerPixel * binning : Math.max(2, Math.ceil(cellM / radialStepM(setup)));
  const step = cellM / perCell;
  const n = Math.max(1, Math.ceil(regionRadiusM / step));
  // Midpoint rule in r: samples at (i + ½)·step, the last one shortened to end at the region's edge.
  const radiiM = new Float64Array(n);
  const widthM = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const r0 = i * step;
    const r1 = Math.min(regionRadiusM, (i + 1) * step);
    radiiM[i] = 0.5 * (r0 + r1);
    widthM[i] = r1 - r0;
  }
  // Cos-type (or m = 0) partner of each term: its radial profile serves the sin-type term as well.
  const kinds: AngularKind[] = terms.map((j) => {
    const { m } = ansiToNM(j);
    return { m: Math.abs(m), kind: m > 0 ? 'cos' : m < 0 ? 'sin' : 'radial' };
  });
  const partners = [...new Set(terms.map((j) => {
    const { n: nn, m } = ansiToNM(j);
    return nmToAnsi(nn, Math.abs(m));
  }))];
  const f = fastField(setup, [], radiiM, Float64Array.of(0), { derivativeTerms: partners, centerDerivatives: true });
  const s = noise.countsPerUnitIntensity;
  const I = new Float64Array(n);
  for (let i = 0; i < n; i++) I[i] = f.re[i] * f.re[i] + f.im[i] * f.im[i];
  const dI = (q: number) => Float64Array.from({ length: n }, (_, i) => 2 * (f.re[i] * f.dRe[q][i] + f.im[i] * f.dIm[q][i]));
  const profiles: Float64Array[] = [];
  const angular: AngularKind[] = [];
  terms.forEach((j, k) => {
    const { n: nn, m } = ansiToNM(j);
    const q = partners.indexOf(nmToAnsi(nn, Math.abs(m)));
    profiles.push(dI(q).map((v) => s * v));
    angular.push(kinds[k]);
  });
  // Centre: μ(P) = s·I(P − c), so ∂μ/∂cx = −s·∂I/∂x = −s·I'(r)·cos φ, and likewise for y with sin φ.
  const dIdx = dI(partners.length);
  const centre = dIdx.map((v) => -s * v);
  profiles.push(centre, centre);
  angular.push({ m: 1, kind: 'cos' }, { m: 1, kind: 'sin' });
  profiles.push(I.map((v) => v), new Float64Array(n).fill(1));
  angular.push({ m: 0, kind: 'radial' }, { m: 0, kind: 'radial' });
  if (layout.freeDistance) {
    const h = 1e-5 * setup.camera.distanceM;
    const at = (dL: number) => {
      const moved: BenchSetup = { ...setup, camera: { ...setup.camera, distanceM: setup.camera.distanceM + dL } };
      const g = fastField(moved, [], radiiM, Float64Array.of(0), { nPhi: f.nPhi });
      return Float64Array.from({ length: n }, (_, i) => g.re[i] * g.re[i] + g.im[i] * g.im[i]);
    };
    const plus = at(h);
    const minus = at(-h);
    profiles.push(Float64Array.from({ length: n }, (_, i) => (s * (plus[i] - minus[i])) / (2 * h)));
    angular.push({ m: 0, kind: 'radial' });
  }
  if (binning > 1) {
    // Super-pixels of b×b pixels average the frame over a square whose projection on any direction has the
    // variance (b·p)²/12 of a box of width b·p: to second order in b, a moving average of width b·p along r.
    const parity = angular.map((a) => (a.m % 2 === 0 ? 1 : -1));
    const width = perCell;
    for (let k = 0; k < profiles.length; k++) profiles[k] = boxAlongRadius(profiles[k], width, parity[k]);
    const Ib = boxAlongRadius(I, width, 1);
    I.set(Ib);
  }
  const np = profiles.length;
  // Weight of each radial sample: r·dr / (p²·σ²); a super-pixel mean of b² pixels has 1/b² of the
  // variance, and there are 1/b² as many, so the area density of information is unchanged.
  const weight = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const variance = (noise.gainCountsPerElectron * Math.max(s * I[i], 0) + noise.readNoiseCounts ** 2) / noise.averagedFrames;
    weight[i] = (radiiM[i] * widthM[i]) / (pitch * pitch * variance);
  }
  const F = new Float64Array(np * np);
  for (let a = 0; a < np; a++) {
    for (let b = a; b < np; b++) {
      const ka = angular[a];
      const kb = angular[b];
      if (ka.m !== kb.m || ka.kind !== kb.kind) continue;
      const w = ka.kind === 'radial' ? 2 * Math.PI : Math.PI;
      let sum = 0;
      const pa = profiles[a];
      const pb = profiles[b];
      for (let i = 0; i < n; i++) sum += pa[i] * pb[i] * weight[i];
      F[a * np + b] = w * sum;
      F[b * np + a] = w * sum;
    }
  }
  return F;
}

/**
 * Moving average of width `width` samples of a profile sampled at (i + ½)·step, i = 0…n−1, continued
 * through r = 0 as an even (parity 1) or odd (parity −1) function and, past the last sample, as constant.
 */
function boxAlongRadius(v: Float64Array, width: number, parity: 1 | -1 | number): Float64Array {
  const n = v.length;
  const at = (i: number) => (i < 0 ? parity * v[Math.min(n - 1, -i - 1)] : v[Math.min(n - 1, i)]);
  const half = width / 2;
  const out = new Float64Array(n);
  // Window [i − half, i + half] in sample units, with fractional end weights.
  for (let i = 0; i < n; i++) {
    const lo = i - half;
    const hi = i + half;
    let sum = 0;
    const i0 = Math.ceil(lo);
    const i1 = Math.floor(hi);
    for (let k = i0; k <= i1; k++) sum += at(k);
    // Each sample stands for a cell of unit width; trim the two end cells to the window.
    sum -= (0.5 - (i0 - lo)) * at(i0) + (0.5 - (hi - i1)) * at(i1);
    out[i] = sum / width;
  }
  return out;
}
