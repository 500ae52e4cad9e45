/**
 * The logbook: every asset's measurements, searchable by date range, tags and free text; the details
 * of one measurement; the trend of an asset (one chart per quantity, with limits and flags); export of
 * the listed measurements as CSV and of a report (HTML in the browser, PDF in the desktop app).
 * All the work is done by the services (api.logbook.*); this screen only asks and shows.
 */
import { useCallback, useEffect, useId, useMemo, useRef, useState } from 'react';
import type { FormEvent, JSX } from 'react';
import type { ApiProblem, ExportOutcome, LogbookInfo, MeasurementQuery, ShadowfrontApi } from '../../../shared/contract.ts';
import type { Asset, MeasurementRecord, MeasurementSummary } from '../../../../core/logbook/types.ts';
import type { Trend } from '../../../../core/logbook/trend.ts';
import { formatWhen } from '../../../../core/logbook/format.ts';
import { buildQuery, EMPTY_FILTER, formatBytes, formatPm, measurementFlags } from '../lib/logbookView.ts';
import type { LogbookFilter } from '../lib/logbookView.ts';
import { trendCharts } from '../lib/trendSeries.ts';
import type { TrendChartData } from '../lib/trendSeries.ts';
import { offerDownload } from '../lib/logbookDownload.ts';
import type { OfferedFile } from '../lib/logbookDownload.ts';
import { fmtNum } from '../lib/format.ts';
import { TrendChart } from '../charts/TrendChart.tsx';
import './logbook.css';

type ReportChoice = 'trend' | 'selected' | 'listed';

export function LogbookScreen(props: { api: ShadowfrontApi; onError: (p: ApiProblem) => void }): JSX.Element {
  const { api, onError } = props;
  const [info, setInfo] = useState<LogbookInfo | null>(null);
  const [assets, setAssets] = useState<Asset[]>([]);
  const [form, setForm] = useState<LogbookFilter>(EMPTY_FILTER);
  const [badField, setBadField] = useState<keyof LogbookFilter | null>(null);
  const [query, setQuery] = useState<MeasurementQuery>({});
  const [rows, setRows] = useState<MeasurementSummary[] | null>(null);
  const [loading, setLoading] = useState(false);
  const [selected, setSelected] = useState<number | null>(null);
  const [detail, setDetail] = useState<MeasurementRecord | null>(null);
  const [trendAsset, setTrendAsset] = useState('');
  const [trend, setTrend] = useState<Trend | null>(null);
  const [trendLoading, setTrendLoading] = useState(false);
  const [reportChoice, setReportChoice] = useState<ReportChoice>('trend');
  const [exporting, setExporting] = useState<'csv' | 'report' | null>(null);
  const [offered, setOffered] = useState<OfferedFile | null>(null);
  const listSeq = useRef(0);
  const trendSeq = useRef(0);
  const detailSeq = useRef(0);

  // The logbook's description and assets, once.
  useEffect(() => {
    let live = true;
    void (async () => {
      const [i, a] = await Promise.all([api.logbook.info(), api.logbook.assets()]);
      if (!live) return;
      if (i.ok) setInfo(i.value);
      else onError(i.problem);
      if (a.ok) setAssets(a.value);
      else onError(a.problem);
    })();
    return () => {
      live = false;
    };
  }, [api, onError]);

  // The list for the current query.
  useEffect(() => {
    const seq = ++listSeq.current;
    setLoading(true);
    void api.logbook.measurements(query).then((r) => {
      if (seq !== listSeq.current) return;
      setLoading(false);
      if (r.ok) setRows(r.value);
      else {
        setRows([]);
        onError(r.problem);
      }
    });
  }, [api, onError, query]);

  // The asset whose trend is shown: the searched asset, else the one measured last, else the first.
  useEffect(() => {
    if (query.asset) {
      setTrendAsset(query.asset);
      return;
    }
    if (trendAsset) return;
    const latest = rows && rows.length ? [...rows].sort((x, y) => (x.takenAt < y.takenAt ? 1 : -1))[0].assetName : '';
    const name = latest || assets[0]?.name || '';
    if (name) setTrendAsset(name);
  }, [query.asset, rows, assets, trendAsset]);

  useEffect(() => {
    if (!trendAsset) {
      setTrend(null);
      return;
    }
    const seq = ++trendSeq.current;
    setTrendLoading(true);
    void api.logbook.trend({ asset: trendAsset, since: query.since, until: query.until, tags: query.tags }).then((r) => {
      if (seq !== trendSeq.current) return;
      setTrendLoading(false);
      if (r.ok) setTrend(r.value);
      else {
        setTrend(null);
        onError(r.problem);
      }
    });
  }, [api, onError, trendAsset, query.since, query.until, query.tags]);

  useEffect(() => {
    if (selected === null) {
      setDetail(null);
      return;
    }
    const seq = ++detailSeq.current;
    void api.logbook.measurement({ id: selected }).then((r) => {
      if (seq !== detailSeq.current) return;
      if (r.ok) setDetail(r.value);
      else {
        setDetail(null);
        onError(r.problem);
      }
    });
  }, [api, onError, selected]);

  // Revoke the previous download link when it is replaced or the screen closes.
  useEffect(() => () => {
    if (offered) URL.revokeObjectURL(offered.url);
  }, [offered]);

  const search = (e?: FormEvent) => {
    e?.preventDefault();
    const check = buildQuery(form);
    if (!check.ok) {
      setBadField(check.field);
      onError({ kind: 'invalid-request', message: check.message, field: check.field });
      return;
    }
    setBadField(null);
    setQuery(check.query);
  };

  const clear = () => {
    setForm(EMPTY_FILTER);
    setBadField(null);
    setQuery({});
  };

  const assetByName = useMemo(() => new Map(assets.map((a) => [a.name, a])), [assets]);
  const charts: TrendChartData[] = useMemo(() => {
    if (!trend) return [];
    try {
      return trendCharts(trend);
    } catch (err) {
      onError({ kind: 'logbook', message: `The trend of ${trend.assetName} cannot be drawn: ${(err as Error).message}.` });
      return [];
    }
  }, [trend, onError]);

  const runExport = useCallback(
    async (what: 'csv' | 'report') => {
      setExporting(what);
      let reply;
      if (what === 'csv') reply = await api.logbook.exportCsv(query);
      else if (reportChoice === 'trend') reply = await api.logbook.exportReport({ ...query, asset: trendAsset || query.asset, kind: 'trend' });
      else if (reportChoice === 'selected') reply = await api.logbook.exportReport({ ...query, kind: 'measurement', ids: selected !== null ? [selected] : [] });
      else reply = await api.logbook.exportReport({ ...query, kind: 'measurement', ids: (rows ?? []).map((r) => r.id) });
      setExporting(null);
      if (!reply.ok) {
        onError(reply.problem);
        return;
      }
      const out: ExportOutcome = reply.value;
      try {
        setOffered(offerDownload(out));
      } catch (err) {
        onError({ kind: 'internal', message: `The file "${out.name}" could not be offered for download: ${(err as Error).message}.` });
      }
    },
    [api, onError, query, reportChoice, trendAsset, selected, rows],
  );

  const ids = {
    asset: useId(),
    since: useId(),
    until: useId(),
    tags: useId(),
    text: useId(),
    trendAsset: useId(),
    report: useId(),
  };
  const set = (k: keyof LogbookFilter) => (v: string) => setForm((f) => ({ ...f, [k]: v }));
  const assetNames = new Set((rows ?? []).map((r) => r.assetName));
  const oneAsset = assetNames.size === 1 ? [...assetNames][0] : null;
  const canReport = reportChoice === 'trend' ? !!trendAsset : reportChoice === 'selected' ? selected !== null : !!rows?.length;

  return (
    <section className="lb-screen" data-testid="logbook-screen" aria-labelledby="lb-heading">
      <header className="lb-head">
        <h2 id="lb-heading">Logbook</h2>
        {info ? (
          <p className="muted lb-info">
            {info.measurements} measurement{info.measurements === 1 ? '' : 's'} of {info.assets} asset{info.assets === 1 ? '' : 's'}
            {info.demo ? <span className="lb-synthetic"> · synthetic demo data, made by Shadowfront's own simulator</span> : null}
            {info.writable ? '' : ' · read only'}
          </p>
        ) : null}
      </header>

      <form className="lb-filter" onSubmit={search} aria-label="Search the logbook">
        <div className="lb-field">
          <label htmlFor={ids.asset}>Asset</label>
          <select id={ids.asset} value={form.asset} onChange={(e) => set('asset')(e.target.value)} data-testid="logbook-asset">
            <option value="">All assets</option>
            {assets.map((a) => (
              <option key={a.id} value={a.name}>
                {a.name}
              </option>
            ))}
          </select>
        </div>
        <div className={`lb-field${badField === 'since' ? ' lb-bad' : ''}`}>
          <label htmlFor={ids.since}>From</label>
          <input id={ids.since} type="date" value={form.since} onChange={(e) => set('since')(e.target.value)} aria-invalid={badField === 'since' || undefined} data-testid="logbook-since" />
        </div>
        <div className={`lb-field${badField === 'until' ? ' lb-bad' : ''}`}>
          <label htmlFor={ids.until}>To (inclusive)</label>
          <input id={ids.until} type="date" value={form.until} onChange={(e) => set('until')(e.target.value)} aria-invalid={badField === 'until' || undefined} data-testid="logbook-until" />
        </div>
        <div className="lb-field">
          <label htmlFor={ids.tags}>Tags</label>
          <input id={ids.tags} type="text" value={form.tags} placeholder="e.g. after cleaning" onChange={(e) => set('tags')(e.target.value)} data-testid="logbook-tags" />
        </div>
        <div className="lb-field lb-grow">
          <label htmlFor={ids.text}>Words in notes, tags or asset</label>
          <input id={ids.text} type="search" value={form.text} onChange={(e) => set('text')(e.target.value)} data-testid="logbook-text" />
        </div>
        <div className="lb-actions">
          <button type="submit" className="primary" data-testid="logbook-search">
            Search
          </button>
          <button type="button" onClick={clear}>
            Clear
          </button>
        </div>
      </form>

      <div className="lb-main">
        <div className="lb-list">
          <div className="lb-list-head">
            <h3>Measurements</h3>
            <span className="muted" aria-live="polite">
              {loading ? 'Searching…' : rows ? `${rows.length} found${oneAsset ? `, all of ${oneAsset}` : ''}` : ''}
            </span>
          </div>
          <div className="lb-scroll">
            <table className="lb-table" data-testid="measurement-table">
              <thead>
                <tr>
                  <th scope="col">Date (UTC)</th>
                  {oneAsset ? null : <th scope="col">Asset</th>}
                  <th scope="col">Tags</th>
                  <th scope="col" className="num">RMS ± σ (waves)</th>
                  <th scope="col" className="num">Strehl ± σ</th>
                  <th scope="col">Flags</th>
                </tr>
              </thead>
              <tbody>
                {(rows ?? []).map((m) => {
                  const flags = measurementFlags(m, assetByName.get(m.assetName), trend);
                  const isSel = m.id === selected;
                  return (
                    <tr
                      key={m.id}
                      data-testid="measurement-row"
                      data-id={m.id}
                      className={`${isSel ? 'lb-selected' : ''}${flags.length ? ' lb-flagged' : ''}`}
                      onClick={() => setSelected(m.id)}
                    >
                      <td>
                        <button type="button" className="lb-linkbtn" onClick={() => setSelected(m.id)} aria-current={isSel ? 'true' : undefined} aria-label={`Show measurement #${m.id} of ${formatWhen(m.takenAt)}`}>
                          {formatWhen(m.takenAt)}
                        </button>
                      </td>
                      {oneAsset ? null : <td className="lb-asset">{m.assetName}</td>}
                      <td>
                        {m.tags.map((t) => (
                          <span key={t} className="lb-tag">
                            {t}
                          </span>
                        ))}
                      </td>
                      <td className="num">{m.latest ? formatPm(m.latest.rmsWaves, m.latest.sigmaRmsWaves) : 'not analysed'}</td>
                      <td className="num">{m.latest ? formatPm(m.latest.strehl, m.latest.sigmaStrehl) : '—'}</td>
                      <td>
                        {flags.map((f) => (
                          <span key={f.kind} className={`lb-flag lb-flag-${f.kind}`} title={f.text}>
                            <span aria-hidden="true">▲ </span>
                            {f.short}
                            <span className="lb-sr"> — {f.text}</span>
                          </span>
                        ))}
                      </td>
                    </tr>
                  );
                })}
              </tbody>
            </table>
            {rows && rows.length === 0 && !loading ? <p className="muted lb-empty">No measurement matches this search.</p> : null}
          </div>
        </div>

        <MeasurementDetail record={detail} selected={selected} />
      </div>

      <div className="lb-export" aria-label="Export">
        <h3>Export</h3>
        <button type="button" onClick={() => void runExport('csv')} disabled={exporting !== null} data-testid="export-csv">
          {exporting === 'csv' ? 'Exporting…' : 'Export the list as CSV'}
        </button>
        <label htmlFor={ids.report}>Report on</label>
        <select id={ids.report} value={reportChoice} onChange={(e) => setReportChoice(e.target.value as ReportChoice)} data-testid="export-report-kind">
          <option value="trend">the trend of {trendAsset || 'an asset'}</option>
          <option value="selected">the selected measurement{selected !== null ? ` (#${selected})` : ''}</option>
          <option value="listed">the listed measurements</option>
        </select>
        <button type="button" onClick={() => void runExport('report')} disabled={exporting !== null || !canReport} data-testid="export-report">
          {exporting === 'report' ? 'Making the report…' : 'Make the report'}
        </button>
        {offered ? (
          <span className="lb-offered">
            Ready:{' '}
            <a href={offered.url} download={offered.name} data-testid="export-link">
              {offered.name}
            </a>{' '}
            <span className="muted">({formatBytes(offered.sizeBytes)})</span>
          </span>
        ) : null}
      </div>

      <section className="lb-trend" data-testid="trend-panel" aria-labelledby="lb-trend-heading">
        <div className="lb-trend-head">
          <h3 id="lb-trend-heading">Trend</h3>
          <label htmlFor={ids.trendAsset}>Asset</label>
          <select id={ids.trendAsset} value={trendAsset} onChange={(e) => setTrendAsset(e.target.value)} data-testid="trend-asset">
            {!trendAsset ? <option value="">—</option> : null}
            {assets.map((a) => (
              <option key={a.id} value={a.name}>
                {a.name}
              </option>
            ))}
          </select>
          <span className="muted">{trendLoading ? 'Loading…' : 'Uses the date range and tags of the search.'}</span>
        </div>
        {trend ? <TrendSummary trend={trend} asset={assetByName.get(trend.assetName)} onPick={setSelected} /> : null}
        {charts.length ? (
          <div className="lb-charts">
            {charts.map((c, i) => (
              <TrendChart key={`${trend?.assetName}-${c.key}`} data={c} testId={i === 0 ? 'trend-chart' : `trend-chart-${c.key}`} onPick={setSelected} height={i < 2 ? 240 : 200} />
            ))}
          </div>
        ) : trend && !trendLoading ? (
          <p className="muted">No measurements of {trend.assetName} in this range.</p>
        ) : null}
      </section>
    </section>
  );
}

function TrendSummary(props: { trend: Trend; asset: Asset | undefined; onPick: (id: number) => void }): JSX.Element {
  const { trend, asset } = props;
  const limits: string[] = [];
  if (asset?.limitRmsWaves !== null && asset?.limitRmsWaves !== undefined) limits.push(`RMS at most ${fmtNum(asset.limitRmsWaves, 3)} waves`);
  if (asset?.limitStrehl !== null && asset?.limitStrehl !== undefined) limits.push(`Strehl ratio at least ${fmtNum(asset.limitStrehl, 3)}`);
  return (
    <div className="lb-trend-summary">
      <p>
        <strong>{trend.assetName}</strong>: {limits.length ? `limits ${limits.join(', ')}` : 'no limits set for this asset'}.{' '}
        {trend.baselineCount >= 2
          ? `Control limits (dashed) are 3σ about the mean of the first ${trend.baselineCount} measurements (individuals chart).`
          : 'Too few measurements for control limits.'}
      </p>
      {trend.signals.length ? (
        <details open={trend.signals.length <= 6} data-testid="trend-signals">
          <summary>
            {trend.signals.length} flag{trend.signals.length === 1 ? '' : 's'} in this trend
          </summary>
          <ul className="lb-signals">
            {trend.signals.map((s, k) => (
              <li key={k}>
                <span className="lb-signal-date">{formatWhen(s.takenAt)}</span> {s.message}{' '}
                <button type="button" className="lb-linkbtn" onClick={() => props.onPick(s.measurementIds[s.measurementIds.length - 1])}>
                  show #{s.measurementIds[s.measurementIds.length - 1]}
                </button>
              </li>
            ))}
          </ul>
        </details>
      ) : (
        <p className="muted">No flags: every point is inside its limits and no run rule fired.</p>
      )}
      {trend.notes.length ? (
        <ul className="lb-notes muted">
          {trend.notes.map((n) => (
            <li key={n}>{n}</li>
          ))}
        </ul>
      ) : null}
    </div>
  );
}

function MeasurementDetail(props: { record: MeasurementRecord | null; selected: number | null }): JSX.Element {
  const { record, selected } = props;
  if (selected === null) {
    return (
      <aside className="lb-detail" data-testid="measurement-detail">
        <p className="muted">Pick a measurement to see its result, notes and frames.</p>
      </aside>
    );
  }
  if (!record || record.id !== selected) {
    return (
      <aside className="lb-detail" data-testid="measurement-detail">
        <p className="muted">Loading measurement #{selected}…</p>
      </aside>
    );
  }
  const stored = record.results.length ? record.results[record.results.length - 1] : null;
  const r = stored?.result ?? null;
  return (
    <aside className="lb-detail" data-testid="measurement-detail" aria-label={`Measurement #${record.id}`}>
      <h3>
        #{record.id} · {record.assetName}
      </h3>
      <p className="muted">
        {formatWhen(record.takenAt)}
        {record.operator ? ` · by ${record.operator}` : ''}
        {record.tags.length ? ` · ${record.tags.join(', ')}` : ''}
      </p>
      {r ? (
        <>
          {r.trusted === false ? (
            <p className="lb-warn" role="note">
              This fit is marked untrusted: it stopped in a wrong minimum. Do not rely on its values; analyse the frames again.
            </p>
          ) : null}
          <table className="lb-table lb-result" data-testid="measurement-result">
            <thead>
              <tr>
                <th scope="col">Term</th>
                <th scope="col" className="num">waves ± σ</th>
                <th scope="col" className="num">nm ± σ</th>
              </tr>
            </thead>
            <tbody>
              {r.zernike.terms.map((t) => (
                <tr key={t.j}>
                  <td>
                    {t.name} <span className="muted">(j={t.j})</span>
                  </td>
                  <td className="num">{formatPm(t.waves, t.sigmaWaves)}</td>
                  <td className="num">{formatPm(t.nm, t.sigmaNm)}</td>
                </tr>
              ))}
              <tr className="lb-sum">
                <td>RMS wavefront error</td>
                <td className="num">{formatPm(r.rmsWaves, r.sigmaRmsWaves)}</td>
                <td className="num">{formatPm(r.rmsWaves * r.wavelength_m * 1e9, r.sigmaRmsWaves * r.wavelength_m * 1e9)}</td>
              </tr>
              <tr className="lb-sum">
                <td>Peak-to-valley</td>
                <td className="num">{fmtNum(r.pvWaves, 4)}</td>
                <td className="num">{fmtNum(r.pvWaves * r.wavelength_m * 1e9, 4)}</td>
              </tr>
              <tr className="lb-sum">
                <td>Strehl ratio (Maréchal)</td>
                <td className="num">{formatPm(r.strehl, r.sigmaStrehl)}</td>
                <td />
              </tr>
            </tbody>
          </table>
          <p className="muted lb-small">
            λ = {fmtNum(r.wavelength_m * 1e9, 5)} nm · coefficients over a radius of {fmtNum(r.zernike.radius_m * 1e3, 4)} mm · χ²/dof {fmtNum(r.chi2PerDof, 3)} ·{' '}
            {r.termination} after {r.iterations} iterations · {r.software}
            {record.results.length > 1 ? ` · latest of ${record.results.length} analyses (added ${formatWhen(stored!.addedAt)})` : ''}
          </p>
          {r.warnings.length ? (
            <ul className="lb-warnings">
              {r.warnings.map((w) => (
                <li key={w}>{w}</li>
              ))}
            </ul>
          ) : null}
        </>
      ) : (
        <p className="muted">This measurement has not been analysed yet.</p>
      )}
      <h4>Notes</h4>
      <p className="lb-notes-text">{record.notes ? record.notes : <span className="muted">No notes.</span>}</p>
      <h4>Frames</h4>
      {record.frames.length ? (
        <ul className="lb-frames" data-testid="measurement-frames">
          {record.frames.map((f) => (
            <li key={`${f.role}-${f.position}-${f.sha256}`}>
              <span className="lb-role">{f.role === 'dark' ? 'dark' : 'frame'}</span> {f.name} <span className="muted">({formatBytes(f.sizeBytes)}, SHA-256 {f.sha256.slice(0, 12)}…)</span>
            </li>
          ))}
        </ul>
      ) : (
        <p className="muted">No frames stored.</p>
      )}
    </aside>
  );
}
