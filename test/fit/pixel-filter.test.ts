/**
 * The fit's super-pixel integration (core/fit/frameModel.ts): the model sampled at super-pixel centres and
 * averaged by the separable filter PIXEL_FILTER must reproduce the exact mean over each b×b super-pixel.
 * Reference: the mean of cos(kx + φ) over an interval of width h centred on x is
 * [sin(k(x + h/2) + φ) − sin(k(x − h/2) + φ)]/(kh), by direct integration (any calculus text), and a 2-D
 * separable function averages to the product of the 1-D means. For comparison, the 2×2 Gauss–Legendre rule
 * (Abramowitz & Stegun 25.4.29, nodes ±1/(2√3) of the cell) integrates the same cosine to cos(θ/(2√3)).
 */
import { describe, expect, it } from 'vitest';
import { binFrame, PIXEL_FILTER, stencilReducer, type FitFrameInput } from '../../core/fit/frameModel.ts';
import { fastField } from '../../core/optics/fast/rimModel.ts';
import { makeSetup } from '../optics/helpers.ts';

// The HeNe example bench: 632.8 nm, w = 4 mm collimated, 3 mm disc at 0.8 m, 5.5 µm pixels.
const setup = makeSetup({});

function input(widthPx: number, heightPx: number, regionRadiusPx: number): FitFrameInput {
  return {
    setup,
    counts: new Float64Array(widthPx * heightPx).fill(100),
    widthPx,
    heightPx,
    mask: null,
    frameCount: 1,
    darkCount: 0,
    readNoiseCounts: 3,
    gainCountsPerElectron: 1,
    regionCenterPx: [(widthPx - 1) / 2, (heightPx - 1) / 2],
    regionRadiusPx,
  };
}

const boxMean = (k: number, phi: number, x: number, h: number) => (Math.sin(k * (x + h / 2) + phi) - Math.sin(k * (x - h / 2) + phi)) / (k * h);

describe('super-pixel integration by the centre-sample filter', () => {
  it('keeps a constant exactly (the weights sum to 1)', () => {
    expect(PIXEL_FILTER.reduce((a, b) => a + b, 0)).toBeCloseTo(1, 14);
  });

  for (const b of [1, 3, 6]) {
    it(`matches the exact mean of 2-D cosines over ${b}×${b} super-pixels up to θ = 1.6 rad per super-pixel`, () => {
      const fr = binFrame(input(96, 72, 200), b);
      const h = b * setup.camera.pixelPitchM;
      const reduce = stencilReducer(fr);
      let worst = 0;
      for (const theta of [0.2, 0.6, 1.0, 1.26, 1.6]) {
        // θ = k·h: the phase advance per super-pixel; the y frequency differs so the 2-D product is tested.
        const kx = theta / h, ky = (0.7 * theta) / h, phx = 0.3, phy = -1.1;
        const v = new Float64Array(fr.xs.length * fr.ys.length);
        for (let r = 0; r < fr.ys.length; r++) for (let c = 0; c < fr.xs.length; c++) v[r * fr.xs.length + c] = Math.cos(kx * fr.xs[c] + phx) * Math.cos(ky * fr.ys[r] + phy);
        const got = reduce(v);
        for (let u = 0; u < fr.used.length; u++) {
          const cell = fr.used[u];
          const bx = cell % fr.nbx, by = (cell - bx) / fr.nbx;
          const B = (fr.xs.length - fr.nbx) / 2;
          const exact = boxMean(kx, phx, fr.xs[bx + B], h) * boxMean(ky, phy, fr.ys[by + B], h);
          worst = Math.max(worst, Math.abs(got[u] - exact));
        }
      }
      // The filter's design bound is 5.1e-5 of the cosine's amplitude per axis.
      expect(worst).toBeLessThan(1.1e-4);
    });
  }

  it('splits super-pixels wider than about a quarter of the ring period into sub-cells, and stays exact to 1e-4 there', () => {
    // Ring period λL/(2a) = 168.7 µm = 30.7 px here; 16-pixel super-pixels span θ = 3.3 rad of it: 2×2 sub-cells.
    const b = 16;
    const fr = binFrame(input(160, 128, 200), b);
    expect(fr.subcells).toBe(2);
    expect(binFrame(input(160, 128, 200), 6).subcells).toBe(1);
    expect(binFrame(input(160, 128, 200), b, 1).subcells).toBe(1);
    const h = b * setup.camera.pixelPitchM;
    const reduce = stencilReducer(fr);
    let worst = 0;
    for (const theta of [0.5, 1.5, 2.5, 3.2]) {
      const kx = theta / h, ky = (0.8 * theta) / h;
      const v = new Float64Array(fr.xs.length * fr.ys.length);
      for (let r = 0; r < fr.ys.length; r++) for (let c = 0; c < fr.xs.length; c++) v[r * fr.xs.length + c] = Math.cos(kx * fr.xs[c] + 0.4) * Math.cos(ky * fr.ys[r] - 0.2);
      const got = reduce(v);
      for (let u = 0; u < fr.used.length; u++) {
        const cell = fr.used[u];
        const bx = cell % fr.nbx, by = (cell - bx) / fr.nbx;
        // super-pixel centre from its pixel span (pixel c spans c − ½ … c + ½)
        const xc = (bx * b + (b - 1) / 2 - (160 - 1) / 2) * setup.camera.pixelPitchM;
        const yc = -(by * b + (b - 1) / 2 - (128 - 1) / 2) * setup.camera.pixelPitchM;
        worst = Math.max(worst, Math.abs(got[u] - boxMean(kx, 0.4, xc, h) * boxMean(ky, -0.2, yc, h)));
      }
    }
    expect(worst).toBeLessThan(1.1e-4);
  });

  it('is more accurate than 2×2 Gauss–Legendre sampling at the finest ring period the fit bins to (θ = 1.26)', () => {
    const theta = 1.26;
    const exact = Math.sin(theta / 2) / (theta / 2);
    const gl2 = Math.cos(theta / (2 * Math.sqrt(3)));
    let filt = 0;
    for (let m = 0; m < PIXEL_FILTER.length; m++) filt += PIXEL_FILTER[m] * Math.cos((m - (PIXEL_FILTER.length - 1) / 2) * theta);
    expect(Math.abs(gl2 - exact)).toBeGreaterThan(5e-4);
    expect(Math.abs(filt - exact)).toBeLessThan(6e-5);
  });

  it('needs only the grid points the used super-pixels read (the point mask), and the fast model computes just those', () => {
    const fr = binFrame(input(64, 64, 20), 2);
    const needed = fr.needed.reduce((a, b) => a + b, 0);
    expect(needed).toBeLessThan(fr.xs.length * fr.ys.length);
    const full = fastField(setup, [{ j: 7, waves: 0.05 }], fr.xs, fr.ys, { nPhi: 96, derivativeTerms: [7], centerDerivatives: true });
    const part = fastField(setup, [{ j: 7, waves: 0.05 }], fr.xs, fr.ys, { nPhi: 96, derivativeTerms: [7], centerDerivatives: true, pointMask: fr.needed });
    const reduce = stencilReducer(fr);
    const i = (f: typeof full) => Float64Array.from(f.re, (re, k) => re * re + f.im[k] * f.im[k]);
    expect(Array.from(reduce(i(part)))).toEqual(Array.from(reduce(i(full))));
    for (let k = 0; k < fr.needed.length; k++) if (!fr.needed[k]) expect(part.re[k]).toBe(0);
    expect(Array.from(reduce(part.dRe[0]))).toEqual(Array.from(reduce(full.dRe[0])));
  });
});
