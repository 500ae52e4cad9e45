/**
 * Printable, self-contained HTML reports (no script, no external resources; images are inline data
 * URLs or SVG): a measurement, a comparison of two, the trend of an asset. Every report carries the
 * laser-safety reminder (core/safety.ts). Print to PDF from the desktop app or any browser.
 */
import type { FitResult } from '../fit/result.ts';
import { SAFETY_POINTS, SAFETY_TITLE } from '../safety.ts';
import type { Comparison } from './compare.ts';
import { formatSigned, formatValue, formatWhen, formatZ } from './format.ts';
import { differenceGrid, divergingColour, gridToPng, pngDataUrl, wavefrontGrid } from './images.ts';
import type { WavefrontGrid } from './images.ts';
import { escapeXml, trendChartSvg } from './svg.ts';
import { ruleCode } from './trend.ts';
import type { Trend } from './trend.ts';
import type { Asset, MeasurementRecord } from './types.ts';

const esc = escapeXml;

export interface ReportContext {
  /** e.g. "shadowfront 0.1.0" */
  software: string;
  generatedAt: string;
}

/** A camera frame preview to show, already encoded (see framePreviewPng). */
export interface FramePreview {
  name: string;
  dataUrl: string | null;
}

const STYLE = `
body { font-family: system-ui, sans-serif; margin: 2em; color: #111; max-width: 60em; }
h1 { font-size: 1.5em; margin-bottom: 0.2em; } h2 { font-size: 1.2em; margin-top: 1.6em; border-bottom: 1px solid #ccc; }
table { border-collapse: collapse; margin: 0.5em 0; } th, td { border: 1px solid #ccc; padding: 0.2em 0.6em; text-align: left; vertical-align: top; }
td.num { text-align: right; font-variant-numeric: tabular-nums; white-space: nowrap; }
.meta { color: #555; } .note { color: #444; font-style: italic; }
.safety { border: 2px solid #b03a2e; background: #fdf2f0; padding: 0.6em 1em; margin: 1em 0; }
.safety h2 { border: none; margin-top: 0.2em; color: #b03a2e; }
.v-improved { color: #1e7b34; font-weight: bold; } .v-worse { color: #b03a2e; font-weight: bold; } .v-changed { color: #9a6700; font-weight: bold; }
.flag { color: #b03a2e; font-weight: bold; }
.maps { display: flex; gap: 1.5em; flex-wrap: wrap; } .maps figure { margin: 0; text-align: center; }
.maps img { width: 192px; height: 192px; image-rendering: pixelated; border: 1px solid #ddd; }
.frames img { max-width: 256px; image-rendering: pixelated; border: 1px solid #ddd; }
pre { background: #f6f6f6; padding: 0.5em; overflow-x: auto; font-size: 0.85em; }
@media print { body { margin: 0.5cm; } .safety { break-inside: avoid; } figure, svg, table { break-inside: avoid; } }
`;

function page(title: string, ctx: ReportContext, body: string): string {
  return `<!DOCTYPE html>
<html lang="en">
<head>
<meta charset="utf-8">
<title>${esc(title)}</title>
<link rel="icon" href="data:,">
<style>${STYLE}</style>
</head>
<body>
<h1>${esc(title)}</h1>
<p class="meta">Made by ${esc(ctx.software)} on ${esc(formatWhen(ctx.generatedAt))}. Values in waves are at the measurement wavelength; uncertainties are 1σ.</p>
${safetyBlock()}
${body}
<p class="meta">End of report.</p>
</body>
</html>
`;
}

/** The laser-safety reminder of core/safety.ts as an HTML block. */
export function safetyBlock(): string {
  return `<div class="safety"><h2>${esc(SAFETY_TITLE)}</h2><ul>${SAFETY_POINTS.map((p) => `<li>${esc(p)}</li>`).join('')}</ul></div>`;
}

function table(header: string[], rows: string[][], numeric: boolean[] = []): string {
  return `<table><thead><tr>${header.map((h) => `<th>${esc(h)}</th>`).join('')}</tr></thead><tbody>${rows
    .map((r) => `<tr>${r.map((c, i) => `<td${numeric[i] ? ' class="num"' : ''}>${c}</td>`).join('')}</tr>`)
    .join('')}</tbody></table>`;
}

/** Flatten a setup JSON object into "path: value" rows. */
function flatten(v: unknown, path = '', out: [string, string][] = []): [string, string][] {
  if (Array.isArray(v)) {
    if (v.every((x) => typeof x !== 'object' || x === null)) out.push([path, v.map((x) => String(x)).join(', ')]);
    else v.forEach((x, i) => flatten(x, `${path}[${i}]`, out));
  } else if (typeof v === 'object' && v !== null) {
    for (const [k, x] of Object.entries(v)) flatten(x, path ? `${path}.${k}` : k, out);
  } else out.push([path, String(v)]);
  return out;
}

function setupSection(setup: unknown): string {
  if (setup === null || setup === undefined) return '<h2>Setup</h2><p class="note">No setup was stored with this measurement.</p>';
  const rows = flatten(setup).filter(([k]) => k !== 'format');
  return `<h2>Setup</h2>${table(['field', 'value'], rows.map(([k, v]) => [esc(k), esc(v)]))}`;
}

function pm(v: number, s: number | null): string {
  return `${formatValue(v)} ± ${formatValue(s)}`;
}

function resultSection(r: FitResult, heading: string): string {
  const summary: [string, string][] = [
    ['RMS wavefront error (no piston, tilt)', `${pm(r.rmsWaves, r.sigmaRmsWaves)} waves`],
    ['Strehl ratio (Maréchal)', pm(r.strehl, r.sigmaStrehl)],
    ['Peak-to-valley', r.pvWaves !== undefined ? `${formatValue(r.pvWaves)} waves` : '—'],
    ['Wavelength', `${(r.wavelength_m * 1e9).toFixed(2)} nm`],
    ['Zernike radius', `${(r.zernike.radius_m * 1e3).toFixed(3)} mm (${esc(r.zernike.basis ?? '')})`],
    ['Residual curvature radius', r.residualCurvatureRadius_m === null || r.residualCurvatureRadius_m === undefined ? '—' : `${r.residualCurvatureRadius_m.toPrecision(4)} m`],
    ['χ²/dof', r.chi2PerDof !== undefined ? `${r.chi2PerDof.toPrecision(4)} (${r.dof} dof)` : '—'],
    ['Solver', `${esc(r.termination ?? '')}, ${r.iterations ?? '?'} iterations, ${r.elapsedMs ?? '?'} ms`],
    ['Software', esc(r.software)],
  ];
  const terms = r.zernike.terms.map((t) => [
    String(t.j),
    esc(t.name ?? ''),
    formatValue(t.waves),
    formatValue(t.sigmaWaves),
    t.nm !== undefined ? t.nm.toFixed(2) : '—',
    t.sigmaNm !== undefined && t.sigmaNm !== null ? t.sigmaNm.toFixed(2) : '—',
  ]);
  const untrusted = r.trusted === false ? '<p class="flag">This fit is marked untrusted: it seems to have stopped in a wrong minimum. Do not rely on its values; re-analyse the measurement.</p>' : '';
  const warnings = r.warnings?.length ? `<p><b>Warnings of the fit:</b></p><ul>${r.warnings.map((w) => `<li>${esc(w)}</li>`).join('')}</ul>` : '';
  return `<h2>${esc(heading)}</h2>
${untrusted}
${table(['quantity', 'value'], summary.map(([k, v]) => [esc(k), v]))}
${table(['j (ANSI)', 'term', 'waves', '1σ waves', 'nm', '1σ nm'], terms, [true, false, true, true, true, true])}
${warnings}
<details><summary>Solver settings</summary><pre>${esc(JSON.stringify(r.settings ?? {}, null, 2))}</pre></details>`;
}

let colourBarCount = 0;

function colourBar(scale: number): string {
  const stops = [-1, -0.5, 0, 0.5, 1].map((t, i) => {
    const [r, g, b] = divergingColour(t);
    return `<stop offset="${i * 25}%" stop-color="rgb(${r},${g},${b})"/>`;
  });
  const id = `sf-scale-${++colourBarCount}`;
  return `<svg xmlns="http://www.w3.org/2000/svg" width="192" height="30" font-size="10" font-family="sans-serif"><defs><linearGradient id="${id}">${stops.join('')}</linearGradient></defs><rect x="0" y="0" width="192" height="10" fill="url(#${id})" stroke="#999"/><text x="0" y="24">${esc(formatSigned(-scale))}</text><text x="96" y="24" text-anchor="middle">0</text><text x="192" y="24" text-anchor="end">${esc(formatSigned(scale))} waves</text></svg>`;
}

function mapFigure(grid: WavefrontGrid, scale: number, caption: string): string {
  return `<figure><img alt="${esc(caption)}" src="${pngDataUrl(gridToPng(grid, scale))}"><figcaption>${esc(caption)}<br>${colourBar(scale)}</figcaption></figure>`;
}

function framesBlock(previews: readonly FramePreview[], label: string): string {
  if (!previews.length) return `<p class="note">${esc(label)}: no raw frames stored.</p>`;
  return `<div class="maps frames">${previews
    .map((p) => (p.dataUrl ? `<figure><img alt="${esc(p.name)}" src="${p.dataUrl}"><figcaption>${esc(label)}: ${esc(p.name)}</figcaption></figure>` : `<p class="note">${esc(label)}: ${esc(p.name)} (no preview for this image type)</p>`))
    .join('')}</div>`;
}

function measurementMeta(m: MeasurementRecord, asset: Asset | null): string {
  const rows: [string, string][] = [
    ['Measurement', `#${m.id}`],
    ['Asset', esc(m.assetName) + (asset?.location ? ` — ${esc(asset.location)}` : '')],
    ['Taken', esc(formatWhen(m.takenAt))],
    ['By', esc(m.operator || '—')],
    ['Tags', esc(m.tags.join(', ') || '—')],
    ['Notes', esc(m.notes || '—')],
    ['Results stored', String(m.results.length)],
  ];
  return table(['', ''], rows.map(([k, v]) => [esc(k), v]));
}

export interface MeasurementReportInput {
  record: MeasurementRecord;
  asset: Asset | null;
  frames: readonly FramePreview[];
}

export function measurementReportHtml(input: MeasurementReportInput, ctx: ReportContext): string {
  const m = input.record;
  const latest = m.results[m.results.length - 1];
  let body = measurementMeta(m, input.asset);
  body += setupSection(m.setup);
  if (latest) {
    body += resultSection(latest.result, `Result (#${latest.id}, added ${formatWhen(latest.addedAt)})`);
    const grid = wavefrontGrid(latest.result);
    const scale = Math.max(Math.abs(grid.min), Math.abs(grid.max));
    body += `<h2>Wavefront map</h2><p class="note">Fitted wavefront without piston and tilt, over the Zernike radius, looking downstream (x right, y up).</p><div class="maps">${mapFigure(grid, scale, `#${m.id}`)}</div>`;
    if (m.results.length > 1) {
      body += `<h2>Analysis history</h2>${table(
        ['result', 'added', 'software', 'RMS (waves)', 'Strehl', 'note'],
        m.results.map((r) => [`#${r.id}`, esc(formatWhen(r.addedAt)), esc(r.result.software), pm(r.result.rmsWaves, r.result.sigmaRmsWaves), pm(r.result.strehl, r.result.sigmaStrehl), esc(r.note)]),
        [false, false, false, true, true, false],
      )}`;
    }
  } else body += '<h2>Result</h2><p class="note">This measurement has no result yet.</p>';
  body += `<h2>Camera frames</h2>${framesBlock(input.frames, `#${m.id}`)}`;
  return page(`Beam measurement #${m.id} — ${m.assetName}`, ctx, body);
}

export interface ComparisonReportInput {
  comparison: Comparison;
  a: MeasurementRecord;
  b: MeasurementRecord;
  resultA: FitResult;
  resultB: FitResult;
  framesA: readonly FramePreview[];
  framesB: readonly FramePreview[];
}

export function comparisonReportHtml(input: ComparisonReportInput, ctx: ReportContext): string {
  const c = input.comparison;
  const label = (m: MeasurementRecord) => `#${m.id} ${formatWhen(m.takenAt)}${m.tags.length ? ` [${m.tags.join(', ')}]` : ''}`;
  let body = `<p>A = ${esc(label(input.a))}; B = ${esc(label(input.b))}. Δ = B − A; σ = √(σA² + σB²) (independent measurements, JCGM 100:2008 §5.1.2); z = Δ/σ; |z| &lt; ${c.threshold} is “no significant change”. Smaller is better for RMS and for the size of a coefficient, larger for Strehl.</p>`;
  body += table(
    ['quantity', 'A', 'B', 'Δ = B − A', 'σ', 'z', 'verdict'],
    c.rows.map((r) => [
      esc(r.label),
      pm(r.a, r.sigmaA),
      pm(r.b, r.sigmaB),
      formatSigned(r.delta),
      formatValue(r.sigma),
      formatZ(r.z),
      `<span class="v-${r.verdict.split(' ')[0]}">${esc(r.verdict)}</span>`,
    ]),
    [false, true, true, true, true, true, false],
  );
  if (c.notes.length) body += `<ul>${c.notes.map((n) => `<li class="note">${esc(n)}</li>`).join('')}</ul>`;
  const ga = wavefrontGrid(input.resultA);
  const gb = wavefrontGrid(input.resultB);
  const gd = differenceGrid(ga, gb);
  const scale = Math.max(Math.abs(ga.min), Math.abs(ga.max), Math.abs(gb.min), Math.abs(gb.max));
  const dscale = Math.max(Math.abs(gd.min), Math.abs(gd.max));
  body += `<h2>Wavefront maps</h2><p class="note">Without piston and tilt. A and B share one colour scale; the difference has its own.</p><div class="maps">${mapFigure(ga, scale, `A: #${input.a.id}`)}${mapFigure(gb, scale, `B: #${input.b.id}`)}${mapFigure(gd, dscale, 'B − A')}</div>`;
  body += `<h2>Camera frames side by side</h2><div class="maps">${framesBlock(input.framesA.slice(0, 1), 'A')}${framesBlock(input.framesB.slice(0, 1), 'B')}</div>`;
  body += `<h2>Measurement A</h2>${measurementMeta(input.a, null)}${resultSection(input.resultA, 'Result A')}`;
  body += `<h2>Measurement B</h2>${measurementMeta(input.b, null)}${resultSection(input.resultB, 'Result B')}`;
  body += setupSection(input.a.setup).replace('<h2>Setup</h2>', '<h2>Setup of A</h2>');
  if (JSON.stringify(input.a.setup) !== JSON.stringify(input.b.setup)) body += setupSection(input.b.setup).replace('<h2>Setup</h2>', '<h2>Setup of B (differs from A)</h2>');
  else body += '<p class="note">B used the same setup as A.</p>';
  return page(`Beam comparison #${input.a.id} → #${input.b.id} — ${input.a.assetName}`, ctx, body);
}

export interface TrendReportInput {
  trend: Trend;
  asset: Asset | null;
  /** The distinct setups of the measurements, each with the measurements that used it. */
  setups?: readonly { setup: unknown; measurementIds: readonly number[] }[];
}

export function trendReportHtml(input: TrendReportInput, ctx: ReportContext): string {
  const t = input.trend;
  const a = input.asset;
  let body = table(
    ['', ''],
    [
      ['Asset', esc(t.assetName)],
      ['Wavelength', a?.wavelengthM ? `${(a.wavelengthM * 1e9).toFixed(2)} nm` : '—'],
      ['Location', esc(a?.location || '—')],
      ['Notes', esc(a?.notes || '—')],
      ['Measurements', String(t.series[0]?.points.length ?? 0)],
    ],
  );
  body += `<p>Control limits: Shewhart individuals chart, centre x̄ and x̄ ± 3·MR̄/1.128 from the baseline (NIST/SEMATECH e-Handbook of Statistical Methods §6.3.2.2). Run rules: Nelson (1984) tests 1, 2, 3, 5, 6 (N1–N6), and MR = a jump above the moving-range limit 3.267·MR̄. L = user limit.</p>`;
  if (t.notes.length) body += `<ul>${t.notes.map((n) => `<li class="note">${esc(n)}</li>`).join('')}</ul>`;
  body += '<h2>Flags</h2>';
  body += t.signals.length
    ? `<ul>${t.signals.map((s) => `<li><span class="flag">${esc(ruleCode(s.rule))}</span> ${esc(s.message)} — measurement${s.measurementIds.length > 1 ? 's' : ''} ${s.measurementIds.map((id) => `#${id}`).join(', ')}</li>`).join('')}</ul>`
    : '<p>No point breaks a limit or a run rule.</p>';
  body += '<h2>Plots</h2>';
  for (const s of t.series) body += `<div>${trendChartSvg(s, t.baselineCount)}</div>`;
  const rms = t.series.find((s) => s.key === 'rms');
  const strehl = t.series.find((s) => s.key === 'strehl');
  if (rms && strehl) {
    const byId = new Map(t.series.map((s) => [s.key, new Map(s.points.map((q) => [q.measurementId, q]))]));
    body += `<h2>Series</h2>${table(
      ['#', 'taken', 'tags', 'RMS (waves)', 'Strehl', 'flags'],
      rms.points.map((p, i) => {
        const flags = t.series.flatMap((s) => {
          const q = byId.get(s.key)!.get(p.measurementId);
          return q && q.flags.length ? [`${s.key}: ${q.flags.map(ruleCode).join(' ')}`] : [];
        });
        return [
          `#${p.measurementId}`,
          esc(formatWhen(p.takenAt)),
          esc(p.tags.join(', ')),
          pm(p.value, p.sigma),
          pm(strehl.points[i].value, strehl.points[i].sigma),
          flags.length ? `<span class="flag">${esc(flags.join('; '))}</span>` : '',
        ];
      }),
      [false, false, false, true, true, false],
    )}`;
  }
  for (const [k, s] of (input.setups ?? []).entries()) {
    const ids = s.measurementIds.map((id) => `#${id}`).join(', ');
    body += setupSection(s.setup).replace('<h2>Setup</h2>', `<h2>Setup${(input.setups?.length ?? 0) > 1 ? ` ${k + 1}` : ''}</h2><p class="note">Used by ${esc(ids)}.</p>`);
  }
  return page(`Beam health trend — ${t.assetName}`, ctx, body);
}
