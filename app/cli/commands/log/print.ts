/** Text output of the `shadowfront log` actions. */
import type { Comparison } from '../../../../core/logbook/compare.ts';
import { formatSigned, formatValue, formatWhen, formatZ, textTable } from '../../../../core/logbook/format.ts';
import { ruleCode } from '../../../../core/logbook/trend.ts';
import type { Trend } from '../../../../core/logbook/trend.ts';
import type { Asset, MeasurementRecord, MeasurementSummary } from '../../../../core/logbook/types.ts';

const pm = (v: number, s: number | null) => `${formatValue(v)} ± ${formatValue(s)}`;

export function assetsText(assets: readonly Asset[]): string {
  if (!assets.length) return 'No assets yet. Add one with: shadowfront log asset add <name> --wavelength "632.8 nm"';
  return textTable(
    ['id', 'name', 'wavelength', 'location', 'RMS limit', 'Strehl floor', 'notes'],
    assets.map((a) => [
      String(a.id),
      a.name,
      a.wavelengthM ? `${(a.wavelengthM * 1e9).toFixed(1)} nm` : '—',
      a.location || '—',
      a.limitRmsWaves !== null ? `${formatValue(a.limitRmsWaves)} waves` : '—',
      a.limitStrehl !== null ? String(a.limitStrehl) : '—',
      a.notes,
    ]),
  );
}

export function listText(list: readonly MeasurementSummary[]): string {
  if (!list.length) return 'No measurements match.';
  return textTable(
    ['id', 'taken', 'asset', 'tags', 'RMS (waves)', 'Strehl', 'results', 'by', 'notes'],
    list.map((m) => [
      `#${m.id}`,
      formatWhen(m.takenAt),
      m.assetName,
      m.tags.join(', '),
      m.latest ? pm(m.latest.rmsWaves, m.latest.sigmaRmsWaves) : '(no result)',
      m.latest ? pm(m.latest.strehl, m.latest.sigmaStrehl) : '',
      String(m.resultCount),
      m.operator,
      m.notes.length > 40 ? `${m.notes.slice(0, 39)}…` : m.notes,
    ]),
    [false, false, false, false, true, true, true, false, false],
  );
}

export function showText(m: MeasurementRecord): string {
  const lines = [
    `Measurement #${m.id} of ${m.assetName}`,
    `  taken    ${formatWhen(m.takenAt)}${m.operator ? ` by ${m.operator}` : ''}`,
    `  tags     ${m.tags.join(', ') || '—'}`,
    `  notes    ${m.notes || '—'}`,
    `  setup    ${m.setup ? 'stored' : 'none (cannot be re-analysed)'}`,
    `  frames   ${m.frames.length ? m.frames.map((f) => `${f.role} ${f.name} (${(f.sizeBytes / 1024).toFixed(0)} KiB, sha256 ${f.sha256.slice(0, 12)}…)`).join('; ') : 'none stored'}`,
  ];
  if (!m.results.length) lines.push('', 'No result yet.');
  m.results.forEach((r, i) => {
    const res = r.result;
    const current = i === m.results.length - 1;
    lines.push(
      '',
      `Result #${r.id}${current ? ' (current)' : ' (older)'}: ${res.software}, added ${formatWhen(r.addedAt)} by ${r.loggedBy}${r.note ? ` — ${r.note}` : ''}${res.trusted === false ? '  [UNTRUSTED FIT]' : ''}`,
      `  RMS ${pm(res.rmsWaves, res.sigmaRmsWaves)} waves, Strehl ${pm(res.strehl, res.sigmaStrehl)}, P-V ${formatValue(res.pvWaves)} waves, λ ${(res.wavelength_m * 1e9).toFixed(2)} nm, Zernike radius ${(res.zernike.radius_m * 1e3).toFixed(3)} mm`,
      textTable(
        ['j', 'term', 'waves', '1σ'],
        res.zernike.terms.map((t) => [String(t.j), t.name, formatValue(t.waves), formatValue(t.sigmaWaves)]),
        [true, false, true, true],
      )
        .split('\n')
        .map((l) => `  ${l}`)
        .join('\n'),
    );
    for (const w of res.warnings ?? []) lines.push(`  fit warning: ${w}`);
  });
  return lines.join('\n');
}

export function comparisonText(c: Comparison): string {
  const side = (name: string, s: Comparison['a']) =>
    `${name} = #${s.measurementId} ${s.assetName}, ${formatWhen(s.takenAt)}${s.tags.length ? ` [${s.tags.join(', ')}]` : ''} (result #${s.resultId}, ${s.software})`;
  const table = textTable(
    ['quantity', 'A', 'B', 'Δ = B − A', 'σ', 'z', 'verdict'],
    c.rows.map((r) => [r.label, pm(r.a, r.sigmaA), pm(r.b, r.sigmaB), formatSigned(r.delta), formatValue(r.sigma), formatZ(r.z), r.verdict]),
    [false, true, true, true, true, true, false],
  );
  return [
    side('A', c.a),
    side('B', c.b),
    '',
    table,
    '',
    `Values in waves (Strehl: ratio), ±1σ. σ = √(σA² + σB²) for independent measurements; z = Δ/σ; |z| < ${c.threshold}: no significant change.`,
    'Smaller is better for RMS and for the size of a coefficient; larger is better for Strehl. "changed": the coefficient moved but its size did not.',
    ...c.notes.map((n) => `note: ${n}`),
  ].join('\n');
}

export function trendText(t: Trend): string {
  const rms = t.series.find((s) => s.key === 'rms')!;
  const strehl = t.series.find((s) => s.key === 'strehl')!;
  const coeffs = t.series.filter((s) => s.j !== null);
  if (!rms.points.length) return `No measurements with a result for ${t.assetName}.`;
  const header = ['id', 'taken', 'tags', 'RMS (waves)', 'Strehl', ...coeffs.map((s) => `j=${s.j}`), 'flags'];
  const byId = new Map(t.series.map((s) => [s.key, new Map(s.points.map((q) => [q.measurementId, q]))]));
  const rows = rms.points.map((p, i) => {
    const flags: string[] = [];
    for (const s of t.series) {
      const q = byId.get(s.key)!.get(p.measurementId);
      if (q && q.flags.length) flags.push(`${s.key}:${q.flags.map(ruleCode).join('+')}`);
    }
    return [
      `#${p.measurementId}`,
      formatWhen(p.takenAt),
      p.tags.join(','),
      pm(p.value, p.sigma),
      pm(strehl.points[i].value, strehl.points[i].sigma),
      ...coeffs.map((s) => {
        const q = byId.get(s.key)!.get(p.measurementId);
        return q ? formatValue(q.value) : '—';
      }),
      flags.join(' '),
    ];
  });
  const limitRows = t.series.map((s) => [
    s.label,
    s.limits ? formatValue(s.limits.center) : '—',
    s.limits ? formatValue(s.limits.lcl) : '—',
    s.limits ? formatValue(s.limits.ucl) : '—',
    s.limits ? formatValue(s.limits.sigma) : '—',
    s.userLimit ? `${s.userLimit.kind === 'max' ? '≤' : '≥'} ${formatValue(s.userLimit.value)}` : '',
  ]);
  const out = [
    `Trend of ${t.assetName}: ${rms.points.length} measurement${rms.points.length === 1 ? '' : 's'} (values ± 1σ; coefficients in waves)`,
    '',
    textTable(header, rows, header.map((_, i) => i >= 3 && i < header.length - 1)),
    '',
    'Control limits (Shewhart individuals chart: centre x̄, limits x̄ ± 3·MR̄/1.128, NIST/SEMATECH e-Handbook §6.3.2.2):',
    textTable(['series', 'centre', 'LCL', 'UCL', 'σ̂ = MR̄/d2', 'user limit'], limitRows, [false, true, true, true, true, false]),
    '',
  ];
  if (t.signals.length) {
    out.push(`Flags (${t.signals.length}):`);
    for (const s of t.signals) out.push(`  [${ruleCode(s.rule)}] ${s.message} — ${s.measurementIds.map((id) => `#${id}`).join(', ')}`);
  } else out.push('Flags: none. No point breaks a limit or a run rule.');
  out.push('Codes: L user limit; N1 beyond 3σ; N2 nine on one side; N3 six rising or falling (drift); N5 two of three beyond 2σ; N6 four of five beyond 1σ (Nelson 1984); MR jump above 3.267·MR̄.');
  for (const n of t.notes) out.push(`note: ${n}`);
  return out.join('\n');
}
