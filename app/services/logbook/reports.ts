/** HTML reports of the logbook (measurement, comparison, trend), with previews of the stored frames. */
import { framePreviewPng, pngDataUrl } from '../../../core/logbook/images.ts';
import { comparisonReportHtml, measurementReportHtml, trendReportHtml } from '../../../core/logbook/report.ts';
import type { FramePreview, ReportContext } from '../../../core/logbook/report.ts';
import type { TrendOptions } from '../../../core/logbook/trend.ts';
import type { MeasurementRecord } from '../../../core/logbook/types.ts';
import type { Logbook } from './logbook.ts';
import { softwareVersion } from './logbook.ts';

function context(): ReportContext {
  return { software: softwareVersion(), generatedAt: new Date().toISOString() };
}

/** Previews of a measurement's camera frames (darks left out); a missing or unreadable frame gets no picture. */
export function framePreviews(lb: Logbook, m: MeasurementRecord, max = 4): FramePreview[] {
  return m.frames
    .filter((f) => f.role === 'frame')
    .slice(0, max)
    .map((f) => {
      let png: Uint8Array | null = null;
      try {
        png = framePreviewPng(lb.readFrame(f.sha256), f.name);
      } catch {
        png = null;
      }
      return { name: f.name, dataUrl: png ? pngDataUrl(png) : null };
    });
}

export function measurementReport(lb: Logbook, id: number): string {
  const record = lb.requireMeasurement(id);
  return measurementReportHtml({ record, asset: lb.getAsset(record.assetId) ?? null, frames: framePreviews(lb, record) }, context());
}

export function comparisonReport(lb: Logbook, a: number, b: number, options: { resultA?: number; resultB?: number } = {}): string {
  const comparison = lb.compareMeasurements(a, b, options);
  const ra = lb.requireMeasurement(a);
  const rb = lb.requireMeasurement(b);
  const resA = ra.results.find((r) => r.id === comparison.a.resultId)!.result;
  const resB = rb.results.find((r) => r.id === comparison.b.resultId)!.result;
  return comparisonReportHtml({ comparison, a: ra, b: rb, resultA: resA, resultB: resB, framesA: framePreviews(lb, ra, 1), framesB: framePreviews(lb, rb, 1) }, context());
}

export function trendReport(lb: Logbook, asset: string | number, options: TrendOptions & { since?: string; until?: string; tags?: string[] } = {}): string {
  const trend = lb.trend(asset, options);
  const setups = lb.setupsUsed({ asset, since: options.since, until: options.until, tags: options.tags });
  return trendReportHtml({ trend, asset: lb.getAsset(asset) ?? null, setups }, context());
}
