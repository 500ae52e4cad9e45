/**
 * Pure helpers of the compare screen: labels for the two pickers, the pair offered first (before and
 * after cleaning when the tags say so), the rows of the differences table, and one colour scale for
 * both wavefront maps.
 *
 * Significance: a change is marked significant when |Δ|/σ ≥ the comparison's threshold (2 by default,
 * core/logbook/compare.ts SIGNIFICANCE_Z: a 2σ threshold, about 95 % two-sided for a normal
 * distribution; common practice, no published source). σ = √(σA² + σB²) is computed in core
 * (JCGM 100:2008 "GUM" §5.1.2).
 */
import type { ImagePlane } from '../../../shared/contract.ts';
import type { MeasurementSummary } from '../../../../core/logbook/types.ts';
import type { ComparisonRow, Verdict } from '../../../../core/logbook/compare.ts';
import { formatWhen } from '../../../../core/logbook/format.ts';
import { formatPm, formatSignedPm } from './logbookView.ts';

/** "2025-03-04 09:30Z · HeNe bench · before cleaning, weekly · #12" */
export function measurementLabel(m: MeasurementSummary): string {
  const tags = m.tags.length ? m.tags.join(', ') : 'no tags';
  return `${formatWhen(m.takenAt)} · ${m.assetName} · ${tags} · #${m.id}`;
}

function byTime(x: MeasurementSummary, y: MeasurementSummary): number {
  return x.takenAt < y.takenAt ? -1 : x.takenAt > y.takenAt ? 1 : x.id - y.id;
}

const hasTagWord = (m: MeasurementSummary, word: string) => m.tags.some((t) => t.toLowerCase().includes(word));

/**
 * The pair to offer first. When some measurement's tags mention "before", A is the latest such one and
 * B the first later measurement of the same asset whose tags mention "after" (or else the next one of
 * that asset). Otherwise A and B are the two latest measurements of the asset measured last.
 * Measurements without a result cannot be compared and are skipped.
 */
export function defaultPair(list: readonly MeasurementSummary[]): { a: number | null; b: number | null } {
  const ms = list.filter((m) => m.latest).slice().sort(byTime);
  if (ms.length < 2) return { a: ms[0]?.id ?? null, b: null };
  const befores = ms.filter((m) => hasTagWord(m, 'before'));
  for (let k = befores.length - 1; k >= 0; k--) {
    const a = befores[k];
    const later = ms.filter((m) => m.assetName === a.assetName && byTime(m, a) > 0);
    const b = later.find((m) => hasTagWord(m, 'after')) ?? later[0];
    if (b) return { a: a.id, b: b.id };
  }
  const lastAsset = ms[ms.length - 1].assetName;
  const same = ms.filter((m) => m.assetName === lastAsset);
  if (same.length >= 2) return { a: same[same.length - 2].id, b: same[same.length - 1].id };
  return { a: ms[ms.length - 2].id, b: ms[ms.length - 1].id };
}

/** |Δ|/σ for the table: "3.4", "∞" when σ = 0 and Δ ≠ 0, "—" when σ is unknown. */
export function formatSignificance(z: number | null): string {
  if (z === null || Number.isNaN(z)) return '—';
  const a = Math.abs(z);
  if (!Number.isFinite(a)) return '∞';
  return a >= 100 ? a.toFixed(0) : a.toFixed(1);
}

/** Significant when |Δ|/σ reaches the threshold (the same test as core's verdict). */
export function isSignificant(z: number | null, threshold: number): boolean {
  return z !== null && !Number.isNaN(z) && Math.abs(z) >= threshold;
}

export interface CompareRowView {
  key: string;
  label: string;
  unit: string;
  a: string;
  b: string;
  /** "−0.0400 ± 0.0050" */
  delta: string;
  significance: string;
  significant: boolean;
  verdict: Verdict;
  /** The verdict with the direction in words, e.g. "improved (smaller)". */
  verdictText: string;
}

const BETTER_WORDS: Record<ComparisonRow['better'], string> = {
  lower: 'lower is better',
  higher: 'higher is better',
  'smaller magnitude': 'smaller size is better',
};

export function compareRowView(r: ComparisonRow, threshold: number): CompareRowView {
  const significant = isSignificant(r.z, threshold);
  let verdictText: string = r.verdict;
  if (r.verdict === 'changed') verdictText = 'changed (the sign moved, the size did not)';
  else if (r.verdict === 'unknown') verdictText = 'unknown (an uncertainty is missing)';
  else if (r.verdict === 'improved' || r.verdict === 'worse') verdictText = `${r.verdict} (${BETTER_WORDS[r.better]})`;
  return {
    key: r.key,
    label: r.label,
    unit: r.unit,
    a: formatPm(r.a, r.sigmaA),
    b: formatPm(r.b, r.sigmaB),
    delta: formatSignedPm(r.delta, r.sigma),
    significance: formatSignificance(r.z),
    significant,
    verdict: r.verdict,
    verdictText,
  };
}

/** The largest |value| over the finite pixels of all planes: the half-range of one shared symmetric colour scale. */
export function sharedSymmetricRange(planes: readonly ImagePlane[]): number {
  let m = 0;
  for (const p of planes) {
    for (let i = 0; i < p.data.length; i++) {
      const v = Math.abs(p.data[i]);
      if (Number.isFinite(v) && v > m) m = v;
    }
  }
  return m;
}

/** B − A pixel by pixel (NaN where either is NaN), or null when the two maps differ in size. */
export function differencePlane(a: ImagePlane, b: ImagePlane): ImagePlane | null {
  if (a.widthPx !== b.widthPx || a.heightPx !== b.heightPx) return null;
  const data = new Float32Array(a.data.length);
  for (let i = 0; i < data.length; i++) data[i] = b.data[i] - a.data[i];
  return { widthPx: a.widthPx, heightPx: a.heightPx, pixelM: a.pixelM, data };
}
