/**
 * Frames: open or drop camera frames and dark frames (or load the synthetic demo frames), and check them
 * in the preview: colour map and scale, saturated and hot pixels, the detected centre and the region to
 * analyse, which can be moved (click or drag on the image) or typed.
 */
import { useRef, useState } from 'react';
import type { ChangeEvent, DragEvent, JSX } from 'react';
import type { FileBlob } from '../../../shared/contract.ts';
import { ImageView, OVERLAY_COLORS } from '../components/ImageView.tsx';
import type { Overlay } from '../components/ImageView.tsx';
import { NumberField } from '../components/Fields.tsx';
import { readFiles } from '../lib/session.ts';
import type { Session } from '../lib/session.ts';
import { fmtNum } from '../lib/format.ts';

type DemoEntry = { setup: Record<string, unknown>; frames: FileBlob[]; label: string };

function kib(n: number): string {
  if (n < 1024) return `${n} bytes`;
  return n >= 1024 * 1024 ? `${(n / 1024 / 1024).toFixed(1)} MiB` : `${Math.round(n / 1024)} KiB`;
}

export function FramesScreen(props: { session: Session }): JSX.Element {
  const { session } = props;
  const { api, onError, frameSet, setFrameSet, preview, previewBusy, previewProblem, region, setRegion, setSetup, check } = session;
  const frameInput = useRef<HTMLInputElement>(null);
  const darkInput = useRef<HTMLInputElement>(null);
  const [colormap, setColormap] = useState<'viridis' | 'cividis'>('viridis');
  const [scale, setScale] = useState<'linear' | 'log'>('linear');
  const [dropAs, setDropAs] = useState<'frames' | 'darks'>('frames');
  const [dragOver, setDragOver] = useState(false);
  const [demoBusy, setDemoBusy] = useState(false);
  const demoCache = useRef<DemoEntry[] | null>(null);

  const add = (blobs: FileBlob[], role: 'frames' | 'darks'): void => {
    if (blobs.length === 0) return;
    const frames = role === 'frames' ? [...frameSet.frames, ...blobs] : frameSet.frames;
    const darks = role === 'darks' ? [...frameSet.darks, ...blobs] : frameSet.darks;
    setFrameSet({ frames, darks, label: frames.length === 1 ? frames[0]!.name : `${frames.length} frames` });
  };

  const onFiles = async (e: ChangeEvent<HTMLInputElement>, role: 'frames' | 'darks'): Promise<void> => {
    const list = e.target.files ? [...e.target.files] : [];
    e.target.value = '';
    add(await readFiles(list), role);
  };

  const onDrop = async (e: DragEvent<HTMLDivElement>): Promise<void> => {
    e.preventDefault();
    setDragOver(false);
    add(await readFiles([...e.dataTransfer.files]), dropAs);
  };

  const loadDemo = async (which: 'before' | 'after'): Promise<void> => {
    setDemoBusy(true);
    try {
      if (!demoCache.current) {
        const reply = await api.frames.demoFiles();
        if (!reply.ok) {
          onError(reply.problem);
          return;
        }
        demoCache.current = reply.value;
      }
      const list = demoCache.current;
      const re = which === 'before' ? /before/i : /after/i;
      const entry = list.find((d) => re.test(d.label)) ?? list[which === 'before' ? 0 : 1];
      if (!entry) {
        onError({ kind: 'demo', message: `The demo has no "${which} cleaning" frames.` });
        return;
      }
      setSetup(entry.setup, true);
      setFrameSet({ frames: entry.frames, darks: [], label: `synthetic demo: ${entry.label}` });
    } finally {
      setDemoBusy(false);
    }
  };

  const removeAt = (role: 'frames' | 'darks', i: number): void => {
    const frames = role === 'frames' ? frameSet.frames.filter((_, k) => k !== i) : frameSet.frames;
    const darks = role === 'darks' ? frameSet.darks.filter((_, k) => k !== i) : frameSet.darks;
    setFrameSet({ frames, darks, label: frames.length === 1 ? frames[0]!.name : `${frames.length} frames` });
  };

  const dec = preview?.decimation ?? 1;
  const shownRegion = region ?? (preview ? { centerPx: preview.region.centerPx, radiusPx: preview.region.radiusPx } : null);
  const overlays: Overlay[] = [];
  if (preview) {
    overlays.push({ kind: 'points', points: preview.saturated, color: OVERLAY_COLORS.saturated, label: 'saturated pixels' });
    overlays.push({ kind: 'points', points: preview.hot, color: OVERLAY_COLORS.hot, label: 'hot pixels' });
    overlays.push({ kind: 'cross', centerPx: [preview.centerPx[0] / dec, preview.centerPx[1] / dec], color: OVERLAY_COLORS.centre, label: 'detected centre' });
    if (shownRegion) {
      overlays.push({
        kind: 'circle',
        centerPx: [shownRegion.centerPx[0] / dec, shownRegion.centerPx[1] / dec],
        radiusPx: shownRegion.radiusPx / dec,
        color: OVERLAY_COLORS.region,
        label: 'region analysed',
      });
    }
  }

  const setupBad = !!check?.problem;

  return (
    <div
      className={`screen frames-screen${dragOver ? ' drag-over' : ''}`}
      data-testid="frames-screen"
      onDragOver={(e) => {
        e.preventDefault();
        setDragOver(true);
      }}
      onDragLeave={() => setDragOver(false)}
      onDrop={(e) => void onDrop(e)}
    >
      <header className="screen-head">
        <h2>Frames</h2>
        <div className="toolbar">
          <button type="button" onClick={() => frameInput.current?.click()}>
            Open frames…
          </button>
          <input
            ref={frameInput}
            className="visually-hidden"
            type="file"
            multiple
            accept=".png,.tif,.tiff,.pgm,.npy,image/png,image/tiff"
            tabIndex={-1}
            onChange={(e) => void onFiles(e, 'frames')}
            data-testid="frame-input"
          />
          <button type="button" onClick={() => darkInput.current?.click()}>
            Add dark frames…
          </button>
          <input
            ref={darkInput}
            className="visually-hidden"
            type="file"
            multiple
            accept=".png,.tif,.tiff,.pgm,.npy,image/png,image/tiff"
            tabIndex={-1}
            onChange={(e) => void onFiles(e, 'darks')}
            data-testid="dark-input"
          />
          <span className="toolbar-sep" />
          <button type="button" onClick={() => void loadDemo('before')} disabled={demoBusy} data-testid="load-demo-before">
            Demo: before cleaning
          </button>
          <button type="button" onClick={() => void loadDemo('after')} disabled={demoBusy} data-testid="load-demo-after">
            Demo: after cleaning
          </button>
          <button type="button" onClick={() => setFrameSet({ frames: [], darks: [], label: '' })} disabled={frameSet.frames.length + frameSet.darks.length === 0}>
            Clear
          </button>
        </div>
      </header>

      <div className="frames-layout">
        <div className="frames-main">
          {frameSet.frames.length === 0 ? (
            <div className="drop-hint">
              <p>Open frames (PNG, TIFF, PGM or NPY, 8 to 16 bit), or drop them here.</p>
              <p className="muted">
                Dropped files are added as{' '}
                <select value={dropAs} onChange={(e) => setDropAs(e.target.value as 'frames' | 'darks')} aria-label="Dropped files are added as">
                  <option value="frames">frames</option>
                  <option value="darks">dark frames</option>
                </select>
                . Several frames of the same scene are averaged; dark frames are subtracted.
              </p>
            </div>
          ) : preview ? (
            <>
              <div className="toolbar compact">
                <label>
                  Colour map{' '}
                  <select value={colormap} onChange={(e) => setColormap(e.target.value as 'viridis' | 'cividis')} data-testid="preview-colormap">
                    <option value="viridis">viridis</option>
                    <option value="cividis">cividis (colour-blind safe)</option>
                  </select>
                </label>
                <fieldset className="segmented" aria-label="Scale">
                  {(['linear', 'log'] as const).map((s) => (
                    <label key={s} className={scale === s ? 'on' : ''}>
                      <input type="radio" name="preview-scale" value={s} checked={scale === s} onChange={() => setScale(s)} data-testid={`preview-scale-${s}`} />
                      {s === 'linear' ? 'linear' : 'log'}
                    </label>
                  ))}
                </fieldset>
                {previewBusy ? <span className="muted">updating…</span> : null}
              </div>
              <ImageView
                plane={preview.image}
                colormap={colormap}
                scale={scale}
                overlays={overlays}
                testId="frame-preview"
                title={`Preview: ${frameSet.label}${frameSet.darks.length ? ` − ${frameSet.darks.length} dark` : ''}`}
                width={520}
                unit="counts"
                onPick={(x, y) =>
                  setRegion({ centerPx: [Math.round(x * dec * 10) / 10, Math.round(y * dec * 10) / 10], radiusPx: shownRegion?.radiusPx ?? 100 })
                }
              />
              <p className="muted small-text">Click or drag on the image to move the region analysed.</p>
            </>
          ) : (
            <div className="drop-hint">
              {previewProblem ? (
                <p className="field-problem block">The preview could not be made: {previewProblem.message}</p>
              ) : setupBad ? (
                <p className="field-problem block">The bench setup has a problem; fix it on the Bench setup screen to see the preview.</p>
              ) : (
                <p className="muted">Preparing the preview…</p>
              )}
            </div>
          )}
        </div>

        <aside className="frames-side">
          {preview ? (
            <>
              <section className="panel">
                <h3>Frame check</h3>
                <dl className="figures">
                  <dt>Peak</dt>
                  <dd>{fmtNum(preview.peakCounts, 4)} counts</dd>
                  <dt>Detected centre</dt>
                  <dd>
                    ({fmtNum(preview.centerPx[0], 4)}, {fmtNum(preview.centerPx[1], 4)}) px
                  </dd>
                  <dt>Saturated pixels</dt>
                  <dd>{preview.saturated.length}</dd>
                  <dt>Hot pixels</dt>
                  <dd>{preview.hot.length}</dd>
                </dl>
                <div data-testid="frame-warnings" className="warnings">
                  {preview.warnings.length === 0 ? (
                    <p className="ok-text">No warnings: the frames look usable.</p>
                  ) : (
                    <ul>
                      {preview.warnings.map((w) => (
                        <li key={w}>{w}</li>
                      ))}
                    </ul>
                  )}
                </div>
              </section>
              <section className="panel">
                <h3>Region analysed</h3>
                <p className="small-text muted">
                  Full-resolution pixels{dec > 1 ? ` (the preview shows every ${dec}th pixel)` : ''}. {region ? 'Set by you.' : 'Chosen automatically.'}
                  {preview.region.wholeShadow ? ' It holds the whole shadow and its edge.' : ''}
                </p>
                {shownRegion ? (
                  <div className="field-grid three">
                    <NumberField label="centre x" unit="px" value={shownRegion.centerPx[0]} onChange={(v) => setRegion({ ...shownRegion, centerPx: [v, shownRegion.centerPx[1]] })} testId="region-x" />
                    <NumberField label="centre y" unit="px" value={shownRegion.centerPx[1]} onChange={(v) => setRegion({ ...shownRegion, centerPx: [shownRegion.centerPx[0], v] })} testId="region-y" />
                    <NumberField label="radius" unit="px" min={4} value={shownRegion.radiusPx} onChange={(v) => setRegion({ ...shownRegion, radiusPx: Math.max(4, v) })} testId="region-r" />
                  </div>
                ) : null}
                <button type="button" onClick={() => setRegion(null)} disabled={!region} data-testid="region-auto">
                  Choose automatically
                </button>
              </section>
            </>
          ) : null}
          <section className="panel">
            <h3>Files</h3>
            <FileList title="Frames" files={frameSet.frames} onRemove={(i) => removeAt('frames', i)} />
            <FileList title="Dark frames" files={frameSet.darks} onRemove={(i) => removeAt('darks', i)} />
          </section>
        </aside>
      </div>
    </div>
  );
}

function FileList(props: { title: string; files: FileBlob[]; onRemove: (i: number) => void }): JSX.Element {
  return (
    <div className="file-list">
      <h4>
        {props.title} <span className="muted">({props.files.length})</span>
      </h4>
      {props.files.length === 0 ? (
        <p className="muted small-text">none</p>
      ) : (
        <ul>
          {props.files.map((f, i) => (
            <li key={`${f.name}-${i}`}>
              <span className="file-name" title={f.name}>
                {f.name}
              </span>
              <span className="muted small-text">{kib(f.data.byteLength)}</span>
              <button type="button" className="small" onClick={() => props.onRemove(i)} aria-label={`Remove ${f.name}`}>
                Remove
              </button>
            </li>
          ))}
        </ul>
      )}
    </div>
  );
}
