/**
 * Pure helpers of the logbook screen: the search form → a MeasurementQuery, the flags of a listed
 * measurement against its asset's limits and the trend's signals, and value ± σ formatting.
 */
import type { MeasurementQuery } from '../../../shared/contract.ts';
import type { Asset, MeasurementSummary } from '../../../../core/logbook/types.ts';
import type { Trend } from '../../../../core/logbook/trend.ts';
import { formatValue } from '../../../../core/logbook/format.ts';
import { fmtPm } from './format.ts';

/** The search form as typed: every field a string, "" meaning "any". */
export interface LogbookFilter {
  asset: string;
  /** "YYYY-MM-DD" from a date field, or "". */
  since: string;
  until: string;
  /** Tags separated by commas; a measurement must carry every one. */
  tags: string;
  text: string;
}

export const EMPTY_FILTER: LogbookFilter = { asset: '', since: '', until: '', tags: '', text: '' };

export type FilterCheck = { ok: true; query: MeasurementQuery } | { ok: false; field: keyof LogbookFilter; message: string };

const DATE = /^\d{4}-\d{2}-\d{2}$/;

/** Split "before cleaning, weekly" into ["before cleaning", "weekly"]; empty pieces are dropped. */
export function splitTags(text: string): string[] {
  return [...new Set(text.split(',').map((t) => t.trim()).filter((t) => t.length > 0))];
}

/**
 * The query for the form, or the first problem in plain words. Dates go through as "YYYY-MM-DD": the
 * logbook reads a date alone as the whole of that day, so "until" includes its day.
 */
export function buildQuery(f: LogbookFilter): FilterCheck {
  const query: MeasurementQuery = {};
  if (f.asset.trim()) query.asset = f.asset.trim();
  for (const field of ['since', 'until'] as const) {
    const v = f[field].trim();
    if (!v) continue;
    if (!DATE.test(v) || !Number.isFinite(Date.parse(v))) {
      return { ok: false, field, message: `The "${field === 'since' ? 'from' : 'to'}" date "${v}" is not a date; use the form YYYY-MM-DD, e.g. 2025-03-04.` };
    }
    query[field] = v;
  }
  if (query.since && query.until && query.since > query.until) {
    return { ok: false, field: 'until', message: `The "to" date ${query.until} is before the "from" date ${query.since}; swap them or clear one.` };
  }
  const tags = splitTags(f.tags);
  if (tags.length) query.tags = tags;
  if (f.text.trim()) query.text = f.text.trim();
  return { ok: true, query };
}

export type RowFlagKind = 'rms-limit' | 'strehl-floor' | 'trend-signal';

export interface RowFlag {
  kind: RowFlagKind;
  /** A few words for the table cell. */
  short: string;
  /** The full sentence for the tooltip and screen readers. */
  text: string;
}

/**
 * Flags of one listed measurement: its latest RMS above the asset's limit, its Strehl ratio below the
 * asset's floor, and any trend signal that names it (when the asset's trend is loaded).
 */
export function measurementFlags(m: MeasurementSummary, asset: Asset | undefined, trend?: Trend | null): RowFlag[] {
  const flags: RowFlag[] = [];
  const r = m.latest;
  if (r && asset) {
    if (asset.limitRmsWaves !== null && r.rmsWaves > asset.limitRmsWaves) {
      flags.push({
        kind: 'rms-limit',
        short: 'RMS over limit',
        text: `RMS wavefront error ${formatValue(r.rmsWaves)} waves is above the limit ${formatValue(asset.limitRmsWaves)} waves set for ${asset.name}.`,
      });
    }
    if (asset.limitStrehl !== null && r.strehl < asset.limitStrehl) {
      flags.push({
        kind: 'strehl-floor',
        short: 'Strehl under floor',
        text: `Strehl ratio ${formatValue(r.strehl)} is below the floor ${formatValue(asset.limitStrehl)} set for ${asset.name}.`,
      });
    }
  }
  if (trend && trend.assetName === m.assetName) {
    const signals = trend.signals.filter((s) => s.rule !== 'user-limit' && s.measurementIds.includes(m.id));
    if (signals.length) {
      flags.push({ kind: 'trend-signal', short: signals.length === 1 ? 'trend signal' : `trend signals (${signals.length})`, text: signals.map((s) => s.message).join(' ') });
    }
  }
  return flags;
}

/**
 * "0.0312 ± 0.0008": the uncertainty with two significant digits and the value to the same decimal
 * place (JCGM 100:2008 "GUM" §7.2.6); "0.03120 ± ?" when the uncertainty is missing.
 */
export function formatPm(value: number | null | undefined, sigma: number | null | undefined): string {
  if (value === null || value === undefined || Number.isNaN(value)) return '—';
  return fmtPm(value, sigma);
}

/** A signed difference ± σ: "+0.0120 ± 0.0034", "-0.0400 ± 0.0050" (the same minus as the other columns). */
export function formatSignedPm(delta: number, sigma: number | null | undefined): string {
  const s = formatPm(delta, sigma);
  return delta > 0 ? `+${s}` : s;
}

/** A byte count for people: "812 B", "14.2 kB", "3.1 MB" (decimal units, SI). */
export function formatBytes(n: number): string {
  if (!Number.isFinite(n) || n < 0) return '—';
  if (n < 1000) return `${n} B`;
  if (n < 1e6) return `${(n / 1e3).toFixed(1)} kB`;
  return `${(n / 1e6).toFixed(1)} MB`;
}
