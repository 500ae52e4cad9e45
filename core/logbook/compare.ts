/**
 * Comparing two measurements of a beam, typically before and after cleaning an optic.
 *
 * For each quantity q (RMS wavefront error, Strehl ratio, every Zernike coefficient fitted in both):
 *   Δ = q_B − q_A,   σ = √(σ_A² + σ_B²),   z = Δ / σ.
 * σ is the combined standard uncertainty of a difference of two uncorrelated estimates, by the law of
 * propagation of uncertainty (JCGM 100:2008, "GUM", §5.1.2, eq. 10, with sensitivity coefficients
 * ∂Δ/∂q_B = 1 and ∂Δ/∂q_A = −1). Two separate measurements are independent, so their results are
 * uncorrelated. |z| < 2 is "no significant change" (a 2σ threshold, about 95 % two-sided for a normal
 * distribution).
 *
 * Direction: smaller is better for the RMS error and for the size |c| of a coefficient; larger is better
 * for the Strehl ratio. For a coefficient, a significant signed change whose size |c| did not change
 * significantly (its sign flipped, say) gets the verdict "changed".
 */
import type { AnalysedMeasurement } from './types.ts';
import type { FitResult } from '../fit/result.ts';
import { zernikeName } from '../zernike/index.ts';

/** |z| at or above this is a significant change. */
export const SIGNIFICANCE_Z = 2;

export type Better = 'lower' | 'higher' | 'smaller magnitude';
export type Verdict = 'improved' | 'worse' | 'no significant change' | 'changed' | 'unknown';

export interface Difference {
  /** B − A */
  delta: number;
  /** Combined 1σ, √(σA² + σB²); null when an uncertainty is missing. */
  sigma: number | null;
  /** Δ/σ; null when σ is missing; ±Infinity when σ = 0 and Δ ≠ 0. */
  z: number | null;
}

/** Δ = b − a with its combined 1σ for independent a and b (GUM §5.1.2) and z = Δ/σ. */
export function difference(a: number, sigmaA: number | null, b: number, sigmaB: number | null): Difference {
  const delta = b - a;
  if (sigmaA === null || sigmaB === null || !Number.isFinite(sigmaA) || !Number.isFinite(sigmaB)) return { delta, sigma: null, z: null };
  const sigma = Math.hypot(sigmaA, sigmaB);
  const z = sigma > 0 ? delta / sigma : delta === 0 ? 0 : delta > 0 ? Infinity : -Infinity;
  return { delta, sigma, z };
}

/** The plain verdict on a change from a to b, given which direction is better. */
export function verdict(a: number, b: number, d: Difference, better: Better, threshold = SIGNIFICANCE_Z): Verdict {
  if (d.z === null || d.sigma === null) return 'unknown';
  if (Math.abs(d.z) < threshold) return 'no significant change';
  if (better === 'lower') return d.z < 0 ? 'improved' : 'worse';
  if (better === 'higher') return d.z > 0 ? 'improved' : 'worse';
  // Size of a coefficient: the change of |c| with the same σ (first-order propagation, |∂|c|/∂c| = 1).
  const dm = Math.abs(b) - Math.abs(a);
  const zm = d.sigma > 0 ? dm / d.sigma : dm === 0 ? 0 : dm > 0 ? Infinity : -Infinity;
  if (zm <= -threshold) return 'improved';
  if (zm >= threshold) return 'worse';
  return 'changed';
}

export interface ComparisonRow {
  /** "rms", "strehl" or "z<j>" (ANSI index). */
  key: string;
  label: string;
  /** ANSI index for a coefficient row. */
  j: number | null;
  unit: 'waves' | '';
  better: Better;
  a: number;
  sigmaA: number | null;
  b: number;
  sigmaB: number | null;
  delta: number;
  sigma: number | null;
  z: number | null;
  verdict: Verdict;
}

export interface ComparedSide {
  measurementId: number;
  resultId: number;
  takenAt: string;
  assetName: string;
  tags: string[];
  software: string;
  wavelengthM: number;
}

export interface Comparison {
  a: ComparedSide;
  b: ComparedSide;
  threshold: number;
  rows: ComparisonRow[];
  /** Things to keep in mind when reading the table (different wavelengths, term sets, assets...). */
  notes: string[];
}

function side(m: AnalysedMeasurement): ComparedSide {
  return {
    measurementId: m.id,
    resultId: m.resultId,
    takenAt: m.takenAt,
    assetName: m.assetName,
    tags: [...m.tags],
    software: m.result.software,
    wavelengthM: m.result.wavelength_m,
  };
}

function row(key: string, label: string, j: number | null, unit: 'waves' | '', better: Better, a: number, sA: number | null, b: number, sB: number | null, threshold: number): ComparisonRow {
  const d = difference(a, sA, b, sB);
  return { key, label, j, unit, better, a, sigmaA: sA, b, sigmaB: sB, delta: d.delta, sigma: d.sigma, z: d.z, verdict: verdict(a, b, d, better, threshold) };
}

function termIndices(r: FitResult): number[] {
  return r.zernike.terms.map((t) => t.j);
}

/** Compare measurement B against measurement A (Δ = B − A), row by row. */
export function compareResults(A: AnalysedMeasurement, B: AnalysedMeasurement, options: { threshold?: number } = {}): Comparison {
  const threshold = options.threshold ?? SIGNIFICANCE_Z;
  const ra = A.result;
  const rb = B.result;
  const rows: ComparisonRow[] = [
    row('rms', 'RMS wavefront error', null, 'waves', 'lower', ra.rmsWaves, ra.sigmaRmsWaves, rb.rmsWaves, rb.sigmaRmsWaves, threshold),
    row('strehl', 'Strehl ratio', null, '', 'higher', ra.strehl, ra.sigmaStrehl, rb.strehl, rb.sigmaStrehl, threshold),
  ];
  const byJ = new Map(rb.zernike.terms.map((t) => [t.j, t]));
  const common = ra.zernike.terms.filter((t) => byJ.has(t.j)).sort((x, y) => x.j - y.j);
  for (const ta of common) {
    const tb = byJ.get(ta.j)!;
    rows.push(row(`z${ta.j}`, `${zernikeName(ta.j)} (j=${ta.j})`, ta.j, 'waves', 'smaller magnitude', ta.waves, ta.sigmaWaves, tb.waves, tb.sigmaWaves, threshold));
  }

  const notes: string[] = [];
  const ja = termIndices(ra);
  const jb = termIndices(rb);
  const onlyA = ja.filter((j) => !jb.includes(j));
  const onlyB = jb.filter((j) => !ja.includes(j));
  if (onlyA.length || onlyB.length) {
    notes.push(
      `The two fits used different sets of terms (A: ${ja.join(', ')}; B: ${jb.join(', ')}). Coefficients depend on the set fitted, so compare them with care` +
        `${onlyA.length ? `; only A has j = ${onlyA.join(', ')}` : ''}${onlyB.length ? `; only B has j = ${onlyB.join(', ')}` : ''}.`,
    );
  }
  if (Math.abs(ra.wavelength_m - rb.wavelength_m) > 1e-6 * ra.wavelength_m) {
    notes.push(`The results are at different wavelengths (A ${(ra.wavelength_m * 1e9).toFixed(1)} nm, B ${(rb.wavelength_m * 1e9).toFixed(1)} nm): values in waves are not directly comparable.`);
  }
  if (Math.abs(ra.zernike.radius_m - rb.zernike.radius_m) > 1e-6 * ra.zernike.radius_m) {
    notes.push(
      `The coefficients are normalised over different radii (A ${(ra.zernike.radius_m * 1e3).toFixed(3)} mm, B ${(rb.zernike.radius_m * 1e3).toFixed(3)} mm): they are not directly comparable.`,
    );
  }
  for (const [name, r] of [['A', ra], ['B', rb]] as const) {
    if (r.trusted === false) notes.push(`The fit of ${name} is marked untrusted (it stopped in a wrong minimum): do not rely on its values.`);
  }
  if (A.assetName !== B.assetName) notes.push(`The measurements are of different assets (A: ${A.assetName}, B: ${B.assetName}).`);
  if (ra.software !== rb.software) notes.push(`The results were made by different software (A: ${ra.software}; B: ${rb.software}).`);
  if (B.takenAt < A.takenAt) notes.push('B was taken before A; Δ = B − A still reads "from A to B".');
  if (rows.some((r) => r.verdict === 'unknown')) notes.push('Some uncertainties are missing; those rows have no verdict.');
  return { a: side(A), b: side(B), threshold, rows, notes };
}
