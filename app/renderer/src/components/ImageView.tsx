/**
 * An image on a canvas with a colour bar and optional overlays (points, circles, crosses).
 *
 * Coordinates of overlays and of `onPick` are image-plane pixels with pixel i centred at i (the column
 * index runs along +x, the row index along −y: the first row is the top, as in the lab-frame images the
 * services return). NaN pixels are transparent. Signed maps (residuals, wavefronts) use `symmetric` so that
 * zero sits in the middle of the diverging colour map.
 */
import { useEffect, useMemo, useRef } from 'react';
import type { JSX, PointerEvent as ReactPointerEvent } from 'react';
import type { ImagePlane } from '../../../shared/contract.ts';
import { colormapCss, colormapLut, paint, ticks, valueMapping } from '../lib/colormaps.ts';
import type { ColormapName, Scale, ValueMapping } from '../lib/colormaps.ts';
import { fmtTick } from '../lib/format.ts';

export type Overlay =
  | { kind: 'points'; points: [number, number][]; color: string; label: string }
  | { kind: 'circle'; centerPx: [number, number]; radiusPx: number; color: string; label: string }
  | { kind: 'cross'; centerPx: [number, number]; color: string; label: string };

/** Overlay colours of our own, chosen to read on viridis, cividis and the diverging map (each is drawn over a dark halo). */
export const OVERLAY_COLORS = {
  saturated: '#ff3df2',
  hot: '#ff8a1f',
  centre: '#ffffff',
  region: '#ff4d4d',
} as const;

export interface ImageViewProps {
  plane: ImagePlane;
  scale?: Scale;
  colormap?: ColormapName;
  /** Colour range ±max|v| (signed maps: residuals, wavefronts). */
  symmetric?: boolean;
  overlays?: Overlay[];
  title?: string;
  testId?: string;
  /** Called on click and while dragging with the button held, in image-plane pixels. */
  onPick?: (xPx: number, yPx: number) => void;
  /** Display width of the image in CSS pixels (default 360). */
  width?: number;
  /** Fixed colour range (e.g. the same for measured and model); default: the image's own range. */
  range?: [number, number];
  /** Unit shown under the colour bar, e.g. "counts", "waves". */
  unit?: string;
}

const BAR_WIDTH = 14;

export function ImageView(props: ImageViewProps): JSX.Element {
  const { plane, scale = 'linear', colormap = 'viridis', symmetric = false, overlays = [], title, testId, onPick, range, unit } = props;
  const width = Math.max(64, Math.round(props.width ?? 360));
  const height = Math.max(16, Math.round((width * plane.heightPx) / Math.max(1, plane.widthPx)));
  const canvasRef = useRef<HTMLCanvasElement>(null);
  const barRef = useRef<HTMLCanvasElement>(null);
  const rangeKey = range ? `${range[0]},${range[1]}` : '';

  const mapping: ValueMapping = useMemo(
    () => valueMapping(plane.data, scale, symmetric, range),
    [plane, scale, symmetric, rangeKey],
  );

  // The image at its own resolution, painted once per plane / colour setting.
  const bitmap = useMemo(() => {
    const c = document.createElement('canvas');
    c.width = Math.max(1, plane.widthPx);
    c.height = Math.max(1, plane.heightPx);
    const ctx = c.getContext('2d');
    if (!ctx || plane.data.length < plane.widthPx * plane.heightPx) return c;
    const img = ctx.createImageData(plane.widthPx, plane.heightPx);
    paint(plane.data, mapping, colormapLut(colormap), img.data);
    ctx.putImageData(img, 0, 0);
    return c;
  }, [plane, mapping, colormap]);

  const dpr = typeof window !== 'undefined' ? Math.min(3, window.devicePixelRatio || 1) : 1;

  useEffect(() => {
    const canvas = canvasRef.current;
    if (!canvas) return;
    canvas.width = Math.round(width * dpr);
    canvas.height = Math.round(height * dpr);
    const ctx = canvas.getContext('2d');
    if (!ctx) return;
    ctx.setTransform(dpr, 0, 0, dpr, 0, 0);
    ctx.clearRect(0, 0, width, height);
    ctx.imageSmoothingEnabled = false;
    ctx.drawImage(bitmap, 0, 0, width, height);
    const s = width / Math.max(1, plane.widthPx);
    const sy = height / Math.max(1, plane.heightPx);
    const X = (x: number): number => (x + 0.5) * s;
    const Y = (y: number): number => (y + 0.5) * sy;
    for (const o of overlays) {
      if (o.kind === 'points') {
        const size = Math.max(3, Math.min(s, 8));
        ctx.fillStyle = 'rgba(0,0,0,0.75)';
        for (const [x, y] of o.points) ctx.fillRect(X(x) - size / 2 - 1, Y(y) - size / 2 - 1, size + 2, size + 2);
        ctx.fillStyle = o.color;
        for (const [x, y] of o.points) ctx.fillRect(X(x) - size / 2, Y(y) - size / 2, size, size);
        // A few isolated pixels (hot pixels, say) would be lost at display size: ring each one.
        if (o.points.length <= 200) {
          for (const [style, lw] of [['rgba(0,0,0,0.7)', 3.5], [o.color, 1.5]] as const) {
            ctx.strokeStyle = style;
            ctx.lineWidth = lw;
            for (const [x, y] of o.points) {
              ctx.beginPath();
              ctx.arc(X(x), Y(y), size / 2 + 5, 0, 2 * Math.PI);
              ctx.stroke();
            }
          }
        }
      } else if (o.kind === 'circle') {
        const r = o.radiusPx * s;
        for (const [style, lw] of [['rgba(0,0,0,0.7)', 4], [o.color, 2]] as const) {
          ctx.strokeStyle = style;
          ctx.lineWidth = lw;
          ctx.setLineDash(style === o.color ? [8, 5] : []);
          ctx.beginPath();
          ctx.arc(X(o.centerPx[0]), Y(o.centerPx[1]), Math.max(1, r), 0, 2 * Math.PI);
          ctx.stroke();
        }
        ctx.setLineDash([]);
      } else {
        const cx = X(o.centerPx[0]);
        const cy = Y(o.centerPx[1]);
        const arm = 9;
        for (const [style, lw] of [['rgba(0,0,0,0.8)', 4], [o.color, 2]] as const) {
          ctx.strokeStyle = style;
          ctx.lineWidth = lw;
          ctx.beginPath();
          ctx.moveTo(cx - arm, cy);
          ctx.lineTo(cx + arm, cy);
          ctx.moveTo(cx, cy - arm);
          ctx.lineTo(cx, cy + arm);
          ctx.stroke();
        }
      }
    }
  }, [bitmap, overlays, width, height, dpr, plane.widthPx, plane.heightPx]);

  useEffect(() => {
    const bar = barRef.current;
    if (!bar) return;
    bar.width = BAR_WIDTH;
    bar.height = Math.max(1, Math.round(height));
    const ctx = bar.getContext('2d');
    if (!ctx) return;
    for (let y = 0; y < bar.height; y++) {
      ctx.fillStyle = colormapCss(colormap, 1 - y / Math.max(1, bar.height - 1));
      ctx.fillRect(0, y, BAR_WIDTH, 1);
    }
  }, [colormap, height]);

  const tickValues = useMemo(() => ticks(mapping, height > 200 ? 6 : 4), [mapping, height]);

  const pick = (e: ReactPointerEvent<HTMLCanvasElement>): void => {
    if (!onPick) return;
    if (e.type === 'pointermove' && e.buttons === 0) return;
    const rect = e.currentTarget.getBoundingClientRect();
    const s = rect.width / Math.max(1, plane.widthPx);
    const sy = rect.height / Math.max(1, plane.heightPx);
    onPick((e.clientX - rect.left) / s - 0.5, (e.clientY - rect.top) / sy - 0.5);
  };

  const legend = overlays.filter((o) => o.label);
  return (
    <figure className="image-view" data-testid={testId}>
      {title ? <figcaption className="image-title">{title}</figcaption> : null}
      <div className="image-row">
        <canvas
          ref={canvasRef}
          className={onPick ? 'image-canvas pickable' : 'image-canvas'}
          style={{ width: `${width}px`, height: `${height}px` }}
          role="img"
          aria-label={title ?? 'image'}
          onPointerDown={onPick ? (e) => { e.currentTarget.setPointerCapture?.(e.pointerId); pick(e); } : undefined}
          onPointerMove={onPick ? pick : undefined}
        />
        <div className="colorbar" style={{ height: `${height}px` }} aria-hidden="true">
          <canvas ref={barRef} style={{ width: `${BAR_WIDTH}px`, height: `${height}px` }} />
          <div className="colorbar-ticks" style={{ height: `${height}px` }}>
            {tickValues.map((v) => {
              const t = mapping.toUnit(v);
              if (!(t >= -1e-9 && t <= 1 + 1e-9)) return null;
              return (
                <span key={v} className="colorbar-tick" style={{ top: `${(1 - t) * height}px` }}>
                  {fmtTick(v)}
                </span>
              );
            })}
          </div>
        </div>
      </div>
      <div className="image-foot">
        <span className="muted">
          {plane.widthPx}×{plane.heightPx} px{unit ? ` · colour: ${unit}` : ''}
          {scale === 'log' && !symmetric ? ' (log scale)' : ''}
        </span>
        {legend.map((o) => (
          <span key={o.label} className="legend-item">
            <span className={`legend-swatch legend-${o.kind}`} style={{ borderColor: o.color, background: o.kind === 'points' ? o.color : 'transparent' }} />
            {o.label}
            {o.kind === 'points' ? ` (${o.points.length})` : ''}
          </span>
        ))}
      </div>
    </figure>
  );
}
