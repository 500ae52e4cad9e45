/**
 * Discs: the disc library (each disc's calibration: ellipticity and axis with 1σ, date, method) and the
 * disc calibration: frames taken with the disc turned to several angles in its holder (at least 0° and
 * 90°), fitted together with the beam (or with the beam declared ideal), run as a job with progress and
 * Cancel. The result shows the disc's shape, the beam's coefficients, how well the two were told apart,
 * and whether it can be trusted; a trusted calibration can be stored in the library.
 */
import { useRef, useState } from 'react';
import type { ChangeEvent, JSX } from 'react';
import type { DiscCalibrationOutcome, SetupJson } from '../../../shared/contract.ts';
import type { Disc } from '../../../../core/logbook/types.ts';
import type { DiscProfile } from '../../../../core/fit/disc/profile.ts';
import { SAFETY_POINTS, SAFETY_TITLE } from '../../../../core/safety.ts';
import { zernikeName } from '../../../../core/zernike/zernike-name.ts';
import { JobProgress } from '../components/ProgressBar.tsx';
import { readFiles } from '../lib/session.ts';
import type { Session } from '../lib/session.ts';
import { discNamed, profileOf, type AngleSlot, type CalibrationUsed, type DiscCalibrationState } from '../lib/discCalibration.ts';
import { getAt } from '../lib/jsonPath.ts';
import { fmtNum, fmtPm } from '../lib/format.ts';

const deg = (rad: number) => (rad * 180) / Math.PI;
const FRAME_ACCEPT = '.png,.tif,.tiff,.pgm,.npy,image/png,image/tiff';

/** "value ± sigma" in degrees. */
function fmtDeg(rad: number, sigmaRad: number): string {
  if (!Number.isFinite(sigmaRad)) return `${fmtNum(deg(rad), 3)}° ± ?`;
  const s = deg(sigmaRad);
  const d = s >= 10 ? 0 : s >= 1 ? 1 : 2;
  return `${deg(rad).toFixed(d)}° ± ${s.toFixed(d)}°`;
}

/** A setup's main figures in a line, from its own text fields (the service checks the setup when the calibration starts). */
function setupSummary(s: SetupJson | null | undefined): string {
  if (!s) return 'none yet';
  const part = (p: string) => {
    const v = getAt(s, p);
    return typeof v === 'string' || typeof v === 'number' ? String(v) : '?';
  };
  return `λ ${part('wavelength')}, disc ${part('disc.diameter')}, camera at ${part('camera.distance')}, pixels ${part('camera.pixelPitch')}`;
}

export function DiscScreen(props: { state: DiscCalibrationState; session: Session }): JSX.Element {
  const { state, session } = props;
  const { job } = state;
  const setupFileRef = useRef<HTMLInputElement>(null);
  const reflection = SAFETY_POINTS.find((p) => /reflect/i.test(p));
  const officer = SAFETY_POINTS.find((p) => /officer/i.test(p));
  const noFrames = state.slots.some((s) => s.frames.length === 0);
  const setupMissing = state.setupSource === 'file' ? !state.fileSetup : state.setupSource === 'session' ? !session.setup : false;

  const openSetupFile = async (e: ChangeEvent<HTMLInputElement>): Promise<void> => {
    const file = e.target.files?.[0];
    e.target.value = '';
    if (!file) return;
    let parsed: unknown;
    try {
      parsed = JSON.parse(await file.text());
    } catch (err) {
      session.onError({ kind: 'setup-file', file: file.name, message: `${file.name}: this is not a readable setup file (not valid JSON: ${(err as Error).message}). Nothing was changed.` });
      return;
    }
    if (!parsed || typeof parsed !== 'object' || Array.isArray(parsed)) {
      session.onError({ kind: 'setup-file', file: file.name, message: `${file.name}: a setup file holds one JSON object with "format": "shadowfront-setup/1". Nothing was changed.` });
      return;
    }
    state.setFileSetup({ name: file.name, setup: parsed as SetupJson });
    state.setSetupSource('file');
  };

  const shownSetup = state.setupSource === 'session' ? session.setup : state.setupSource === 'file' ? state.fileSetup?.setup : null;

  return (
    <div className="screen disc-screen" data-testid="disc-screen">
      <header className="screen-head">
        <h2>Discs</h2>
        <span className="muted">Measure a disc's shape once, by turning it in its holder; later fits with that disc then tell its shape apart from the beam's astigmatism.</span>
      </header>

      <section className="caution" role="note" data-testid="disc-caution">
        <strong>⚠ {SAFETY_TITLE}.</strong> {reflection} Turn the disc with the beam blocked, and check for stray reflections after every turn. {officer}
      </section>

      <DiscLibrary library={state.library} loaded={state.libraryLoaded} onRefresh={state.refreshLibrary} highlight={state.saved?.id ?? null} />

      <div className="disc-layout">
        <section className="panel disc-form" aria-label="Disc calibration">
          <h3>Calibrate a disc</h3>
          <fieldset className="field-group">
            <legend>Bench setup of the frames</legend>
            <div className="radio-list">
              <label>
                <input type="radio" name="disc-setup" checked={state.setupSource === 'session'} onChange={() => state.setSetupSource('session')} data-testid="disc-setup-session" />
                the Bench setup screen's setup
              </label>
              <label>
                <input type="radio" name="disc-setup" checked={state.setupSource === 'demo'} onChange={() => state.setSetupSource('demo')} data-testid="disc-setup-demo" />
                the demo setup (synthetic)
              </label>
              <label>
                <input type="radio" name="disc-setup" checked={state.setupSource === 'file'} onChange={() => (state.fileSetup ? state.setSetupSource('file') : setupFileRef.current?.click())} data-testid="disc-setup-file-choice" />
                a setup file{state.fileSetup ? `: ${state.fileSetup.name}` : ''}
              </label>
              <button type="button" className="small" onClick={() => setupFileRef.current?.click()}>
                Open setup file…
              </button>
              <input ref={setupFileRef} className="visually-hidden" type="file" accept=".json,application/json" tabIndex={-1} onChange={(e) => void openSetupFile(e)} data-testid="disc-setup-file" />
            </div>
            <p className="muted small-text" data-testid="disc-setup-summary">
              {state.setupSource === 'demo' ? 'The demo bench (synthetic); its setup is read when the calibration starts.' : setupSummary(shownSetup)}. Give the disc as round in the setup: its
              shape is what is measured.
            </p>
          </fieldset>

          <fieldset className="field-group">
            <legend>Frames per disc angle</legend>
            <p className="muted small-text">
              The disc's rotation in its holder, counter-clockwise seen from the laser looking downstream: degrees, or with a unit ("1.5708 rad"). Frames of one angle are averaged.
            </p>
            <ol className="angle-list">
              {state.slots.map((s, i) => (
                <AngleRow key={s.key} slot={s} index={i} state={state} onError={session.onError} canRemove={state.slots.length > 1} disabled={job.running} />
              ))}
            </ol>
            <button type="button" className="small" onClick={state.addSlot} disabled={job.running} data-testid="disc-add-angle">
              Add another angle
            </button>
          </fieldset>

          <fieldset className="field-group">
            <legend>Beam</legend>
            <div className="radio-list">
              <label>
                <input type="radio" name="disc-beam" checked={state.beam === 'fit'} onChange={() => state.setBeam('fit')} data-testid="disc-beam-fit" />
                fit the beam together with the disc (at least two angles, e.g. 0° and 90°)
              </label>
              <label>
                <input type="radio" name="disc-beam" checked={state.beam === 'ideal'} onChange={() => state.setBeam('ideal')} data-testid="disc-beam-ideal" />
                declare the beam ideal: a reference beam without aberrations (one angle is enough)
              </label>
              <label>
                <input type="checkbox" checked={state.harmonics} onChange={(e) => state.setHarmonics(e.target.checked)} data-testid="disc-harmonics" />
                also fit the edge harmonics of orders 3 and 4
              </label>
            </div>
          </fieldset>

          <div className="field">
            <label htmlFor="disc-name">Disc name (for the library)</label>
            <input id="disc-name" list="disc-name-list" value={state.name} onChange={(e) => state.setName(e.target.value)} placeholder="e.g. steel disc 3 mm #2" data-testid="disc-name" />
            <datalist id="disc-name-list">
              {state.library.map((d) => (
                <option key={d.id} value={d.name} />
              ))}
            </datalist>
            <span className="field-hint">a new name adds the disc; an existing one stores the calibration with that disc</span>
          </div>

          <div className="toolbar">
            <button type="button" className="primary" onClick={() => state.run(session.setup)} disabled={job.running || noFrames || setupMissing} data-testid="disc-run">
              Calibrate
            </button>
            {noFrames ? <span className="muted small-text">Open frames for every angle (or remove the angle).</span> : null}
            {!noFrames && setupMissing ? <span className="muted small-text">Choose the bench setup of these frames.</span> : null}
          </div>
          <JobProgress job={job} onCancel={job.cancel} testId="disc-progress" cancelTestId="disc-cancel" />
        </section>

        {job.value && state.used && !job.running ? (
          <CalibrationResult outcome={job.value} used={state.used} state={state} />
        ) : (
          <section className="panel muted disc-result-placeholder">
            {job.running ? 'Calibrating… the result appears here.' : 'The calibration result appears here: the disc shape, the beam, and whether the two were told apart.'}
          </section>
        )}
      </div>
    </div>
  );
}

function AngleRow(props: { slot: AngleSlot; index: number; state: DiscCalibrationState; onError: (p: { kind: string; message: string }) => void; canRemove: boolean; disabled: boolean }): JSX.Element {
  const { slot, index: i, state, canRemove, disabled } = props;
  const frameRef = useRef<HTMLInputElement>(null);
  const darkRef = useRef<HTMLInputElement>(null);
  const onFiles = async (e: ChangeEvent<HTMLInputElement>, role: 'frames' | 'darks'): Promise<void> => {
    const list = e.target.files ? [...e.target.files] : [];
    e.target.value = '';
    if (!list.length) return;
    const blobs = await readFiles(list);
    state.updateSlot(slot.key, role === 'frames' ? { frames: [...slot.frames, ...blobs] } : { darks: [...slot.darks, ...blobs] });
  };
  const angleId = `disc-angle-input-${slot.key}`;
  return (
    <li className="angle-row" data-testid={`disc-slot-${i}`}>
      <div className="field field-inline">
        <label htmlFor={angleId}>Angle {i + 1}</label>
        <input id={angleId} type="text" className="input-short" value={slot.angle} onChange={(e) => state.updateSlot(slot.key, { angle: e.target.value })} placeholder="e.g. 90" disabled={disabled} data-testid={`disc-angle-${i}`} />
        <span className="field-unit">degrees, unless a unit is given</span>
      </div>
      <div className="angle-files">
        <button type="button" className="small" onClick={() => frameRef.current?.click()} disabled={disabled}>
          Open frames…
        </button>
        <input ref={frameRef} className="visually-hidden" type="file" multiple accept={FRAME_ACCEPT} tabIndex={-1} onChange={(e) => void onFiles(e, 'frames')} data-testid={`disc-frames-${i}`} />
        <button type="button" className="small" onClick={() => darkRef.current?.click()} disabled={disabled}>
          Dark frames…
        </button>
        <input ref={darkRef} className="visually-hidden" type="file" multiple accept={FRAME_ACCEPT} tabIndex={-1} onChange={(e) => void onFiles(e, 'darks')} data-testid={`disc-darks-${i}`} />
        <span className="small-text file-names" data-testid={`disc-files-${i}`}>
          {slot.frames.length === 0 ? <span className="muted">no frames</span> : slot.frames.map((f) => f.name).join(', ')}
          {slot.darks.length ? <span className="muted"> · {slot.darks.length} dark</span> : null}
        </span>
        {slot.frames.length + slot.darks.length > 0 ? (
          <button type="button" className="small" onClick={() => state.updateSlot(slot.key, { frames: [], darks: [] })} disabled={disabled} aria-label={`Clear the files of angle ${i + 1}`}>
            Clear
          </button>
        ) : null}
        {canRemove ? (
          <button type="button" className="small" onClick={() => state.removeSlot(slot.key)} disabled={disabled} aria-label={`Remove angle ${i + 1}`}>
            Remove
          </button>
        ) : null}
      </div>
    </li>
  );
}

function statusOf(d: Disc, p: DiscProfile | null): { text: string; cls: string } {
  if (d.calibration === null || d.calibration === undefined) return { text: 'not calibrated', cls: 'badge-none' };
  if (!p) return { text: 'other calibration data', cls: 'badge-none' };
  return p.trusted ? { text: 'calibrated', cls: 'badge-pass' } : { text: 'not trusted', cls: 'badge-warn' };
}

function DiscLibrary(props: { library: Disc[]; loaded: boolean; onRefresh: () => void; highlight: number | null }): JSX.Element {
  const { library, loaded, onRefresh, highlight } = props;
  return (
    <section className="panel disc-library" aria-label="Disc library">
      <div className="toolbar compact">
        <h3>Disc library</h3>
        <button type="button" className="small" onClick={onRefresh}>
          Refresh
        </button>
      </div>
      {!loaded ? (
        <p className="muted">Reading the logbook…</p>
      ) : library.length === 0 ? (
        <p className="muted small-text" data-testid="disc-list-empty">
          No discs in the library yet: a calibration stored here adds its disc.
        </p>
      ) : null}
      <div className="table-scroll">
        <table className="data-table disc-table" data-testid="disc-list">
          <thead>
            <tr>
              <th scope="col">Disc</th>
              <th scope="col">Status</th>
              <th scope="col" className="num">Ellipticity e</th>
              <th scope="col" className="num">Axis</th>
              <th scope="col">Calibrated</th>
              <th scope="col">Method</th>
            </tr>
          </thead>
          <tbody>
            {library.map((d) => {
              const p = profileOf(d);
              const st = statusOf(d, p);
              return (
                <tr key={d.id} data-testid="disc-row" data-id={d.id} data-name={d.name} className={highlight === d.id ? 'just-saved' : undefined}>
                  <th scope="row">
                    #{d.id} {d.name}
                    <div className="muted small-text">⌀ {fmtNum(d.nominalDiameterM * 1e3, 4)} mm</div>
                  </th>
                  <td>
                    <span className={`badge ${st.cls}`}>{st.text}</span>
                  </td>
                  <td className="num">
                    {p ? fmtPm(p.ellipticity, p.sigmaEllipticity) : '—'}
                    {p ? <div className="muted small-text">e·a = {fmtPm(p.ellipticity * p.radiusM * 1e6, p.sigmaEllipticity * p.radiusM * 1e6)} µm</div> : null}
                  </td>
                  <td className="num">{p ? fmtDeg(p.axisRad, p.sigmaAxisRad) : '—'}</td>
                  <td>{p ? p.calibratedAt.slice(0, 10) : '—'}</td>
                  <td>{p ? (p.method === 'rotation' ? 'disc turned, beam fitted' : `reference beam (${p.beam})`) : '—'}</td>
                </tr>
              );
            })}
          </tbody>
        </table>
      </div>
    </section>
  );
}

/** How well one disc order was told apart from the beam's terms of the same azimuthal order, in plain words. */
function separationWords(s: DiscProfile['separation'][number], degenerate: boolean): string {
  const what = s.order === 2 ? 'The disc ellipticity (order 2)' : `The disc edge harmonic of order ${s.order}`;
  const terms = s.beamTerms.map((j) => `${zernikeName(j)} (j = ${j})`).join(' and ');
  const corr = Number.isFinite(s.maxAbsCorrelation) ? s.maxAbsCorrelation.toFixed(3) : 'not known';
  const spread = `the disc angles spread ${s.angleSpread.toFixed(2)} (1 = the best spread for this order, 0 = all at one angle)`;
  const verdict =
    degenerate && (s.angleSpread < 1e-6 || !(s.maxAbsCorrelation <= 0.95))
      ? 'they cannot be told apart'
      : s.maxAbsCorrelation < 0.5
        ? 'they are told apart well'
        : 'they are told apart, but still influence each other';
  return `${what} looks like the beam's ${terms} on the rim; ${spread}, and their largest correlation is ${corr}: ${verdict}.`;
}

function CalibrationResult(props: { outcome: DiscCalibrationOutcome; used: CalibrationUsed; state: DiscCalibrationState }): JSX.Element {
  const { outcome, used, state } = props;
  const p = outcome.profile;
  const fit = outcome.fit;
  const a = p.radiusM;
  const existing = discNamed(state.library, state.name);
  const hasCalibration = !!existing && existing.calibration !== null && existing.calibration !== undefined;
  const [confirm, setConfirm] = useState(false);
  const savedHere = state.saved;
  const existingWhen = hasCalibration ? (existing!.calibration as { calibratedAt?: unknown }).calibratedAt : undefined;

  return (
    <section className="panel disc-result" data-testid="disc-result" aria-label="Calibration result">
      <h3>
        Calibration result{' '}
        <span className={`badge ${outcome.trusted ? 'badge-pass' : 'badge-fail'}`} data-testid="disc-trusted" data-trusted={outcome.trusted ? 'yes' : 'no'}>
          {outcome.trusted ? '✓ trusted' : '✗ not trusted'}
        </span>
      </h3>
      <p className="muted small-text">
        {p.method === 'rotation' ? 'Disc turned, beam fitted with it' : `Reference beam (${p.beam})`} · disc angles {p.anglesRad.map((r) => `${Number(deg(r).toFixed(3))}°`).join(', ')} · {used.setupLabel} ·
        frames {p.frames.join(', ')}
      </p>
      {outcome.degenerate ? (
        <div className="untrusted" role="alert" data-testid="disc-degenerate">
          <strong>The disc's shape could not be told apart from the beam.</strong> Its ellipticity and the beam's astigmatism look the same on the rim when every frame has the disc at one angle.
          Take frames with the disc turned by 90°, or declare the beam ideal (a reference beam), and calibrate again. This calibration cannot be stored.
        </div>
      ) : !outcome.trusted ? (
        <div className="untrusted" role="alert">
          <strong>Do not use this calibration.</strong> The fit is suspect (see the warnings); check the setup and the frames, then calibrate again.
        </div>
      ) : null}

      <div className="disc-result-grid">
        <div>
          <h4>Disc shape (its own frame, at angle 0)</h4>
          <dl className="figures big-figures">
            <dt>Ellipticity e</dt>
            <dd data-testid="disc-ellipticity">{fmtPm(p.ellipticity, p.sigmaEllipticity)}</dd>
            <dt>e·a</dt>
            <dd>
              {fmtPm(p.ellipticity * a * 1e6, p.sigmaEllipticity * a * 1e6)} µm
              <div className="muted small-text">radius difference, a = {fmtNum(a * 1e3, 4)} mm</div>
            </dd>
            <dt>Long axis</dt>
            <dd data-testid="disc-axis">{fmtDeg(p.axisRad, p.sigmaAxisRad)}</dd>
          </dl>
          <p className="muted small-text">The long axis is counter-clockwise from +x, seen from the laser, with the disc at angle 0.</p>
          {p.harmonics.length ? (
            <table className="data-table" data-testid="disc-harmonics-table">
              <caption>Edge harmonics, ± 1σ</caption>
              <thead>
                <tr>
                  <th scope="col">order</th>
                  <th scope="col" className="num">amplitude (µm)</th>
                  <th scope="col" className="num">phase</th>
                </tr>
              </thead>
              <tbody>
                {p.harmonics.map((h) => (
                  <tr key={h.order}>
                    <td>{h.order}</td>
                    <td className="num">{fmtPm(h.amplitudeM * 1e6, h.sigmaAmplitudeM * 1e6)}</td>
                    <td className="num">{fmtDeg(h.phaseRad, h.sigmaPhaseRad)}</td>
                  </tr>
                ))}
              </tbody>
            </table>
          ) : null}
          <h4>Disc and beam told apart?</h4>
          <div data-testid="disc-separation">
            {p.separation.filter((s) => s.beamTerms.length > 0).length === 0 ? (
              <p className="muted small-text">No beam term of the same azimuthal order was fitted: nothing to tell apart.</p>
            ) : (
              p.separation
                .filter((s) => s.beamTerms.length > 0)
                .map((s) => (
                  <p key={s.order} className="small-text">
                    {separationWords(s, outcome.degenerate)}
                  </p>
                ))
            )}
          </div>
        </div>
        <div>
          <h4>The beam {p.beam === 'fitted' ? '(fitted with the disc)' : p.beam === 'ideal' ? '(declared ideal)' : '(taken as known)'}</h4>
          {p.beamTerms.length ? (
            <table className="data-table" data-testid="disc-beam-table">
              <caption className="small-text">
                Zernike (ANSI, unit RMS) over r = {fmtNum(fit.zernike.radius_m * 1e3, 4)} mm, waves ± 1σ
              </caption>
              <tbody>
                {p.beamTerms.map((t) => (
                  <tr key={t.j}>
                    <th scope="row">{zernikeName(t.j)}</th>
                    <td>{t.j}</td>
                    <td className="num">{t.sigmaWaves === null ? `${fmtNum(t.waves, 4)} (known)` : fmtPm(t.waves, t.sigmaWaves)}</td>
                  </tr>
                ))}
              </tbody>
            </table>
          ) : (
            <p className="muted">No aberrations: the beam was declared ideal, only the disc was fitted.</p>
          )}
          <dl className="figures">
            <dt>χ² per degree of freedom</dt>
            <dd>
              {fmtNum(fit.chi2PerDof, 3)} <span className="muted">({fit.dof} dof)</span>
            </dd>
            <dt>Fit</dt>
            <dd>
              {fit.termination} after {fit.iterations} iterations, {(fit.elapsedMs / 1000).toFixed(1)} s
            </dd>
          </dl>
        </div>
      </div>
      <details className="warnings disc-warnings" data-testid="disc-warnings" open={outcome.warnings.length <= 3}>
        <summary>
          {outcome.warnings.length === 0 ? 'No warnings.' : `${outcome.warnings.length} warning${outcome.warnings.length === 1 ? '' : 's'} in plain words`}
        </summary>
        {outcome.warnings.length ? (
          <ul>
            {outcome.warnings.map((w) => (
              <li key={w}>{w}</li>
            ))}
          </ul>
        ) : null}
      </details>

      <div className="disc-save-row">
        {savedHere ? (
          <p className="ok-text" data-testid="disc-saved" data-id={savedHere.id}>
            {savedHere.created ? 'Stored as new disc' : savedHere.replaced ? 'Replaced the calibration of disc' : 'Stored the calibration of disc'} #{savedHere.id} "{savedHere.name}" in the disc library.
          </p>
        ) : !outcome.trusted ? (
          <p className="muted small-text">Only a trusted calibration can be stored in the disc library.</p>
        ) : hasCalibration && confirm ? (
          <div className="confirm-replace" role="alertdialog" aria-label="Replace the calibration?">
            <span>
              Disc #{existing!.id} "{existing!.name}" already has a calibration{typeof existingWhen === 'string' ? ` (made ${existingWhen.slice(0, 10)})` : ''}. Replace it with this one?
            </span>
            <button type="button" className="danger" onClick={() => void state.save(true).then(() => setConfirm(false))} disabled={state.saving} data-testid="disc-save-replace">
              Yes, replace it
            </button>
            <button type="button" onClick={() => setConfirm(false)} disabled={state.saving}>
              Keep the old one
            </button>
          </div>
        ) : (
          <>
            <span className="small-text">
              {state.name.trim() ? (
                <>
                  Store under <strong>{state.name.trim()}</strong>
                  {existing ? ` (disc #${existing.id}${hasCalibration ? ', which already has a calibration' : ''})` : ' (a new disc)'}
                  {existing && Math.abs(2 * a - existing.nominalDiameterM) > 0.01 * existing.nominalDiameterM ? (
                    <span className="warn-text" data-testid="disc-size-mismatch">
                      {' '}
                      · the setup of this calibration has a {fmtNum(2 * a * 1e3, 4)} mm disc, the library lists this disc as {fmtNum(existing.nominalDiameterM * 1e3, 4)} mm
                    </span>
                  ) : null}
                </>
              ) : (
                <span className="muted">Give the disc a name above to store the calibration.</span>
              )}
            </span>
            <button
              type="button"
              className="primary"
              onClick={() => (hasCalibration ? setConfirm(true) : void state.save(false))}
              disabled={state.saving || !state.name.trim()}
              data-testid="disc-save"
            >
              {state.saving ? 'Saving…' : 'Save to disc library'}
            </button>
          </>
        )}
      </div>
    </section>
  );
}
