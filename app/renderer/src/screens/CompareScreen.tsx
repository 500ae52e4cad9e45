/**
 * Compare two logbook measurements (before and after cleaning, say): the differences B − A of every
 * coefficient, the RMS wavefront error and the Strehl ratio, each with its combined 1σ and |Δ|/σ, a
 * clear mark where the change is significant, and the two wavefront maps side by side on one colour
 * scale. The numbers come from the services (api.logbook.compare, core/logbook/compare.ts).
 */
import { useEffect, useId, useMemo, useState } from 'react';
import type { JSX } from 'react';
import type { ApiProblem, CompareOutcome, ShadowfrontApi } from '../../../shared/contract.ts';
import type { MeasurementSummary } from '../../../../core/logbook/types.ts';
import { formatWhen } from '../../../../core/logbook/format.ts';
import { compareRowView, defaultPair, differencePlane, measurementLabel, sharedSymmetricRange } from '../lib/compareView.ts';
import { offerDownload } from '../lib/logbookDownload.ts';
import type { OfferedFile } from '../lib/logbookDownload.ts';
import { formatBytes } from '../lib/logbookView.ts';
import { fmtNum } from '../lib/format.ts';
import { ImageView } from '../components/ImageView.tsx';
import './logbook.css';

export function CompareScreen(props: { api: ShadowfrontApi; onError: (p: ApiProblem) => void }): JSX.Element {
  const { api, onError } = props;
  const [list, setList] = useState<MeasurementSummary[] | null>(null);
  const [a, setA] = useState('');
  const [b, setB] = useState('');
  const [busy, setBusy] = useState(false);
  const [outcome, setOutcome] = useState<CompareOutcome | null>(null);
  const [showDiff, setShowDiff] = useState(false);
  const [offered, setOffered] = useState<OfferedFile | null>(null);
  const [reporting, setReporting] = useState(false);
  const idA = useId();
  const idB = useId();

  useEffect(() => {
    let live = true;
    void api.logbook.measurements({}).then((r) => {
      if (!live) return;
      if (!r.ok) {
        setList([]);
        onError(r.problem);
        return;
      }
      const sorted = [...r.value].sort((x, y) => (x.takenAt < y.takenAt ? -1 : x.takenAt > y.takenAt ? 1 : x.id - y.id));
      setList(sorted);
      const pair = defaultPair(sorted);
      setA((cur) => cur || (pair.a !== null ? String(pair.a) : ''));
      setB((cur) => cur || (pair.b !== null ? String(pair.b) : ''));
    });
    return () => {
      live = false;
    };
  }, [api, onError]);

  useEffect(() => () => {
    if (offered) URL.revokeObjectURL(offered.url);
  }, [offered]);

  const run = async () => {
    const ia = Number(a);
    const ib = Number(b);
    if (!a || !b || !Number.isInteger(ia) || !Number.isInteger(ib)) {
      onError({ kind: 'invalid-request', message: 'Pick two measurements, A and B, to compare.' });
      return;
    }
    if (ia === ib) {
      onError({ kind: 'invalid-request', message: `A and B are the same measurement (#${ia}); pick two different ones.` });
      return;
    }
    setBusy(true);
    const r = await api.logbook.compare({ a: ia, b: ib });
    setBusy(false);
    if (r.ok) setOutcome(r.value);
    else onError(r.problem);
  };

  const report = async () => {
    if (!outcome) return;
    setReporting(true);
    const r = await api.logbook.exportReport({ kind: 'comparison', ids: [outcome.comparison.a.measurementId, outcome.comparison.b.measurementId] });
    setReporting(false);
    if (!r.ok) {
      onError(r.problem);
      return;
    }
    try {
      setOffered(offerDownload(r.value));
    } catch (err) {
      onError({ kind: 'internal', message: `The file "${r.value.name}" could not be offered for download: ${(err as Error).message}.` });
    }
  };

  const options = (list ?? []).filter((m) => m.latest);
  const unanalysed = (list ?? []).length - options.length;
  const swap = () => {
    setA(b);
    setB(a);
  };

  return (
    <section className="cmp-screen" data-testid="compare-screen" aria-labelledby="cmp-heading">
      <header className="lb-head">
        <h2 id="cmp-heading">Compare two measurements</h2>
        <p className="muted">Differences are B − A. A change counts as significant when it is at least {outcome ? fmtNum(outcome.comparison.threshold, 2) : '2'} times its combined uncertainty.</p>
      </header>
      <div className="cmp-pick">
        <div className="lb-field cmp-side">
          <label htmlFor={idA}>A (earlier, e.g. before cleaning)</label>
          <select id={idA} value={a} onChange={(e) => setA(e.target.value)} data-testid="compare-pick-a">
            <option value="">— pick a measurement —</option>
            {options.map((m) => (
              <option key={m.id} value={String(m.id)}>
                {measurementLabel(m)}
              </option>
            ))}
          </select>
        </div>
        <button type="button" className="cmp-swap" onClick={swap} aria-label="Swap A and B" title="Swap A and B">
          ⇄
        </button>
        <div className="lb-field cmp-side">
          <label htmlFor={idB}>B (later, e.g. after cleaning)</label>
          <select id={idB} value={b} onChange={(e) => setB(e.target.value)} data-testid="compare-pick-b">
            <option value="">— pick a measurement —</option>
            {options.map((m) => (
              <option key={m.id} value={String(m.id)}>
                {measurementLabel(m)}
              </option>
            ))}
          </select>
        </div>
        <button type="button" className="primary" onClick={() => void run()} disabled={busy || list === null} data-testid="compare-run">
          {busy ? 'Comparing…' : 'Compare'}
        </button>
      </div>
      {unanalysed > 0 ? <p className="muted lb-small">{unanalysed} measurement{unanalysed === 1 ? ' has' : 's have'} no result yet and cannot be compared.</p> : null}
      {list !== null && options.length < 2 ? <p className="muted">The logbook needs at least two analysed measurements to compare.</p> : null}
      {outcome ? <CompareResult outcome={outcome} showDiff={showDiff} setShowDiff={setShowDiff} onReport={() => void report()} reporting={reporting} offered={offered} /> : null}
    </section>
  );
}

function CompareResult(props: {
  outcome: CompareOutcome;
  showDiff: boolean;
  setShowDiff: (v: boolean) => void;
  onReport: () => void;
  reporting: boolean;
  offered: OfferedFile | null;
}): JSX.Element {
  const { outcome, showDiff } = props;
  const c = outcome.comparison;
  const rows = useMemo(() => c.rows.map((r) => compareRowView(r, c.threshold)), [c]);
  const diff = useMemo(() => differencePlane(outcome.wavefrontA, outcome.wavefrontB), [outcome]);
  const half = useMemo(() => sharedSymmetricRange(showDiff && diff ? [outcome.wavefrontA, outcome.wavefrontB, diff] : [outcome.wavefrontA, outcome.wavefrontB]), [outcome, diff, showDiff]);
  const range: [number, number] = half > 0 ? [-half, half] : [-1e-3, 1e-3];
  const sigCount = rows.filter((r) => r.significant).length;
  const side = (s: typeof c.a) => `#${s.measurementId} · ${formatWhen(s.takenAt)} · ${s.assetName}${s.tags.length ? ` · ${s.tags.join(', ')}` : ''}`;
  const mapWidth = showDiff && diff ? 260 : 340;
  return (
    <div className="cmp-result">
      <dl className="cmp-sides">
        <dt>A</dt>
        <dd>{side(c.a)}</dd>
        <dt>B</dt>
        <dd>{side(c.b)}</dd>
      </dl>
      <p aria-live="polite">
        {sigCount === 0 ? 'No significant change.' : `${sigCount} of ${rows.length} quantities changed significantly (marked ◆).`}
        <span className="muted"> Values in waves at λ = {fmtNum(c.a.wavelengthM * 1e9, 5)} nm; σ of a difference is √(σA² + σB²).</span>
      </p>
      <div className="lb-scroll cmp-table-wrap">
        <table className="lb-table cmp-table" data-testid="compare-table">
          <thead>
            <tr>
              <th scope="col">Quantity</th>
              <th scope="col" className="num">A ± σ</th>
              <th scope="col" className="num">B ± σ</th>
              <th scope="col" className="num">B − A ± σ</th>
              <th scope="col" className="num">|Δ|/σ</th>
              <th scope="col">Verdict</th>
            </tr>
          </thead>
          <tbody>
            {rows.map((r) => (
              <tr key={r.key} data-key={r.key} data-significant={r.significant ? 'yes' : 'no'} className={r.significant ? `cmp-sig cmp-${r.verdict.replace(/ /g, '-')}` : ''}>
                <th scope="row">
                  {r.label}
                  {r.unit ? <span className="muted"> ({r.unit})</span> : null}
                </th>
                <td className="num">{r.a}</td>
                <td className="num">{r.b}</td>
                <td className="num">{r.delta}</td>
                <td className="num">
                  {r.significance}
                  {r.significant ? (
                    <span className="cmp-mark" title="significant change">
                      {' '}
                      ◆<span className="lb-sr"> significant</span>
                    </span>
                  ) : null}
                </td>
                <td>{r.verdictText}</td>
              </tr>
            ))}
          </tbody>
        </table>
      </div>
      {c.notes.length ? (
        <ul className="lb-notes" data-testid="compare-notes">
          {c.notes.map((n) => (
            <li key={n}>{n}</li>
          ))}
        </ul>
      ) : null}
      <div className="cmp-maps-head">
        <h3>Wavefront maps</h3>
        <span className="muted">same colour scale, ± {fmtNum(half, 3)} waves; blue below zero, red above</span>
        {diff ? (
          <label className="cmp-check">
            <input type="checkbox" checked={showDiff} onChange={(e) => props.setShowDiff(e.target.checked)} /> also show B − A
          </label>
        ) : null}
      </div>
      <div className="cmp-maps">
        <ImageView plane={outcome.wavefrontA} colormap="diverging" symmetric range={range} unit="waves" title={`A: #${c.a.measurementId}${c.a.tags.length ? ` (${c.a.tags.join(', ')})` : ''}`} testId="compare-map-a" width={mapWidth} />
        <ImageView plane={outcome.wavefrontB} colormap="diverging" symmetric range={range} unit="waves" title={`B: #${c.b.measurementId}${c.b.tags.length ? ` (${c.b.tags.join(', ')})` : ''}`} testId="compare-map-b" width={mapWidth} />
        {showDiff && diff ? <ImageView plane={diff} colormap="diverging" symmetric range={range} unit="waves" title="B − A" testId="compare-map-diff" width={mapWidth} /> : null}
      </div>
      <div className="lb-export">
        <button type="button" onClick={props.onReport} disabled={props.reporting} data-testid="compare-report">
          {props.reporting ? 'Making the report…' : 'Make a report of this comparison'}
        </button>
        {props.offered ? (
          <span className="lb-offered">
            Ready:{' '}
            <a href={props.offered.url} download={props.offered.name}>
              {props.offered.name}
            </a>{' '}
            <span className="muted">({formatBytes(props.offered.sizeBytes)})</span>
          </span>
        ) : null}
      </div>
    </div>
  );
}
