/**
 * The free-beam term of the Babinet split against the Fresnel propagation of a Gaussian beam
 * (complex beam parameter q, Siegman, Lasers, ch. 16–17; Goodman, Introduction to Fourier Optics):
 * with U_in = exp(ik r²/(2q₀)), 1/q₀ = 1/R + iλ/(πw²), the field after a distance L is
 * U = (q₀/q)·exp(ik r²/(2q)), q = q₀ + L (same e^{+ik|P−Q|²/(2L)} kernel as physics notes §1,
 * common factor e^{ikL} omitted). A decentred collimated beam is the same pattern shifted.
 * Both routes are checked: the closed form and the trapezoid grid, also at the 'draft' accuracy (grid
 * truncated at 1e-5 of the peak amplitude instead of 1e-7; used by the fit's reference-model polish).
 */
import { describe, expect, it } from 'vitest';
import type { BenchSetup } from '../../../core/setup/types.ts';
import { deriveScene } from '../../../core/optics/reference/scene.ts';
import { addAnalyticFreeBeam, addNumericFreeBeam, planNumericGrid, separableQuadratic } from '../../../core/optics/reference/free-beam.ts';
import { ProgressMeter } from '../../../core/optics/reference/progress.ts';
import { bench, centredAxis } from './scenes.ts';

/** Free-beam field U(P) = e^{ik|P|²/2L}·S_all(P)/(iλL) by the chosen route. */
function freeBeam(setup: BenchSetup, xs: Float64Array, ys: Float64Array, route: 'closed-form' | 'trapezoid' | 'trapezoid, draft') {
  const scene = deriveScene(setup, []);
  const re = new Float64Array(xs.length * ys.length);
  const im = new Float64Array(xs.length * ys.length);
  if (route === 'closed-form') {
    addAnalyticFreeBeam(scene, separableQuadratic(scene, setup.zernikeRadiusM)!, xs, ys, re, im);
  } else {
    const accuracy = route === 'trapezoid' ? 'normal' : 'draft';
    addNumericFreeBeam(scene, planNumericGrid(scene, xs, ys, accuracy, 1, 6000), xs, ys, re, im, new ProgressMeter(1));
  }
  const L = setup.camera.distanceM;
  const k = scene.waveNumberRadPerM;
  const out = { re: new Float64Array(re.length), im: new Float64Array(re.length) };
  for (let iy = 0; iy < ys.length; iy++) {
    for (let ix = 0; ix < xs.length; ix++) {
      const i = iy * xs.length + ix;
      const p = (k * (xs[ix] ** 2 + ys[iy] ** 2)) / (2 * L);
      // S/(iλL) = (S_im − i S_re)/(λL), then times e^{ip}
      const sr = im[i] / (setup.wavelengthM * L);
      const si = -re[i] / (setup.wavelengthM * L);
      out.re[i] = sr * Math.cos(p) - si * Math.sin(p);
      out.im[i] = sr * Math.sin(p) + si * Math.cos(p);
    }
  }
  return out;
}

/** Gaussian beam by the q-parameter law (Siegman). */
function gaussianBeam(setup: BenchSetup, x: number, y: number): [number, number] {
  const { wavelengthM: lambda } = setup;
  const w = setup.beam.radiusM;
  const R = setup.beam.curvatureRadiusM;
  const L = setup.camera.distanceM;
  const [cx, cy] = setup.beam.centerM;
  const k = (2 * Math.PI) / lambda;
  // 1/q0 = 1/R + i λ/(π w²)
  const ir = 1 / R;
  const ii = lambda / (Math.PI * w * w);
  const d = ir * ir + ii * ii;
  const q0r = ir / d;
  const q0i = -ii / d;
  const qr = q0r + L;
  const qi = q0i;
  const qd = qr * qr + qi * qi;
  // q0/q
  const ar = (q0r * qr + q0i * qi) / qd;
  const ai = (q0i * qr - q0r * qi) / qd;
  // i k r²/(2q) = i k r² (q_r − i q_i)/(2|q|²) = k r² q_i/(2|q|²) + i k r² q_r/(2|q|²)
  const r2 = (x - cx) ** 2 + (y - cy) ** 2;
  const mag = Math.exp((k * r2 * qi) / (2 * qd));
  const ei = (k * r2 * qr) / (2 * qd);
  return [ar * mag * Math.cos(ei) - ai * mag * Math.sin(ei), ar * mag * Math.sin(ei) + ai * mag * Math.cos(ei)];
}

describe('free beam = propagated Gaussian beam (Siegman q-parameter law)', () => {
  const xs = centredAxis(9, 0.5e-3);
  const ys = centredAxis(7, 0.6e-3);
  const setups: [string, BenchSetup][] = [
    ['collimated', bench()],
    ['diverging R = 0.5 m', bench({ curvatureRadiusM: 0.5 })],
    ['converging R = −3 m', bench({ curvatureRadiusM: -3, beamRadiusM: 2e-3 })],
    ['decentred collimated', bench({ beamCenterM: [0.7e-3, -0.4e-3] })],
    ['far field of a small beam', bench({ beamRadiusM: 0.3e-3, distanceM: 2 })],
  ];
  for (const [name, setup] of setups) {
    for (const route of ['closed-form', 'trapezoid', 'trapezoid, draft'] as const) {
      it(`${name}, ${route}`, () => {
        const u = freeBeam(setup, xs, ys, route);
        let peak = 0;
        let worst = 0;
        for (let iy = 0; iy < ys.length; iy++) {
          for (let ix = 0; ix < xs.length; ix++) {
            const [gr, gi] = gaussianBeam(setup, xs[ix], ys[iy]);
            const i = iy * xs.length + ix;
            peak = Math.max(peak, Math.hypot(gr, gi));
            worst = Math.max(worst, Math.hypot(u.re[i] - gr, u.im[i] - gi));
          }
        }
        expect(peak).toBeGreaterThan(0.05);
        expect(worst / peak).toBeLessThan({ 'closed-form': 1e-12, trapezoid: 1e-6, 'trapezoid, draft': 1e-5 }[route]);
      });
    }
  }
});
