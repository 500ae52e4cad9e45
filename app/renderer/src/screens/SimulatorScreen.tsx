/**
 * The simulator: set aberrations and disc imperfections with sliders and see the shadow the model
 * expects, next to a measured frame. For training the eye and for sanity checks. The picture comes
 * from the services' simulate job (api.jobs.startSimulate), polled about every 200 ms, with a progress
 * bar and a Cancel button; with the fast model it runs by itself ~400 ms after a slider stops.
 */
import { useCallback, useEffect, useId, useRef, useState } from 'react';
import type { ChangeEvent, JSX } from 'react';
import type { ApiProblem, DerivedFigures, FileBlob, FramePreview, JobStatus, SetupJson, ShadowfrontApi, SimulateOutcome } from '../../../shared/contract.ts';
import {
  AXIS_RANGE,
  ELLIPTICITY_RANGE,
  SIM_TERMS,
  WAVES_RANGE,
  marechalStrehl,
  paramsFromSetup,
  rimDeviationM,
  rmsWaves,
  simulateRequest,
  termLabel,
  zeroParams,
} from '../lib/simulatorParams.ts';
import type { SimModel, SimParams, SliderRange } from '../lib/simulatorParams.ts';
import { followJob } from '../lib/simulatorJob.ts';
import { fmtLength, fmtNum } from '../lib/format.ts';
import { readFiles } from '../lib/session.ts';
import { ImageView } from '../components/ImageView.tsx';
import { ProgressBar } from '../components/ProgressBar.tsx';
import './logbook.css';

/** Pause after the last slider move before the fast model runs by itself. */
export const AUTO_RUN_DELAY_MS = 400;
/** Display width of each picture, so that the simulated and the measured one sit side by side at 1280 px. */
const IMAGE_WIDTH = 330;

interface Measured {
  preview: FramePreview;
  label: string;
}

export function SimulatorScreen(props: { api: ShadowfrontApi; onError: (p: ApiProblem) => void }): JSX.Element {
  const { api, onError } = props;
  const [setup, setSetup] = useState<SetupJson | null>(null);
  const [setupLabel, setSetupLabel] = useState('the demo setup');
  const [derived, setDerived] = useState<DerivedFigures | null>(null);
  const [params, setParams] = useState<SimParams>(zeroParams());
  const [startParams, setStartParams] = useState<SimParams>(zeroParams());
  const [auto, setAuto] = useState(true);
  const [status, setStatus] = useState<JobStatus | null>(null);
  const [running, setRunning] = useState(false);
  const [cancelling, setCancelling] = useState(false);
  const [outcome, setOutcome] = useState<SimulateOutcome | null>(null);
  const [shownParams, setShownParams] = useState<SimParams | null>(null);
  const [endNote, setEndNote] = useState<string | null>(null);
  const [measured, setMeasured] = useState<Measured | null>(null);
  const [demoSets, setDemoSets] = useState<{ setup: SetupJson; frames: FileBlob[]; label: string }[] | null>(null);
  const [demoPick, setDemoPick] = useState('0');
  const [loadingFrame, setLoadingFrame] = useState(false);
  const [scale, setScale] = useState<'linear' | 'log'>('linear');
  const [colormap, setColormap] = useState<'viridis' | 'cividis'>('viridis');
  const runSeq = useRef(0);
  const jobId = useRef<string | null>(null);
  const touched = useRef(false);
  const ids = { auto: useId(), file: useId(), demo: useId(), scale: useId(), cmap: useId() };

  // The demo setup, its derived figures, and the starting slider values.
  useEffect(() => {
    let live = true;
    void api.setup.example({ which: 'demo' }).then((r) => {
      if (!live) return;
      if (!r.ok) {
        onError(r.problem);
        return;
      }
      setSetup(r.value);
      const p = paramsFromSetup(r.value);
      setParams(p);
      setStartParams(p);
    });
    return () => {
      live = false;
    };
  }, [api, onError]);

  useEffect(() => {
    if (!setup) return;
    let live = true;
    void api.setup.check({ setup }).then((r) => {
      if (!live) return;
      if (!r.ok) onError(r.problem);
      else {
        setDerived(r.value.derived);
        if (r.value.problem) onError(r.value.problem);
      }
    });
    return () => {
      live = false;
    };
  }, [api, onError, setup]);

  const run = useCallback(
    async (p: SimParams) => {
      if (!setup) return;
      const seq = ++runSeq.current;
      const previous = jobId.current;
      if (previous) void api.jobs.cancel({ id: previous });
      jobId.current = null;
      setRunning(true);
      setCancelling(false);
      setEndNote(null);
      setStatus(null);
      // Match a loaded frame's size (full resolution), so the two pictures line up.
      const size = measured ? { widthPx: measured.preview.image.widthPx * measured.preview.decimation, heightPx: measured.preview.image.heightPx * measured.preview.decimation } : null;
      const started = await api.jobs.startSimulate(simulateRequest(setup, p, size));
      if (seq !== runSeq.current) {
        if (started.ok) void api.jobs.cancel({ id: started.value.id });
        return;
      }
      if (!started.ok) {
        setRunning(false);
        onError(started.problem);
        return;
      }
      jobId.current = started.value.id;
      const end = await followJob(api.jobs, started.value.id, {
        onStatus: (s) => {
          if (seq === runSeq.current) setStatus(s);
        },
        stopped: () => seq !== runSeq.current,
      });
      if (seq !== runSeq.current) return;
      jobId.current = null;
      setRunning(false);
      setCancelling(false);
      if (!end.ok) {
        if (end.problem.kind === 'cancelled') setEndNote('Cancelled; the picture shows the last finished simulation.');
        else onError(end.problem);
        return;
      }
      if (end.status.state === 'cancelled') {
        setEndNote('Cancelled; the picture shows the last finished simulation.');
        return;
      }
      const value = end.status.value as SimulateOutcome | undefined;
      if (!value || !value.image) {
        onError({ kind: 'internal', message: 'The simulation finished without a picture.' });
        return;
      }
      setOutcome(value);
      setShownParams(p);
    },
    [api, onError, setup, measured],
  );

  const cancel = () => {
    const id = jobId.current;
    setCancelling(true);
    if (!id) {
      runSeq.current++;
      setRunning(false);
      setCancelling(false);
      return;
    }
    void api.jobs.cancel({ id }).then((r) => {
      if (!r.ok) onError(r.problem);
    });
  };

  // Fast model: run by itself after the sliders rest; also once when the setup arrives.
  const runRef = useRef(run);
  runRef.current = run;
  useEffect(() => {
    if (!setup || params.model !== 'fast' || !auto) return;
    const t = setTimeout(() => void runRef.current(params), touched.current ? AUTO_RUN_DELAY_MS : 0);
    return () => clearTimeout(t);
  }, [params, auto, setup, measured]);

  // Stop following (and cancel) a job when the screen closes.
  useEffect(
    () => () => {
      runSeq.current++;
      if (jobId.current) void api.jobs.cancel({ id: jobId.current });
    },
    [api],
  );

  const change = (next: Partial<SimParams>) => {
    touched.current = true;
    setParams((p) => ({ ...p, ...next }));
  };
  const setWave = (j: number, v: number) => {
    touched.current = true;
    setParams((p) => ({ ...p, waves: { ...p.waves, [j]: v } }));
  };

  const previewFrame = async (blobs: FileBlob[], frameSetup: SetupJson, label: string) => {
    setLoadingFrame(true);
    const r = await api.frames.preview({ frames: blobs, darks: [], setup: frameSetup });
    setLoadingFrame(false);
    if (!r.ok) {
      onError(r.problem);
      return false;
    }
    setMeasured({ preview: r.value, label });
    return true;
  };

  const onFile = async (e: ChangeEvent<HTMLInputElement>) => {
    const files = e.target.files ? [...e.target.files] : [];
    e.target.value = '';
    if (!files.length || !setup) return;
    let blobs: FileBlob[];
    try {
      blobs = await readFiles(files);
    } catch (err) {
      onError({ kind: 'frame', message: `The file "${files[0].name}" could not be read: ${(err as Error).message}.`, file: files[0].name });
      return;
    }
    await previewFrame(blobs, setup, files.length === 1 ? files[0].name : `${files.length} files, averaged`);
  };

  const showDemo = async () => {
    let sets = demoSets;
    if (!sets) {
      setLoadingFrame(true);
      const r = await api.frames.demoFiles();
      setLoadingFrame(false);
      if (!r.ok) {
        onError(r.problem);
        return;
      }
      sets = r.value;
      setDemoSets(sets);
      if (!sets.length) {
        onError({ kind: 'frame', message: 'There are no demo frames in this installation.' });
        return;
      }
    }
    const k = Math.min(Number(demoPick) || 0, sets.length - 1);
    const set = sets[k];
    if (await previewFrame(set.frames, set.setup, `demo: ${set.label}${/synthetic/i.test(set.label) ? '' : ' (synthetic)'}`)) {
      setSetup(set.setup);
      setSetupLabel(`the setup of the demo frame "${set.label}"`);
    }
  };

  const rms = rmsWaves(params);
  // the disc radius as the service read it from the setup (units are parsed there, not here)
  const radius = derived?.discRadiusM ?? null;
  const rimDev = radius !== null ? rimDeviationM(radius, params.ellipticity) : null;
  const tol = derived?.rimToleranceM ?? null;
  const stale = shownParams !== null && JSON.stringify(shownParams) !== JSON.stringify(params);

  return (
    <section className="sim-screen" data-testid="simulator-screen" aria-labelledby="sim-heading">
      <header className="lb-head">
        <h2 id="sim-heading">Simulator</h2>
        <p className="muted">
          Set aberrations and disc flaws, and see the shadow the model expects for {setupLabel}. Useful for training the eye and for checking a measured frame by
          sight. Everything on the left-hand picture is simulated.
        </p>
      </header>
      <div className="sim-layout">
        <form className="sim-controls" onSubmit={(e) => e.preventDefault()} aria-label="Simulation settings">
          <fieldset>
            <legend>Aberrations (waves, unit-RMS Zernike terms)</legend>
            {SIM_TERMS.map((j) => (
              <Slider key={j} label={termLabel(j)} value={params.waves[j] ?? 0} range={WAVES_RANGE} unit="waves" decimals={3} onChange={(v) => setWave(j, v)} testId={`sim-z${j}`} />
            ))}
            <p className="muted lb-small">
              RMS {fmtNum(rms, 3)} waves · Strehl ≈ {fmtNum(marechalStrehl(rms), 3)} (Maréchal approximation, good below about 0.07 waves)
            </p>
          </fieldset>
          <fieldset>
            <legend>Disc</legend>
            <Slider label="Ellipticity e (long radius a·(1 + e))" value={params.ellipticity} range={ELLIPTICITY_RANGE} unit="" decimals={4} onChange={(v) => change({ ellipticity: v })} testId="sim-ellipticity" />
            <Slider label="Axis of the long radius, from +x" value={params.axisDeg} range={AXIS_RANGE} unit="°" decimals={0} onChange={(v) => change({ axisDeg: v })} testId="sim-axis" />
            {rimDev !== null ? (
              <p className={`lb-small ${tol !== null && rimDev > tol ? 'lb-warn' : 'muted'}`}>
                {rimDev > 0 ? `The rim departs from round by up to ${fmtLength(rimDev, 3)}` : 'The disc is round'}
                {tol !== null ? `; the 10 % rule allows about ${fmtLength(tol, 3)} here (common practice, no published source)` : ''}.
                {tol !== null && rimDev > tol ? ' Expect the spot to break into a small four-cusped figure.' : ''}
              </p>
            ) : null}
          </fieldset>
          <fieldset>
            <legend>Model</legend>
            <label className="sim-radio">
              <input type="radio" name="sim-model" checked={params.model === 'fast'} onChange={() => change({ model: 'fast' as SimModel })} data-testid="sim-model-fast" /> Fast (rim integral)
            </label>
            <label className="sim-radio">
              <input type="radio" name="sim-model" checked={params.model === 'reference'} onChange={() => change({ model: 'reference' as SimModel })} data-testid="sim-model-reference" /> Reference (slower,
              independent)
            </label>
            <label className="sim-radio" htmlFor={ids.auto}>
              <input id={ids.auto} type="checkbox" checked={auto} disabled={params.model !== 'fast'} onChange={(e) => setAuto(e.target.checked)} /> Update by itself when a slider stops (fast
              model only)
            </label>
          </fieldset>
          <div className="lb-actions">
            <button type="button" onClick={() => { touched.current = true; setParams({ ...zeroParams(params.model) }); }}>
              All to zero
            </button>
            <button type="button" onClick={() => { touched.current = true; setParams({ ...startParams, model: params.model }); }}>
              Back to the starting values
            </button>
          </div>
        </form>

        <div className="sim-views">
          <div className="sim-runbar">
            <button type="button" className="primary" onClick={() => void run(params)} disabled={!setup || running} data-testid="sim-run">
              Simulate
            </button>
            {running ? (
              <ProgressBar
                fraction={status?.fraction ?? 0}
                stage={status?.stage || 'Starting the simulation'}
                elapsedMs={status?.elapsedMs}
                onCancel={cancel}
                cancelling={cancelling}
                cancelTestId="sim-cancel"
                testId="sim-progress"
              />
            ) : (
              <span className="muted">{endNote ?? (params.model === 'fast' && auto ? 'The fast model also runs by itself when a slider stops.' : 'Press Simulate to run the model.')}</span>
            )}
          </div>
          <div className="sim-view-opts">
            <label htmlFor={ids.scale}>Brightness scale</label>
            <select id={ids.scale} value={scale} onChange={(e) => setScale(e.target.value as 'linear' | 'log')}>
              <option value="linear">linear</option>
              <option value="log">log (shows faint rings)</option>
            </select>
            <label htmlFor={ids.cmap}>Colours</label>
            <select id={ids.cmap} value={colormap} onChange={(e) => setColormap(e.target.value as 'viridis' | 'cividis')}>
              <option value="viridis">viridis</option>
              <option value="cividis">cividis (colour-blind safe)</option>
            </select>
          </div>
          <div className="sim-load">
            <label htmlFor={ids.file} className="sim-filelabel">
              Measured frame to compare:
            </label>
            <input id={ids.file} type="file" accept=".png,.tif,.tiff,.npy,.fits,.fit" multiple onChange={(e) => void onFile(e)} disabled={!setup || loadingFrame} data-testid="sim-frame-file" />
            <span className="sim-or">or</span>
            {demoSets && demoSets.length > 1 ? (
              <>
                <label htmlFor={ids.demo} className="lb-sr">
                  Demo frame
                </label>
                <select id={ids.demo} value={demoPick} onChange={(e) => setDemoPick(e.target.value)} data-testid="sim-demo-pick">
                  {demoSets.map((s, k) => (
                    <option key={k} value={String(k)}>
                      {s.label}
                    </option>
                  ))}
                </select>
              </>
            ) : null}
            <button type="button" onClick={() => void showDemo()} disabled={loadingFrame} data-testid="sim-demo-frame">
              {loadingFrame ? 'Loading…' : demoSets ? 'Show this demo frame' : 'Show a demo frame (synthetic)'}
            </button>
          </div>
          <div className="sim-pair">
            <div className="sim-panel sim-simulated">
              <div className="sim-badge" aria-hidden="true">
                SIMULATED
              </div>
              {outcome ? (
                <ImageView
                  plane={outcome.image}
                  scale={scale}
                  colormap={colormap}
                  title={`Simulated shadow, ${outcome.model} model${stale ? ' (older settings)' : ''}`}
                  testId="sim-image"
                  width={IMAGE_WIDTH}
                  unit="intensity / incident"
                />
              ) : (
                <div className="sim-placeholder">{setup ? 'The simulated shadow appears here.' : 'Loading the demo setup…'}</div>
              )}
            </div>
            <div className="sim-panel">
              <div className="sim-badge sim-badge-measured" aria-hidden="true">
                MEASURED
              </div>
              {measured ? (
                <ImageView plane={measured.preview.image} scale={scale} colormap={colormap} title={measured.label} testId="sim-measured" width={IMAGE_WIDTH} unit="counts" />
              ) : (
                <div className="sim-placeholder">A measured frame, for comparison, appears here.</div>
              )}
            </div>
          </div>
          {outcome?.notes.length || measured?.preview.warnings.length ? (
            <ul className="lb-notes muted">
              {(outcome?.notes ?? []).map((n) => (
                <li key={`s-${n}`}>Simulated: {n}</li>
              ))}
              {(measured?.preview.warnings ?? []).map((w) => (
                <li key={`m-${w}`}>Measured frame: {w}</li>
              ))}
            </ul>
          ) : null}
        </div>
      </div>
    </section>
  );
}

function Slider(props: { label: string; value: number; range: SliderRange; unit: string; decimals: number; onChange: (v: number) => void; testId?: string }): JSX.Element {
  const id = useId();
  const numId = useId();
  const { range } = props;
  return (
    <div className="sim-slider">
      <label htmlFor={id}>{props.label}</label>
      <input
        id={id}
        type="range"
        min={range.min}
        max={range.max}
        step={range.step}
        value={props.value}
        onChange={(e) => props.onChange(Number(e.target.value))}
        data-testid={props.testId}
      />
      <label htmlFor={numId} className="lb-sr">
        {props.label}, exact value
      </label>
      <input
        id={numId}
        type="number"
        className="sim-num"
        min={range.min}
        max={range.max}
        step={range.step}
        value={Number(props.value.toFixed(props.decimals))}
        onChange={(e) => {
          const v = Number(e.target.value);
          if (e.target.value.trim() !== '' && Number.isFinite(v)) props.onChange(Math.min(range.max, Math.max(range.min, v)));
        }}
      />
      <span className="sim-unit">{props.unit}</span>
    </div>
  );
}
