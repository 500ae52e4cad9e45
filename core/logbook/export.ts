/**
 * Export of a selection of the logbook: CSV (one row per measurement and result) for spreadsheets, and
 * JSON (everything, results verbatim) for programs.
 */
import type { Asset, MeasurementRecord, StoredResult } from './types.ts';

export const EXPORT_FORMAT = 'shadowfront-logbook-export/1';

/** One CSV field per RFC 4180 §2: quoted when it holds a comma, a double quote or a line break; quotes doubled. */
export function csvField(v: unknown): string {
  if (v === null || v === undefined) return '';
  const s = typeof v === 'number' ? (Number.isFinite(v) ? String(v) : '') : String(v);
  return /[",\r\n]/.test(s) ? `"${s.replace(/"/g, '""')}"` : s;
}

/** Records separated by CRLF (RFC 4180 §2.1), with a header line. */
export function csvText(header: readonly string[], rows: readonly (readonly unknown[])[]): string {
  return [header, ...rows].map((r) => r.map(csvField).join(',')).join('\r\n') + '\r\n';
}

export interface CsvOptions {
  /** One row per result (re-analyses included) instead of one per measurement with its latest result. */
  allResults?: boolean;
}

/** The CSV of a selection of measurements. Coefficient columns cover every term fitted in the selection. */
export function measurementsCsv(records: readonly MeasurementRecord[], options: CsvOptions = {}): string {
  const pairs: { m: MeasurementRecord; r: StoredResult | null }[] = [];
  for (const m of records) {
    if (!m.results.length) pairs.push({ m, r: null });
    else if (options.allResults) for (const r of m.results) pairs.push({ m, r });
    else pairs.push({ m, r: m.results[m.results.length - 1] });
  }
  const js = [...new Set(pairs.flatMap((p) => (p.r ? p.r.result.zernike.terms.map((t) => t.j) : [])))].sort((a, b) => a - b);
  const header = [
    'measurement_id',
    'asset',
    'taken_at',
    'operator',
    'tags',
    'notes',
    'result_id',
    'result_added_at',
    'software',
    'wavelength_m',
    'zernike_radius_m',
    'rms_waves',
    'sigma_rms_waves',
    'strehl',
    'sigma_strehl',
    'pv_waves',
    'chi2_per_dof',
    'termination',
    ...js.flatMap((j) => [`z${j}_waves`, `z${j}_sigma_waves`]),
  ];
  const rows = pairs.map(({ m, r }) => {
    const res = r?.result;
    const terms = new Map((res?.zernike.terms ?? []).map((t) => [t.j, t]));
    return [
      m.id,
      m.assetName,
      m.takenAt,
      m.operator,
      m.tags.join(';'),
      m.notes,
      r?.id ?? null,
      r?.addedAt ?? null,
      res?.software ?? null,
      res?.wavelength_m ?? null,
      res?.zernike.radius_m ?? null,
      res?.rmsWaves ?? null,
      res?.sigmaRmsWaves ?? null,
      res?.strehl ?? null,
      res?.sigmaStrehl ?? null,
      res?.pvWaves ?? null,
      res?.chi2PerDof ?? null,
      res?.termination ?? null,
      ...js.flatMap((j) => [terms.get(j)?.waves ?? null, terms.get(j)?.sigmaWaves ?? null]),
    ];
  });
  return csvText(header, rows);
}

/** The JSON export: assets and measurements in full (setup, frame references, every result verbatim). */
export function measurementsJson(
  records: readonly MeasurementRecord[],
  assets: readonly Asset[],
  meta: { exportedAt: string; software: string; selection: Record<string, unknown> },
): string {
  const used = new Set(records.map((m) => m.assetId));
  return `${JSON.stringify(
    {
      format: EXPORT_FORMAT,
      exportedAt: meta.exportedAt,
      software: meta.software,
      selection: meta.selection,
      assets: assets.filter((a) => used.has(a.id)),
      measurements: records,
    },
    null,
    2,
  )}\n`;
}
