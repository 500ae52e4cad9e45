/**
 * Bench setup: the laser, the disc and the camera, typed with their units. The service checks the setup
 * as it is typed (setup.check) and names the field of any problem, shown beside that field; the derived
 * figures (effective distance, Fresnel zone width at the rim and the rim tolerance, spot and shadow size
 * on the sensor) follow live. Presets are saved per asset.
 */
import { useCallback, useEffect, useMemo, useRef, useState } from 'react';
import type { ChangeEvent, JSX } from 'react';
import type { DerivedFigures, SetupJson, SetupPreset } from '../../../shared/contract.ts';
import type { Session } from '../lib/session.ts';
import { FieldGroup, SelectField, TextField } from '../components/Fields.tsx';
import { getAt, pathMatches, setAt } from '../lib/jsonPath.ts';
import { fmtLength, fmtNum } from '../lib/format.ts';

type Kind = 'length' | 'angle' | 'number' | 'text' | 'curvature';

interface FieldDef {
  path: string;
  label: string;
  kind: Kind;
  hint: string;
  optional?: boolean;
  width?: 'short' | 'normal' | 'wide';
}

const LASER: FieldDef[] = [
  { path: 'wavelength', label: 'Wavelength', kind: 'length', hint: 'e.g. "632.8 nm"' },
  { path: 'beam.radius', label: 'Beam radius (1/e²) at the disc', kind: 'length', hint: 'e.g. "4 mm"' },
  { path: 'beam.center[0]', label: 'Beam centre x (from disc centre)', kind: 'length', hint: 'e.g. "0 mm"; both blank = centred' },
  { path: 'beam.center[1]', label: 'Beam centre y', kind: 'length', hint: 'e.g. "0 mm"' },
  { path: 'beam.curvatureRadius', label: 'Wavefront radius at the disc', kind: 'curvature', hint: '"collimated", or a length: + diverging, − converging' },
];

const DISC: FieldDef[] = [
  { path: 'disc.diameter', label: 'Disc diameter', kind: 'length', hint: 'e.g. "3 mm"' },
  { path: 'disc.ellipticity', label: 'Ellipticity e', kind: 'number', hint: 'plain number, |e| < 0.2; blank = 0', optional: true, width: 'short' },
  { path: 'disc.ellipseAngle', label: 'Ellipse axis angle', kind: 'angle', hint: 'e.g. "0 deg"', optional: true, width: 'short' },
];

const CAMERA: FieldDef[] = [
  { path: 'camera.distance', label: 'Disc to sensor distance', kind: 'length', hint: 'e.g. "0.8 m"' },
  { path: 'camera.pixelPitch', label: 'Pixel pitch', kind: 'length', hint: 'e.g. "5.5 um"', width: 'short' },
  { path: 'camera.bitDepth', label: 'Bit depth', kind: 'number', hint: 'whole number, 1 to 16', width: 'short' },
  { path: 'camera.saturation', label: 'Saturation level', kind: 'number', hint: 'counts; blank = 2^bits − 1', optional: true, width: 'short' },
  { path: 'camera.sensorSize[0]', label: 'Sensor width', kind: 'number', hint: 'pixels; both blank = not known', width: 'short' },
  { path: 'camera.sensorSize[1]', label: 'Sensor height', kind: 'number', hint: 'pixels', width: 'short' },
];

/** Fields that are a pair in the file: typing one keeps both entries; both blank removes the pair. */
const PAIRS = ['beam.center', 'camera.sensorSize'];

const OTHER: FieldDef[] = [
  { path: 'zernike.radius', label: 'Zernike normalisation radius', kind: 'length', hint: 'blank = the beam radius', optional: true },
  { path: 'source.size', label: 'Source size (diameter)', kind: 'length', hint: 'blank = point source', optional: true },
];

const ALL_PATHS = [...LASER, ...DISC, ...CAMERA, ...OTHER].map((f) => f.path).concat(['camera.orientation.flip', 'camera.orientation.rotate']);

const NUMBER_RE = /^[-+]?(\d+\.?\d*|\.\d+)([eE][-+]?\d+)?$/;

function displayValue(v: unknown): string {
  if (v === undefined || v === null) return '';
  if (typeof v === 'string') return v;
  if (typeof v === 'number') return String(v);
  return JSON.stringify(v);
}

/** Text typed into a field → the JSON value: numbers for plain-number fields, text otherwise; blank removes optional fields. */
function toJsonValue(def: FieldDef, text: string): unknown {
  const t = text.trim();
  if (t === '' && def.optional) return undefined;
  if (def.kind === 'number' && NUMBER_RE.test(t)) return Number(t);
  return text;
}

export function SetupScreen(props: { session: Session }): JSX.Element {
  const { session } = props;
  const { api, onError, setup, setSetup, check, checking, assets } = session;
  const fileRef = useRef<HTMLInputElement>(null);

  const problem = check?.problem ?? null;
  const problemFor = (path: string): string | null => (problem && pathMatches(problem.field, path) ? problem.message : null);
  const unplacedProblem = problem && !ALL_PATHS.some((p) => pathMatches(problem.field, p)) ? problem.message : null;

  const edit = (def: FieldDef, text: string): void => {
    if (!setup) return;
    let next = setAt(setup, def.path, toJsonValue(def, text));
    const pairPath = PAIRS.find((p) => def.path.startsWith(`${p}[`));
    if (pairPath) {
      const c = getAt(next, pairPath);
      if (Array.isArray(c)) {
        const pair = [c[0] ?? '', c[1] ?? ''];
        next = setAt(next, pairPath, pair.every((x) => typeof x === 'string' && x.trim() === '') ? undefined : pair);
      }
    }
    setSetup(next);
  };

  const field = (def: FieldDef): JSX.Element => (
    <TextField
      key={def.path}
      label={def.label}
      value={displayValue(getAt(setup, def.path))}
      onChange={(t) => edit(def, t)}
      hint={def.hint}
      problem={problemFor(def.path)}
      testId={`setup-field-${def.path.replace(/[[\]]/g, '').replace(/\./g, '-')}`}
      width={def.width}
    />
  );

  const loadExample = async (which: 'demo' | 'blank'): Promise<void> => {
    const reply = await api.setup.example({ which });
    if (reply.ok) setSetup(reply.value, true);
    else onError(reply.problem);
  };

  const openFile = async (e: ChangeEvent<HTMLInputElement>): Promise<void> => {
    const file = e.target.files?.[0];
    e.target.value = '';
    if (!file) return;
    let parsed: unknown;
    try {
      parsed = JSON.parse(await file.text());
    } catch (err) {
      onError({ kind: 'setup-file', file: file.name, message: `${file.name}: this is not a readable setup file (not valid JSON: ${(err as Error).message}). Nothing was changed.` });
      return;
    }
    if (!parsed || typeof parsed !== 'object' || Array.isArray(parsed)) {
      onError({ kind: 'setup-file', file: file.name, message: `${file.name}: a setup file holds one JSON object with "format": "shadowfront-setup/1". Nothing was changed.` });
      return;
    }
    setSetup(parsed as SetupJson, true);
  };

  const download = (): void => {
    if (!setup) return;
    const blob = new Blob([JSON.stringify(setup, null, 2) + '\n'], { type: 'application/json' });
    const url = URL.createObjectURL(blob);
    const a = document.createElement('a');
    a.href = url;
    a.download = 'setup.json';
    a.click();
    setTimeout(() => URL.revokeObjectURL(url), 1000);
  };

  return (
    <div className="screen setup-screen" data-testid="setup-screen">
      <header className="screen-head">
        <h2>Bench setup</h2>
        <div className="toolbar">
          <button type="button" onClick={() => void loadExample('demo')} data-testid="load-demo-setup">
            Load demo setup
          </button>
          <button type="button" onClick={() => void loadExample('blank')}>
            Blank setup
          </button>
          <button type="button" onClick={() => fileRef.current?.click()}>
            Open setup file…
          </button>
          <input ref={fileRef} type="file" accept=".json,application/json" hidden onChange={(e) => void openFile(e)} />
          <button type="button" onClick={download} disabled={!setup}>
            Save setup file
          </button>
        </div>
      </header>
      {!setup ? (
        <p className="muted">Loading the setup…</p>
      ) : (
        <div className="setup-layout">
          <form className="setup-form" onSubmit={(e) => e.preventDefault()} aria-label="Bench setup fields">
            {unplacedProblem ? (
              <p className="field-problem block" role="alert" data-testid="setup-problem">
                {unplacedProblem}
              </p>
            ) : null}
            <FieldGroup title="Laser beam">{LASER.map(field)}</FieldGroup>
            <FieldGroup title="Disc (or ball)">{DISC.map(field)}</FieldGroup>
            <FieldGroup title="Camera">
              {CAMERA.map(field)}
              <SelectField
                label="Image flip"
                value={displayValue(getAt(setup, 'camera.orientation.flip')) || 'none'}
                options={[
                  { value: 'none', label: 'none' },
                  { value: 'horizontal', label: 'left ↔ right' },
                  { value: 'vertical', label: 'top ↔ bottom' },
                  { value: 'both', label: 'both' },
                ]}
                onChange={(v) => setSetup(setAt(setup, 'camera.orientation.flip', v))}
                problem={problemFor('camera.orientation.flip')}
              />
              <SelectField
                label="Image rotation (after the flip)"
                value={normaliseRotate(getAt(setup, 'camera.orientation.rotate'))}
                options={['0 deg', '90 deg', '180 deg', '270 deg'].map((v) => ({ value: v, label: v.replace(' deg', '°') + ' counter-clockwise' }))}
                onChange={(v) => setSetup(setAt(setup, 'camera.orientation.rotate', v))}
                problem={problemFor('camera.orientation.rotate')}
              />
            </FieldGroup>
            <FieldGroup title="Other">
              {OTHER.map(field)}
              <TextField label="Note" value={displayValue(getAt(setup, 'note'))} onChange={(t) => setSetup(setAt(setup, 'note', t === '' ? undefined : t))} width="wide" />
            </FieldGroup>
            {Array.isArray(getAt(setup, 'disc.edgeHarmonics')) && (getAt(setup, 'disc.edgeHarmonics') as unknown[]).length > 0 ? (
              <p className="muted small-text">
                This setup also describes {(getAt(setup, 'disc.edgeHarmonics') as unknown[]).length} edge harmonic(s) of the disc; they are kept as loaded.
              </p>
            ) : null}
          </form>
          <aside className="setup-side">
            <DerivedPanel derived={check?.derived ?? null} bad={!!problem} checking={checking} />
            <PresetPanel session={session} assets={assets.map((a) => a.name)} />
          </aside>
        </div>
      )}
    </div>
  );
}

function normaliseRotate(v: unknown): string {
  const s = displayValue(v).trim();
  if (!s) return '0 deg';
  const m = /^(-?\d+)\s*(deg|°)$/.exec(s);
  if (!m) return s;
  const d = ((Number(m[1]) % 360) + 360) % 360;
  return `${d} deg`;
}

function DerivedPanel(props: { derived: DerivedFigures | null; bad: boolean; checking: boolean }): JSX.Element {
  const d = props.derived;
  return (
    <section className="panel derived" data-testid="derived-figures" aria-live="polite">
      <h3>
        Derived figures {props.checking ? <span className="muted small-text">checking…</span> : null}
      </h3>
      {!d || props.bad ? (
        <p className="muted">{props.bad ? 'Correct the field marked in red to see the figures.' : 'Waiting for a complete setup.'}</p>
      ) : (
        <>
          <dl className="figures">
            <dt>Effective distance L′</dt>
            <dd data-testid="derived-effective-distance">{fmtLength(d.effectiveDistanceM)}</dd>
            <dt>Magnification of the shadow</dt>
            <dd>{fmtNum(d.magnification, 4)}×</dd>
            <dt>Fresnel number</dt>
            <dd>{fmtNum(d.fresnelNumber, 3)}</dd>
            <dt>Fresnel zone width at the rim</dt>
            <dd data-testid="derived-zone-width">{fmtLength(d.zoneWidthM, 3)}</dd>
            <dt>Rim tolerance (10 % of the zone)</dt>
            <dd data-testid="derived-rim-tolerance">{fmtLength(d.rimToleranceM, 3)}</dd>
            <dt>Bright spot (first dark ring) diameter</dt>
            <dd data-testid="derived-spot-px">{fmtNum(d.spotDiameterPx, 3)} px</dd>
            <dt>Shadow diameter on the sensor</dt>
            <dd data-testid="derived-shadow-px">
              {fmtNum(d.shadowDiameterPx, 4)} px
              {d.sensorMinSidePx !== null && d.shadowFits !== null ? (
                <>
                  {' '}
                  against the sensor's {fmtNum(d.sensorMinSidePx, 5)} px{' '}
                  <span className={d.shadowFits ? 'badge badge-pass' : 'badge badge-warn'}>{d.shadowFits ? 'fits' : 'larger than the sensor'}</span>
                </>
              ) : null}
            </dd>
          </dl>
          <p className="muted small-text">
            Edge roughness, ellipticity and dirt on the rim should stay below the rim tolerance for a clean spot (10 % of the zone width: common practice, no published source).
          </p>
          {d.notes.length > 0 ? (
            <ul className="notes">
              {d.notes.map((n) => (
                <li key={n}>{n}</li>
              ))}
            </ul>
          ) : null}
        </>
      )}
    </section>
  );
}

function PresetPanel(props: { session: Session; assets: string[] }): JSX.Element {
  const { api, onError, setup, setSetup } = props.session;
  const [asset, setAsset] = useState('');
  const [name, setName] = useState('');
  const [presets, setPresets] = useState<SetupPreset[]>([]);
  const [confirmId, setConfirmId] = useState<string | null>(null);
  const [saved, setSaved] = useState<string | null>(null);

  const refresh = useCallback(async (): Promise<void> => {
    const reply = await api.setup.listPresets(asset.trim() ? { asset: asset.trim() } : {});
    if (reply.ok) setPresets(reply.value);
    else onError(reply.problem);
  }, [api, onError, asset]);

  useEffect(() => {
    const t = setTimeout(() => void refresh(), 250);
    return () => clearTimeout(t);
  }, [refresh]);

  const save = async (): Promise<void> => {
    if (!setup) return;
    if (!asset.trim() || !name.trim()) {
      onError({ kind: 'preset', message: 'To save a preset, give the asset (the laser or beam line) and a name for the preset.' });
      return;
    }
    const reply = await api.setup.savePreset({ asset: asset.trim(), name: name.trim(), setup });
    if (!reply.ok) {
      onError(reply.problem);
      return;
    }
    setSaved(`Saved "${reply.value.name}" for ${reply.value.asset}.`);
    setName('');
    void refresh();
  };

  const remove = async (id: string): Promise<void> => {
    setConfirmId(null);
    const reply = await api.setup.deletePreset({ id });
    if (!reply.ok) onError(reply.problem);
    void refresh();
  };

  const assetOptions = useMemo(() => [...new Set(props.assets)].sort(), [props.assets]);

  return (
    <section className="panel presets" data-testid="presets">
      <h3>Presets per asset</h3>
      <div className="field-grid two">
        <div className="field">
          <label htmlFor="preset-asset">Asset</label>
          <input id="preset-asset" list="preset-asset-list" value={asset} onChange={(e) => setAsset(e.target.value)} placeholder="all assets" data-testid="preset-asset" />
          <datalist id="preset-asset-list">
            {assetOptions.map((a) => (
              <option key={a} value={a} />
            ))}
          </datalist>
        </div>
        <div className="field">
          <label htmlFor="preset-name">Preset name</label>
          <input id="preset-name" value={name} onChange={(e) => setName(e.target.value)} placeholder="e.g. bench 2, 0.8 m" data-testid="preset-name" />
        </div>
      </div>
      <button type="button" onClick={() => void save()} disabled={!setup} data-testid="preset-save">
        Save this setup as a preset
      </button>
      {saved ? <p className="ok-text small-text">{saved}</p> : null}
      {presets.length === 0 ? (
        <p className="muted small-text">No presets{asset.trim() ? ` for "${asset.trim()}"` : ''} yet.</p>
      ) : (
        <ul className="preset-list">
          {presets.map((p) => (
            <li key={p.id}>
              <span className="preset-name">
                {p.name} <span className="muted">· {p.asset} · {p.savedAt.slice(0, 10)}</span>
              </span>
              <button type="button" className="small" onClick={() => setSetup(p.setup, true)}>
                Use
              </button>
              {confirmId === p.id ? (
                <>
                  <button type="button" className="small danger" onClick={() => void remove(p.id)}>
                    Yes, delete
                  </button>
                  <button type="button" className="small" onClick={() => setConfirmId(null)}>
                    Keep
                  </button>
                </>
              ) : (
                <button type="button" className="small" onClick={() => setConfirmId(p.id)}>
                  Delete
                </button>
              )}
            </li>
          ))}
        </ul>
      )}
    </section>
  );
}
