/**
 * The uncertainty of a calibrated disc profile carried into a later fit that uses it. The profile's
 * coefficients d enter the model but are held fixed; to first order the fitted parameters θ move by
 * δθ = −N⁻¹·(J_θᵀ·J_d)·δd (N = J_θᵀJ_θ, whitened Jacobians), so their covariance gains
 *     C_θ,profile = N⁻¹·B·Σ_d·Bᵀ·N⁻¹,   B = J_θᵀ·J_d
 * (linear error propagation, JCGM 100:2008 (GUM) §5.2 in matrix form). J_d is the disc-shape Jacobian of
 * ./shape.ts at the solution.
 */
import { evaluateModel, parameterCount, sharedParameterIndex, type BinnedFrame, type ModelLayout } from '../frameModel.ts';
import type { AppliedDiscProfile } from './profile.ts';

/**
 * Extra covariance (np × np, row-major, in the layout's parameter order) from the profile's uncertainty, or
 * null when the profile carries none. `layout` must not fit disc orders itself; `covariance` is N⁻¹.
 */
export function profileCovariance(
  frames: BinnedFrame[],
  layout: ModelLayout,
  params: Float64Array,
  rimSamples: number[],
  sigma: Float64Array,
  covariance: Float64Array,
  profile: AppliedDiscProfile,
): Float64Array | null {
  const unc = (profile.uncertainty ?? []).filter((u) => Number.isFinite(u.sigmaCos) && Number.isFinite(u.sigmaSin) && profile.terms.some((t) => t.order === u.order));
  if (unc.length === 0 || (layout.discOrders?.length ?? 0) > 0) return null;
  const orders = unc.map((u) => u.order);
  const ext: ModelLayout = { ...layout, discOrders: orders, discFixed: profile.terms };
  const np = parameterCount(layout);
  const ne = parameterCount(ext);
  const off = sharedParameterIndex(ext).disc;
  const nd = 2 * orders.length;
  // ext parameters: the layout's, with the disc coefficients inserted at `off`
  const pe = new Float64Array(ne);
  for (let k = 0; k < np; k++) pe[k < off ? k : k + nd] = params[k];
  orders.forEach((n, i) => {
    const t = profile.terms.find((q) => q.order === n)!;
    pe[off + 2 * i] = t.cos;
    pe[off + 2 * i + 1] = t.sin;
  });
  const J = evaluateModel(frames, ext, pe, true, rimSamples, 'exact').jacobian!;
  // B = J_θᵀ J_d (whitened)
  const B = new Float64Array(np * nd);
  for (let i = 0; i < sigma.length; i++) {
    const w = 1 / (sigma[i] * sigma[i]);
    const o = i * ne;
    for (let a = 0; a < np; a++) {
      const ja = J[o + (a < off ? a : a + nd)] * w;
      if (ja === 0) continue;
      for (let d = 0; d < nd; d++) B[a * nd + d] += ja * J[o + off + d];
    }
  }
  // Σ_d, block-diagonal per order
  const S = new Float64Array(nd * nd);
  unc.forEach((u, i) => {
    const c = Number.isFinite(u.correlation) ? u.correlation : 0;
    S[2 * i * nd + 2 * i] = u.sigmaCos ** 2;
    S[(2 * i + 1) * nd + 2 * i + 1] = u.sigmaSin ** 2;
    S[2 * i * nd + 2 * i + 1] = S[(2 * i + 1) * nd + 2 * i] = c * u.sigmaCos * u.sigmaSin;
  });
  // G = N⁻¹·B (np × nd); extra = G·Σ_d·Gᵀ
  const G = new Float64Array(np * nd);
  for (let a = 0; a < np; a++) for (let d = 0; d < nd; d++) {
    let s = 0;
    for (let k = 0; k < np; k++) s += covariance[a * np + k] * B[k * nd + d];
    G[a * nd + d] = s;
  }
  const GS = new Float64Array(np * nd);
  for (let a = 0; a < np; a++) for (let d = 0; d < nd; d++) {
    let s = 0;
    for (let e = 0; e < nd; e++) s += G[a * nd + e] * S[e * nd + d];
    GS[a * nd + d] = s;
  }
  const out = new Float64Array(np * np);
  for (let a = 0; a < np; a++) for (let b = 0; b < np; b++) {
    let s = 0;
    for (let d = 0; d < nd; d++) s += GS[a * nd + d] * G[b * nd + d];
    out[a * np + b] = s;
  }
  return out;
}
