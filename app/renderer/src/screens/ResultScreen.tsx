/**
 * Result: choose the Zernike terms (and, when the disc's shape is calibrated, the library disc and how far it
 * is turned), run the fit (a job with progress and Cancel), and read the result:
 * coefficients in waves and nm with 1σ, RMS, peak-to-valley and Strehl against the asset's limits, the fit's
 * health (χ²/dof, termination, trusted), the wavefront map, measured / model / residual images, the radial
 * profile, the warnings; then save it to the logbook with tags and notes.
 */
import { useEffect, useMemo, useState } from 'react';
import type { JSX } from 'react';
import type { FitOutcome, ImagePlane } from '../../../shared/contract.ts';
import type { FitResult } from '../../../../core/fit/result.ts';
import { zernikeName } from '../../../../core/zernike/zernike-name.ts';
import { ImageView } from '../components/ImageView.tsx';
import { ProfileChart } from '../components/ProfileChart.tsx';
import { JobProgress } from '../components/ProgressBar.tsx';
import { calibratedDiscs, type FitUsed, type Session } from '../lib/session.ts';
import { fmtLength, fmtNum, fmtPm } from '../lib/format.ts';

export const DEFAULT_TERMS = [3, 4, 5, 7, 8] as const;
export const OPTIONAL_TERMS = [6, 9, 12] as const;

export function ResultScreen(props: { session: Session }): JSX.Element {
  const { session } = props;
  const { fit, frameSet, startFit, cancelFit, assets, check, discs, refreshDiscs, onError } = session;
  const [terms, setTerms] = useState<number[]>([...DEFAULT_TERMS]);
  const [asset, setAsset] = useState('');
  const [disc, setDisc] = useState('');
  const [discAngle, setDiscAngle] = useState('0');

  // The library may have changed on the Discs screen: read it whenever this screen opens.
  useEffect(() => refreshDiscs(), [refreshDiscs]);
  const calibrated = useMemo(() => calibratedDiscs(discs), [discs]);

  const toggle = (j: number): void => setTerms((t) => (t.includes(j) ? t.filter((k) => k !== j) : [...t, j].sort((a, b) => a - b)));
  const canRun = frameSet.frames.length > 0 && !fit.running && terms.length > 0 && !check?.problem;

  const run = (): void => {
    let discAngleDeg: number | null = null;
    if (disc !== '') {
      const text = discAngle.trim();
      discAngleDeg = text === '' ? 0 : Number(text);
      if (!Number.isFinite(discAngleDeg)) {
        onError({ kind: 'invalid-input', field: 'discAngleDeg', message: `The disc angle "${discAngle}" is not a number of degrees; give e.g. 0 or 90.` });
        return;
      }
    }
    startFit({ terms, asset: asset || null, disc: disc === '' ? null : Number(disc), discAngleDeg });
  };

  return (
    <div className="screen result-screen" data-testid="result-screen">
      <header className="screen-head">
        <h2>Result</h2>
        <span className="muted">
          {frameSet.frames.length === 0 ? 'No frames loaded: open them on the Frames screen.' : `Frames: ${frameSet.label}${frameSet.darks.length ? `, ${frameSet.darks.length} dark` : ''}`}
        </span>
      </header>

      <section className="panel fit-controls" aria-label="Fit settings">
        <fieldset className="terms">
          <legend>Terms to fit (ANSI j)</legend>
          {[...DEFAULT_TERMS, ...OPTIONAL_TERMS].map((j) => (
            <label key={j} className={OPTIONAL_TERMS.includes(j as 6) ? 'term optional' : 'term'}>
              <input type="checkbox" checked={terms.includes(j)} onChange={() => toggle(j)} disabled={fit.running} data-testid={`term-${j}`} />
              {j} {zernikeName(j)}
            </label>
          ))}
        </fieldset>
        <div className="fit-run">
          <div className="field">
            <label htmlFor="fit-asset">Asset (for its limits)</label>
            <select id="fit-asset" value={asset} onChange={(e) => setAsset(e.target.value)} disabled={fit.running} data-testid="fit-asset">
              <option value="">none</option>
              {assets.map((a) => (
                <option key={a.id} value={a.name}>
                  {a.name}
                </option>
              ))}
            </select>
          </div>
          <div className="field">
            <label htmlFor="fit-disc">Disc</label>
            <select id="fit-disc" value={disc} onChange={(e) => setDisc(e.target.value)} disabled={fit.running} data-testid="fit-disc">
              <option value="">not calibrated / none</option>
              {calibrated.map((d) => (
                <option key={d.id} value={String(d.id)}>
                  #{d.id} {d.name}
                </option>
              ))}
            </select>
          </div>
          <div className="field">
            <label htmlFor="fit-disc-angle">Disc angle (°)</label>
            <input
              id="fit-disc-angle"
              className="input-short"
              type="number"
              step="any"
              value={discAngle}
              onChange={(e) => setDiscAngle(e.target.value)}
              disabled={fit.running || disc === ''}
              title="How far the disc is turned from its calibrated position, counter-clockwise seen from the laser"
              data-testid="fit-disc-angle"
            />
          </div>
          <button type="button" className="primary" onClick={run} disabled={!canRun} data-testid="run-fit">
            Run fit
          </button>
        </div>
        {terms.includes(4) && terms.includes(12) ? (
          <p className="warn-text small-text">Defocus (4) and spherical (12) look alike at the rim; fitted together their values are less certain.</p>
        ) : null}
        <JobProgress job={fit} onCancel={cancelFit} testId="fit-progress" cancelTestId="cancel-fit" />
      </section>

      {fit.outcome && fit.used && !fit.running ? <Outcome outcome={fit.outcome} used={fit.used} session={session} /> : null}
    </div>
  );
}

function Outcome(props: { outcome: FitOutcome; used: FitUsed; session: Session }): JSX.Element {
  const { outcome, used, session } = props;
  const r = outcome.result;
  const lambdaNm = r.wavelength_m * 1e9;
  const range = useMemo(() => sharedRange(outcome.measured, outcome.model), [outcome]);
  const fitted = r.zernike.terms.map((t) => t.j).join(', ');
  return (
    <div className="outcome">
      {!r.trusted ? (
        <div className="untrusted" role="alert" data-testid="untrusted">
          <strong>Do not use these coefficients.</strong> The fit probably stopped in a wrong minimum: χ² and the pattern of the residuals say so. Check the bench setup
          (distance, disc size, pixel pitch) and the region, then run the fit again.
        </div>
      ) : null}

      <section className="panel outcome-actions" aria-label="Verdict and saving">
        <VerdictBadge outcome={outcome} />
        <SavePanel session={session} used={used} result={r} />
      </section>

      <div className="outcome-top">
        <section className="panel summary" aria-label="Summary">
          <p className="muted small-text summary-head">
            {used.label} · terms {fitted} · λ = {fmtNum(lambdaNm, 5)} nm · coefficients over a radius of {fmtLength(r.zernike.radius_m)}
          </p>
          <dl className="figures big-figures">
            <dt>RMS wavefront error</dt>
            <dd data-testid="rms">
              {fmtPm(r.rmsWaves, r.sigmaRmsWaves)} waves <span className="muted">({fmtNum(r.rmsWaves * lambdaNm, 3)} nm)</span>
            </dd>
            <dt>Peak-to-valley</dt>
            <dd data-testid="pv">
              {fmtNum(r.pvWaves, 3)} waves <span className="muted">({fmtNum(r.pvWaves * lambdaNm, 3)} nm)</span>
            </dd>
            <dt>Strehl ratio (Maréchal)</dt>
            <dd data-testid="strehl">{fmtPm(r.strehl, r.sigmaStrehl)}</dd>
          </dl>
          <p className="muted small-text">RMS, peak-to-valley and Strehl cover the fitted terms without piston and tilt. Strehl from exp(−(2πσ)²).</p>
          <dl className="figures">
            <dt>χ² per degree of freedom</dt>
            <dd data-testid="chi2">
              {fmtNum(r.chi2PerDof, 3)} <span className="muted">({r.dof} dof)</span>
            </dd>
            <dt>Termination</dt>
            <dd data-testid="termination">
              {r.termination} after {r.iterations} iterations, {(r.elapsedMs / 1000).toFixed(1)} s
            </dd>
            <dt>Trusted</dt>
            <dd data-testid="trusted" className={r.trusted ? 'ok-text' : 'bad-text'}>
              {r.trusted ? 'yes' : 'NO: see above'}
            </dd>
            {r.residualCurvatureRadius_m !== null ? (
              <>
                <dt>Residual curvature radius</dt>
                <dd>
                  {fmtLength(Math.abs(r.residualCurvatureRadius_m))} {r.residualCurvatureRadius_m > 0 ? '(diverging)' : '(converging)'}
                </dd>
              </>
            ) : null}
            {r.disc ? (
              <>
                <dt>Disc profile used</dt>
                <dd data-testid="result-disc">
                  {r.disc.id !== null ? `#${r.disc.id} ` : ''}
                  {r.disc.name}{' '}
                  <span className="muted">
                    (calibrated {r.disc.calibratedAt.slice(0, 10)}
                    {used.discAngleDeg ? `; turned ${fmtNum(used.discAngleDeg, 4)}°` : ''})
                  </span>
                </dd>
              </>
            ) : null}
            <dt>Pattern centre (camera)</dt>
            <dd>
              ({fmtLength(r.center_m[0], 3)}, {fmtLength(r.center_m[1], 3)})
            </dd>
          </dl>
        </section>
        <CoefficientTable result={r} />
        <ImageView plane={outcome.wavefront} colormap="diverging" symmetric testId="wavefront-map" title="Wavefront (fitted terms)" unit="waves" width={250} />
      </div>

      <section className="panel images" aria-label="Measured, model and residual">
        <div className="image-strip">
          <ImageView plane={outcome.measured} range={range} testId="measured-image" title="Measured" unit="counts" width={270} />
          <ImageView plane={outcome.model} range={range} testId="model-image" title="Model at the fitted values" unit="counts" width={270} />
          <ImageView plane={outcome.residual} colormap="diverging" symmetric testId="residual-image" title="Residual (measured − model) / σ" unit="σ" width={270} />
        </div>
      </section>

      <div className="outcome-bottom">
        <section className="panel">
          <ProfileChart profile={outcome.profile} testId="profile-chart" title="Radial profile about the fitted centre" width={600} height={240} />
        </section>
        <section className="panel">
          <h3>Warnings</h3>
          <div data-testid="result-warnings" className="warnings">
            {r.warnings.length === 0 ? (
              <p className="ok-text">None.</p>
            ) : (
              <ul>
                {r.warnings.map((w) => (
                  <li key={w}>{w}</li>
                ))}
              </ul>
            )}
          </div>
        </section>
      </div>
    </div>
  );
}

function sharedRange(a: ImagePlane, b: ImagePlane): [number, number] {
  let lo = Infinity;
  let hi = -Infinity;
  for (const p of [a, b]) {
    for (let i = 0; i < p.data.length; i++) {
      const v = p.data[i]!;
      if (!Number.isFinite(v)) continue;
      if (v < lo) lo = v;
      if (v > hi) hi = v;
    }
  }
  return Number.isFinite(lo) && hi > lo ? [lo, hi] : [0, 1];
}

function VerdictBadge(props: { outcome: FitOutcome }): JSX.Element {
  const v = props.outcome.verdict;
  if (!v) {
    return (
      <div className="verdict">
        <span className="badge badge-none big" data-testid="verdict-badge" data-level="none">
          no limits
        </span>
        <span className="muted small-text">Choose an asset with limits to get pass / warn / fail.</span>
      </div>
    );
  }
  const words = { pass: 'PASS', warn: 'WARN', fail: 'FAIL' } as const;
  return (
    <div className="verdict">
      <span className={`badge badge-${v.level} big`} data-testid="verdict-badge" data-level={v.level}>
        {v.level === 'pass' ? '✓ ' : v.level === 'warn' ? '! ' : '✗ '}
        {words[v.level]}
      </span>
      {v.reasons.length ? (
        <ul className="verdict-reasons small-text">
          {v.reasons.map((x) => (
            <li key={x}>{x}</li>
          ))}
        </ul>
      ) : null}
    </div>
  );
}

function CoefficientTable(props: { result: FitResult }): JSX.Element {
  const r = props.result;
  return (
    <section className="panel coefs">
      <table className="data-table" data-testid="result-table">
        <caption>Zernike coefficients (ANSI, unit RMS), ± 1σ</caption>
        <thead>
          <tr>
            <th scope="col">Term</th>
            <th scope="col">j</th>
            <th scope="col" className="num">
              waves
            </th>
            <th scope="col" className="num">
              nm
            </th>
          </tr>
        </thead>
        <tbody>
          {r.zernike.terms.map((t) => (
            <tr key={t.j} data-testid={`coef-row-${t.j}`}>
              <th scope="row">{t.name}</th>
              <td>{t.j}</td>
              <td className="num" data-testid={`coef-waves-${t.j}`}>
                {fmtPm(t.waves, t.sigmaWaves)}
              </td>
              <td className="num" data-testid={`coef-nm-${t.j}`}>
                {fmtPm(t.nm, t.sigmaNm)}
              </td>
            </tr>
          ))}
        </tbody>
      </table>
    </section>
  );
}

function SavePanel(props: { session: Session; used: FitUsed; result: FitResult }): JSX.Element {
  const { session, used, result } = props;
  const { api, onError, assets, refreshAssets } = session;
  const [open, setOpen] = useState(false);
  const [asset, setAsset] = useState(used.asset ?? '');
  const [tags, setTags] = useState('');
  const [notes, setNotes] = useState('');
  const [busy, setBusy] = useState(false);
  const [savedId, setSavedId] = useState<number | null>(null);

  const save = async (): Promise<void> => {
    if (!asset.trim()) {
      onError({ kind: 'logbook', field: 'asset', message: 'Name the asset (the laser or beam line) to save this measurement under.' });
      return;
    }
    setBusy(true);
    const reply = await api.logbook.save({
      asset: asset.trim(),
      tags: tags
        .split(',')
        .map((t) => t.trim())
        .filter(Boolean),
      notes,
      setup: used.setup,
      frames: used.frames,
      darks: used.darks,
      result,
    });
    setBusy(false);
    if (!reply.ok) {
      onError(reply.problem);
      return;
    }
    setSavedId(reply.value.id);
    setOpen(false);
    refreshAssets();
  };

  return (
    <div className="save-panel">
      {savedId !== null ? (
        <p className="ok-text" data-testid="save-done" data-id={savedId}>
          Saved to the logbook as measurement #{savedId}.
        </p>
      ) : null}
      {!open ? (
        <button type="button" className="primary" onClick={() => setOpen(true)} data-testid="save-to-logbook" disabled={savedId !== null}>
          {savedId !== null ? 'Saved' : 'Save to logbook…'}
        </button>
      ) : (
        <form
          className="save-form"
          onSubmit={(e) => {
            e.preventDefault();
            void save();
          }}
        >
          <div className="field">
            <label htmlFor="save-asset">Asset</label>
            <input id="save-asset" list="save-asset-list" value={asset} onChange={(e) => setAsset(e.target.value)} data-testid="save-asset" placeholder="e.g. HeNe bench 2" />
            <datalist id="save-asset-list">
              {assets.map((a) => (
                <option key={a.id} value={a.name} />
              ))}
            </datalist>
            <span className="field-hint">a new name adds the asset</span>
          </div>
          <div className="field">
            <label htmlFor="save-tags">Tags</label>
            <input id="save-tags" value={tags} onChange={(e) => setTags(e.target.value)} data-testid="save-tags" placeholder="e.g. weekly, after-cleaning" />
            <span className="field-hint">separated by commas</span>
          </div>
          <div className="field grow">
            <label htmlFor="save-notes">Notes</label>
            <textarea id="save-notes" rows={1} value={notes} onChange={(e) => setNotes(e.target.value)} data-testid="save-notes" placeholder="what was done, who, conditions" />
          </div>
          <div className="toolbar">
            <button type="submit" className="primary" disabled={busy} data-testid="save-confirm">
              {busy ? 'Saving…' : 'Save'}
            </button>
            <button type="button" onClick={() => setOpen(false)} disabled={busy}>
              Cancel
            </button>
          </div>
        </form>
      )}
    </div>
  );
}
