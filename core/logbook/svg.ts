/** Trend plots as inline SVG (no script, no external resources), for HTML reports. */
import type { TrendSeries } from './trend.ts';

export function escapeXml(s: string): string {
  return s.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;').replace(/"/g, '&quot;').replace(/'/g, '&#39;');
}

function niceNumber(v: number): string {
  if (v === 0) return '0';
  const a = Math.abs(v);
  return a >= 100 || a < 1e-3 ? v.toExponential(2) : v.toPrecision(3);
}

/**
 * One series over time: points with ±1σ error bars, the centre line and 3σ control limits (dashed)
 * from the baseline (shaded), the user limit (orange), flagged points in red. Points are evenly spaced
 * in time order (the order of the control chart), labelled with their dates.
 */
export function trendChartSvg(series: TrendSeries, baselineCount: number, options: { width?: number; height?: number } = {}): string {
  const W = options.width ?? 680;
  const H = options.height ?? 220;
  const left = 70;
  const right = 110;
  const top = 24;
  const bottom = 44;
  const pts = series.points;
  const lines: { y: number; label: string; colour: string; dash: string }[] = [];
  if (series.limits) {
    lines.push({ y: series.limits.center, label: 'centre', colour: '#555', dash: '' });
    if (series.limits.sigma > 0) {
      lines.push({ y: series.limits.ucl, label: 'UCL (3σ)', colour: '#555', dash: '5,4' });
      lines.push({ y: series.limits.lcl, label: 'LCL (3σ)', colour: '#555', dash: '5,4' });
    }
  }
  if (series.userLimit) lines.push({ y: series.userLimit.value, label: series.userLimit.kind === 'max' ? 'limit' : 'floor', colour: '#d95f02', dash: '8,3' });
  let lo = Infinity;
  let hi = -Infinity;
  for (const p of pts) {
    const s = p.sigma ?? 0;
    lo = Math.min(lo, p.value - s);
    hi = Math.max(hi, p.value + s);
  }
  for (const l of lines) {
    lo = Math.min(lo, l.y);
    hi = Math.max(hi, l.y);
  }
  if (!Number.isFinite(lo)) {
    lo = 0;
    hi = 1;
  }
  if (hi - lo < 1e-12) {
    const pad = Math.abs(hi) * 0.1 || 1;
    lo -= pad;
    hi += pad;
  }
  const padY = (hi - lo) * 0.08;
  lo -= padY;
  hi += padY;
  const pw = W - left - right;
  const ph = H - top - bottom;
  const xOf = (i: number) => left + (pts.length <= 1 ? pw / 2 : (i * pw) / (pts.length - 1));
  const yOf = (v: number) => top + ((hi - v) / (hi - lo)) * ph;
  const out: string[] = [];
  const title = `${series.label}${series.unit ? ` (${series.unit})` : ''}`;
  out.push(`<svg xmlns="http://www.w3.org/2000/svg" width="${W}" height="${H}" viewBox="0 0 ${W} ${H}" role="img" aria-label="${escapeXml(title)}" font-family="sans-serif" font-size="11">`);
  out.push(`<text x="${left}" y="15" font-size="13" font-weight="bold">${escapeXml(title)}</text>`);
  out.push(`<rect x="${left}" y="${top}" width="${pw}" height="${ph}" fill="none" stroke="#999"/>`);
  if (baselineCount >= 2 && pts.length > 1) {
    const k = Math.min(baselineCount, pts.length) - 1;
    const x1 = xOf(k) + (k < pts.length - 1 ? (xOf(k + 1) - xOf(k)) / 2 : 0);
    out.push(`<rect x="${left}" y="${top}" width="${(x1 - left).toFixed(1)}" height="${ph}" fill="#eef3f8"/>`);
    out.push(`<text x="${left + 3}" y="${top + ph - 4}" fill="#6a87a5">baseline</text>`);
  }
  for (const t of [lo + padY, (lo + hi) / 2, hi - padY]) {
    out.push(`<text x="${left - 4}" y="${(yOf(t) + 4).toFixed(1)}" text-anchor="end">${escapeXml(niceNumber(t))}</text>`);
  }
  for (const l of lines) {
    const y = yOf(l.y).toFixed(1);
    out.push(`<line x1="${left}" x2="${left + pw}" y1="${y}" y2="${y}" stroke="${l.colour}"${l.dash ? ` stroke-dasharray="${l.dash}"` : ''}/>`);
    out.push(`<text x="${left + pw + 4}" y="${(Number(y) + 4).toFixed(1)}" fill="${l.colour}">${escapeXml(`${l.label} ${niceNumber(l.y)}`)}</text>`);
  }
  if (pts.length > 1) {
    out.push(`<polyline fill="none" stroke="#888" stroke-width="1" points="${pts.map((p, i) => `${xOf(i).toFixed(1)},${yOf(p.value).toFixed(1)}`).join(' ')}"/>`);
  }
  const labelEvery = Math.max(1, Math.ceil(pts.length / 8));
  pts.forEach((p, i) => {
    const x = xOf(i).toFixed(1);
    if (p.sigma !== null && p.sigma > 0) {
      out.push(`<line x1="${x}" x2="${x}" y1="${yOf(p.value + p.sigma).toFixed(1)}" y2="${yOf(p.value - p.sigma).toFixed(1)}" stroke="#333"/>`);
    }
    const flagged = p.flags.length > 0;
    out.push(
      `<circle cx="${x}" cy="${yOf(p.value).toFixed(1)}" r="${flagged ? 4.5 : 3}" fill="${flagged ? '#c0392b' : '#1f4e79'}"><title>${escapeXml(
        `#${p.measurementId} ${p.takenAt} ${p.value}${p.sigma !== null ? ` ± ${p.sigma}` : ''}${p.tags.length ? ` [${p.tags.join(', ')}]` : ''}${flagged ? ` flags: ${p.flags.join(', ')}` : ''}`,
      )}</title></circle>`,
    );
    if (i % labelEvery === 0 || i === pts.length - 1) {
      out.push(`<text x="${x}" y="${top + ph + 14}" text-anchor="middle">${escapeXml(p.takenAt.slice(0, 10))}</text>`);
      out.push(`<text x="${x}" y="${top + ph + 27}" text-anchor="middle" fill="#777">#${p.measurementId}</text>`);
    }
  });
  out.push('</svg>');
  return out.join('\n');
}
