/**
 * Planner: choose a disc and a camera distance before a first measurement. Load the example plan, edit it
 * with unit-aware fields or as JSON text (the service reads the units and names any bad field), run it as
 * a job (progress and Cancel), then read the ranked table of candidates, the recommendation, the warnings
 * and the chart of predicted σ against the camera distance.
 */
import { useEffect, useMemo, useState } from 'react';
import type { JSX } from 'react';
import type { CandidateReport, PlanReport } from '../../../../core/plan/types.ts';
import { SAFETY_POINTS } from '../../../../core/safety.ts';
import { FieldGroup, TextField } from '../components/Fields.tsx';
import { JobProgress } from '../components/ProgressBar.tsx';
import { PlanChart } from '../charts/PlanChart.tsx';
import { getAt, pathMatches, setAt } from '../lib/jsonPath.ts';
import { ASTIGMATISM_TERMS, COMA_TERMS, DEFOCUS_TERMS, sigmaOf, type Planner, type PlanJson } from '../lib/planner.ts';
import { fmtNum } from '../lib/format.ts';

type Kind = 'text' | 'number' | 'list';

interface FieldDef {
  path: string;
  label: string;
  kind: Kind;
  hint?: string;
  width?: 'short' | 'normal' | 'wide';
}

const LASER: FieldDef[] = [
  { path: 'laser.wavelength', label: 'Wavelength', kind: 'text' },
  { path: 'laser.beamRadius', label: 'Beam radius (1/e²) at disc', kind: 'text' },
  { path: 'laser.curvatureRadius', label: 'Wavefront radius at disc', kind: 'text', hint: '"collimated", + diverging, − converging' },
];

const CAMERA: FieldDef[] = [
  { path: 'camera.pixelPitch', label: 'Pixel pitch', kind: 'text' },
  { path: 'camera.sensorSize[0]', label: 'Sensor width (px)', kind: 'number' },
  { path: 'camera.sensorSize[1]', label: 'Sensor height (px)', kind: 'number' },
  { path: 'camera.bitDepth', label: 'Bit depth', kind: 'number' },
  { path: 'camera.peakCounts', label: 'Peak counts (brightest px)', kind: 'number' },
  { path: 'camera.readNoise', label: 'Read noise (counts RMS)', kind: 'number' },
];

const DISCS: FieldDef = { path: 'candidates.discDiameters', label: 'Disc diameters', kind: 'list', hint: 'separated by commas', width: 'wide' };
const DISTANCE_LIST: FieldDef = { path: 'candidates.cameraDistances', label: 'Camera distances', kind: 'list', hint: 'separated by commas', width: 'wide' };
const DISTANCE_RANGE: FieldDef[] = [
  { path: 'candidates.cameraDistances.from', label: 'Distances from', kind: 'text' },
  { path: 'candidates.cameraDistances.to', label: 'to', kind: 'text' },
  { path: 'candidates.cameraDistances.steps', label: 'Number of distances', kind: 'number' },
];

const NUMBER_RE = /^[-+]?(\d+\.?\d*|\.\d+)([eE][-+]?\d+)?$/;

/** The field's JSON value as text. */
function display(def: FieldDef, v: unknown): string {
  if (v === undefined || v === null) return '';
  if (def.kind === 'list') return Array.isArray(v) ? v.map((x) => (typeof x === 'string' ? x : JSON.stringify(x))).join(', ') : JSON.stringify(v);
  return typeof v === 'string' ? v : typeof v === 'number' ? String(v) : JSON.stringify(v);
}

/** Typed text → the JSON value: numbers for plain-number fields, a list of texts for list fields, text otherwise. */
function toJson(def: FieldDef, text: string): unknown {
  const t = text.trim();
  if (def.kind === 'number') return NUMBER_RE.test(t) ? Number(t) : text;
  if (def.kind === 'list') return text.split(',').map((s) => s.trim()).filter(Boolean);
  return text;
}

const sameJson = (a: unknown, b: unknown) => JSON.stringify(a) === JSON.stringify(b);

/** A text field that keeps what is being typed ("3.", "2 mm, ") while the plan holds its JSON value. */
function PlanField(props: { def: FieldDef; plan: PlanJson; onPlan: (p: PlanJson) => void; problem: string | null }): JSX.Element {
  const { def, plan, onPlan } = props;
  const value = getAt(plan, def.path);
  const [raw, setRaw] = useState(() => display(def, value));
  useEffect(() => {
    // Follow the plan when it changes elsewhere (example loaded, JSON text edited), not while typing.
    setRaw((r) => (sameJson(toJson(def, r), value) ? r : display(def, value)));
  }, [def, value]);
  return (
    <TextField
      label={def.label}
      value={raw}
      onChange={(t) => {
        setRaw(t);
        onPlan(setAt(plan, def.path, toJson(def, t)));
      }}
      hint={def.hint}
      problem={props.problem}
      width={def.width}
      testId={`plan-field-${def.path.replace(/[[\]]/g, '').replace(/\./g, '-')}`}
    />
  );
}

const fmtSigma = (x: number | null) => (x === null ? '—' : fmtNum(x, 2));

function fitsText(c: CandidateReport): string {
  const f = c.figures;
  if (f.shadowFits === null) return '?';
  if (!f.shadowFits) return 'no';
  return c.bound && !c.bound.holdsWholeShadow ? 'yes*' : 'yes';
}

export function PlannerScreen(props: { planner: Planner }): JSX.Element {
  const { planner } = props;
  const { plan, setPlan, mode, setMode, text, setText, textProblem, job, problem } = planner;
  const [order, setOrder] = useState<'rank' | 'plan'>('rank');

  useEffect(() => {
    if (!plan) void planner.loadExample();
    // load the example once, when the screen first opens without a plan
  }, []);

  const allPaths = [...LASER, ...CAMERA, DISCS, DISTANCE_LIST, ...DISTANCE_RANGE].map((f) => f.path);
  const problemFor = (path: string): string | null => (problem && problem.field && pathMatches(problem.field, path) ? problem.message : null);
  const unplaced = problem && !(problem.field && allPaths.some((p) => pathMatches(problem.field, p))) ? problem.message : null;
  const field = (def: FieldDef) => (plan ? <PlanField key={def.path} def={def} plan={plan} onPlan={setPlan} problem={problemFor(def.path)} /> : null);
  const distances = plan ? getAt(plan, 'candidates.cameraDistances') : undefined;
  const distancesAsList = Array.isArray(distances);

  const report = job.value;
  return (
    <div className="screen planner-screen" data-testid="planner-screen">
      <header className="screen-head">
        <h2>Planner</h2>
        <span className="muted">Which disc and camera distance can see the aberrations: predicted 1σ of each coefficient (Cramér–Rao bound with the camera noise).</span>
      </header>

      <section className="panel planner-controls" aria-label="Plan and run">
        <div className="toolbar">
          <button type="button" onClick={() => void planner.loadExample()} disabled={job.running} data-testid="plan-example">
            Load example plan
          </button>
          <fieldset className="segmented" aria-label="Edit the plan as">
            {(['fields', 'json'] as const).map((m) => (
              <label key={m} className={mode === m ? 'on' : ''}>
                <input type="radio" name="plan-mode" value={m} checked={mode === m} onChange={() => setMode(m)} data-testid={`plan-mode-${m}`} />
                {m === 'fields' ? 'fields' : 'JSON text'}
              </label>
            ))}
          </fieldset>
          <span className="toolbar-sep" />
          <button type="button" className="primary" onClick={planner.run} disabled={!plan || job.running || (mode === 'json' && !!textProblem)} data-testid="plan-run">
            Plan the bench
          </button>
          {plan && typeof plan.note === 'string' ? <span className="muted small-text">Plan note: {plan.note}</span> : null}
        </div>
        <JobProgress job={job} onCancel={job.cancel} testId="plan-progress" cancelTestId="plan-cancel" />
        {unplaced ? (
          <p className="field-problem block" role="alert" data-testid="plan-problem">
            {unplaced}
          </p>
        ) : null}
      </section>

      <div className="planner-layout">
        <section className="panel planner-form" aria-label="Plan">
          {!plan ? (
            <p className="muted">Loading the example plan…</p>
          ) : mode === 'json' ? (
            <div className="field">
              <label htmlFor="plan-json">Plan ("shadowfront-plan/1"; lengths as text with their unit)</label>
              <textarea id="plan-json" className="plan-json" rows={20} spellCheck={false} value={text} onChange={(e) => setText(e.target.value)} data-testid="plan-json" />
              {textProblem ? <span className="field-problem">{textProblem}</span> : null}
            </div>
          ) : (
            <>
              <FieldGroup title="Laser">{LASER.map(field)}</FieldGroup>
              <FieldGroup title="Camera">{CAMERA.map(field)}</FieldGroup>
              <FieldGroup title="Candidates: every disc at every distance">
                {field(DISCS)}
                {distancesAsList ? field(DISTANCE_LIST) : DISTANCE_RANGE.map(field)}
              </FieldGroup>
              <p className="muted small-text planner-foot">
                <button
                  type="button"
                  className="small"
                  onClick={() =>
                    setPlan(setAt(plan, 'candidates.cameraDistances', distancesAsList ? { from: '0.3 m', to: '1.5 m', steps: 5 } : ['0.5 m', '0.8 m', '1.2 m']))
                  }
                >
                  {distancesAsList ? 'Use a range of distances' : 'List the distances instead'}
                </button>{' '}
                Lengths with their unit ("632.8 nm", "5.3 um", "0.8 m"). Edge roughness, source size, terms and the Zernike radius are kept as loaded; edit them as JSON text.
              </p>
            </>
          )}
          <p className="muted small-text">{SAFETY_POINTS.find((p) => /officer/.test(p))}</p>
        </section>

        <div className="planner-side">
          {report ? (
            <>
              <Recommendation report={report} />
              <section className="panel planner-chart-panel" aria-label="Chart">
                <PlanChart report={report} testId="plan-chart" height={230} />
              </section>
            </>
          ) : (
            <section className="panel planner-chart-panel muted">{job.running ? 'Planning…' : 'Run the plan to see the recommendation and the predicted σ against the camera distance.'}</section>
          )}
        </div>
      </div>

      {report ? <PlanReportView report={report} order={order} setOrder={setOrder} /> : null}
    </div>
  );
}

function Recommendation(props: { report: PlanReport }): JSX.Element {
  const { report } = props;
  return (
    <section className={`panel plan-recommendation${report.recommended === null ? ' none' : ''}`} data-testid="plan-recommendation" aria-live="polite">
      <strong>Recommendation:</strong> {report.recommendation}
      <p className="muted small-text">
        Ranking rule: {report.rankingRule}. σ in waves over a radius of {fmtNum(report.zernikeRadiusM * 1e3, 4)} mm at {fmtNum(report.wavelengthM * 1e9, 5)} nm; terms j = {report.terms.join(', ')}.
      </p>
    </section>
  );
}

function PlanReportView(props: { report: PlanReport; order: 'rank' | 'plan'; setOrder: (o: 'rank' | 'plan') => void }): JSX.Element {
  const { report, order, setOrder } = props;
  const rows = useMemo(() => {
    const indexed = report.candidates.map((c, i) => ({ c, i }));
    if (order === 'plan') return indexed;
    return [...indexed].sort((a, b) => (a.c.rank ?? Infinity) - (b.c.rank ?? Infinity) || a.i - b.i);
  }, [report, order]);
  const notes = report.candidates.flatMap((c, i) => c.warnings.map((w) => `#${i + 1}: ${w}`));
  const coarse = report.candidates.filter((c) => c.bound && c.bound.binning > c.bound.fitBinning).length;
  return (
    <>
      <section className="panel plan-table-panel">
        <div className="toolbar compact">
          <fieldset className="segmented" aria-label="Order of the rows">
            {(['rank', 'plan'] as const).map((o) => (
              <label key={o} className={order === o ? 'on' : ''}>
                <input type="radio" name="plan-order" value={o} checked={order === o} onChange={() => setOrder(o)} />
                {o === 'rank' ? 'by rank' : 'as planned'}
              </label>
            ))}
          </fieldset>
          <span className="muted small-text">
            {report.candidates.filter((c) => c.usable).length} of {report.candidates.length} candidates usable
          </span>
        </div>
        <div className="table-scroll">
          <table className="data-table plan-table" data-testid="plan-table">
            <thead>
              <tr>
                <th scope="col">#</th>
                <th scope="col" className="num">disc<br /><span className="unit">mm</span></th>
                <th scope="col" className="num">distance<br /><span className="unit">m</span></th>
                <th scope="col" className="num">L′<br /><span className="unit">m</span></th>
                <th scope="col" className="num">N<sub>F</sub></th>
                <th scope="col" className="num">Δr<br /><span className="unit">µm</span></th>
                <th scope="col" className="num">tolerance<br /><span className="unit">µm</span></th>
                <th scope="col" className="num">spot<br /><span className="unit">px</span></th>
                <th scope="col" className="num">rings</th>
                <th scope="col">fits?</th>
                <th scope="col" className="num">σ astig.<br /><span className="unit">waves</span></th>
                <th scope="col" className="num">σ coma<br /><span className="unit">waves</span></th>
                <th scope="col" className="num">σ defocus<br /><span className="unit">waves</span></th>
                <th scope="col" className="num">|ρ(defocus, L)|</th>
                <th scope="col" className="num">rank</th>
                <th scope="col">note</th>
              </tr>
            </thead>
            <tbody>
              {rows.map(({ c, i }) => {
                const f = c.figures;
                const recommended = report.recommended === i;
                return (
                  <tr
                    key={i}
                    data-testid="plan-row"
                    data-rank={c.rank ?? ''}
                    data-usable={c.usable ? 'yes' : 'no'}
                    className={`${recommended ? 'plan-best' : ''}${c.usable ? '' : ' plan-unusable'}`}
                  >
                    <td>{i + 1}</td>
                    <td className="num">{fmtNum(c.candidate.discDiameterM * 1e3, 3)}</td>
                    <td className="num">{fmtNum(c.candidate.cameraDistanceM, 3)}</td>
                    <td className="num">{fmtNum(f.effectiveDistanceM, 3)}</td>
                    <td className="num">{fmtNum(f.fresnelNumber, 3)}</td>
                    <td className="num">{fmtNum(f.zoneWidthM * 1e6, 3)}</td>
                    <td className="num">{fmtNum(f.rimToleranceM * 1e6, 2)}</td>
                    <td className="num">{f.spotDiameterPx.toFixed(1)}</td>
                    <td className="num">{f.visibleRings}</td>
                    <td>{fitsText(c)}</td>
                    <td className="num">{fmtSigma(sigmaOf(c, ASTIGMATISM_TERMS))}</td>
                    <td className="num">{fmtSigma(sigmaOf(c, COMA_TERMS))}</td>
                    <td className="num">{fmtSigma(sigmaOf(c, DEFOCUS_TERMS))}</td>
                    <td className="num">{c.defocusDistanceCorrelation === null ? '—' : c.defocusDistanceCorrelation.toFixed(2)}</td>
                    <td className="num">{c.rank === null ? '—' : recommended ? `★ ${c.rank}` : c.rank}</td>
                    <td className="plan-note">{c.usable ? (c.warnings.length ? `${c.warnings.length} warning${c.warnings.length === 1 ? '' : 's'} (below)` : '') : `not usable: ${c.reason}`}</td>
                  </tr>
                );
              })}
            </tbody>
          </table>
        </div>
        <p className="muted small-text">
          spot: first dark ring diameter on the sensor; rings: bright rings inside the shadow and on the sensor; fits?: the shadow fits on the sensor (yes* = but not all of its first four edge
          fringes); σ astig. and σ coma: the larger of the two terms; σ defocus with the camera distance known; |ρ(defocus, L)|: defocus–distance correlation when the distance is fitted too;
          tolerance: 10 % of Δr (common practice, no published source).
        </p>
        {coarse > 0 ? (
          <p className="muted small-text">
            For {coarse} candidate{coarse === 1 ? '' : 's'} the bound was computed on coarser super-pixels than the fit would use: those σ are on the safe side (larger).
          </p>
        ) : null}
      </section>
      <section className="panel">
        <h3>Warnings</h3>
        <div className="warnings" data-testid="plan-warnings">
          {report.warnings.length + notes.length === 0 ? (
            <p className="ok-text">None.</p>
          ) : (
            <ul>
              {[...report.warnings, ...notes].map((w) => (
                <li key={w}>{w}</li>
              ))}
            </ul>
          )}
        </div>
      </section>
    </>
  );
}
