/**
 * Cramér–Rao bound of the fit parameters for a frame model: the inverse of the Fisher information
 * F = Σ_i (∂μ_i/∂θ)(∂μ_i/∂θ)ᵀ/σ_i² for independent Gaussian pixel noise of variance σ_i² (Kay,
 * Fundamentals of Statistical Signal Processing: Estimation Theory, 1993, §3.9). The derivatives come from
 * the fast model's analytic Jacobian; super-pixels of 1×1 keep every pixel's information.
 */
import { invertSPD } from './levenbergMarquardt.ts';
import { binFrame, evaluateModel, parameterCount, rimSamplesFor, superPixelVariance, type FitFrameInput, type ModelLayout } from './frameModel.ts';

export interface CramerRao {
  /** 1σ bound for each parameter, in the layout's order (coefficients first, in waves). */
  sigma: Float64Array;
  fisher: Float64Array;
}

export function cramerRaoBound(inputs: FitFrameInput[], layout: ModelLayout, params: Float64Array, binning = 1): CramerRao {
  const frames = inputs.map((f) => binFrame(f, binning));
  const rim = rimSamplesFor(frames, layout.terms.map((j) => ({ j, waves: 0.3 })));
  const np = parameterCount(layout);
  const ev = evaluateModel(frames, layout, params, true, rim);
  const variance = superPixelVariance(frames, layout, params, ev.intensity);
  const J = ev.jacobian!;
  const F = new Float64Array(np * np);
  for (let i = 0; i < variance.length; i++) {
    const w = 1 / variance[i];
    const o = i * np;
    for (let a = 0; a < np; a++) {
      const ja = J[o + a] * w;
      if (ja === 0) continue;
      for (let b = a; b < np; b++) F[a * np + b] += ja * J[o + b];
    }
  }
  for (let a = 0; a < np; a++) for (let b = 0; b < a; b++) F[a * np + b] = F[b * np + a];
  const inv = invertSPD(F, np);
  const sigma = new Float64Array(np);
  for (let a = 0; a < np; a++) sigma[a] = inv ? Math.sqrt(Math.max(inv[a * np + a], 0)) : NaN;
  return { sigma, fisher: F };
}
