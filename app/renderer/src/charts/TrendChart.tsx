/**
 * One trend chart (uPlot on a canvas): a quantity of one asset over time, each measurement a dot with
 * its ±1σ error bar, the user's limit as a solid red line, the control limits (individuals chart) as
 * dashed grey lines around a dotted centre line, and flagged measurements ringed in a hollow square.
 * A click on the plot picks the nearest measurement. The data come from lib/trendSeries.ts.
 */
import { useEffect, useRef, useState } from 'react';
import type { JSX } from 'react';
import uPlot from 'uplot';
import 'uplot/dist/uPlot.min.css';
import { tickDecimals } from '../lib/trendSeries.ts';
import type { LimitRole, TrendChartData } from '../lib/trendSeries.ts';
import { fmtNum } from '../lib/format.ts';
import { formatPm } from '../lib/logbookView.ts';

/** Our colours for the charts. */
export const TREND_COLORS = {
  value: '#1d4e89',
  errorBar: 'rgba(29, 78, 137, 0.55)',
  flagged: '#c2410c',
  limit: {
    'user-limit': '#b91c1c',
    centre: '#6b7280',
    ucl: '#6b7280',
    lcl: '#6b7280',
  } as Record<LimitRole, string>,
} as const;

const DASH: Record<LimitRole, number[] | undefined> = {
  'user-limit': undefined,
  centre: [2, 4],
  ucl: [7, 5],
  lcl: [7, 5],
};

function makeOptions(d: TrendChartData, width: number, height: number, onPick: (id: number) => void, onHover: (idx: number | null) => void): uPlot.Options {
  const series: uPlot.Series[] = [
    { label: 'date (UTC)' },
    {
      label: 'measured',
      stroke: TREND_COLORS.value,
      width: 1.5,
      points: { show: true, size: 7, fill: TREND_COLORS.value, stroke: TREND_COLORS.value },
    },
    {
      label: 'flagged',
      stroke: TREND_COLORS.flagged,
      width: 0,
      paths: () => null,
      points: { show: false },
    },
    ...d.limits.map(
      (l): uPlot.Series => ({
        label: l.label,
        stroke: TREND_COLORS.limit[l.role],
        width: l.role === 'user-limit' ? 2 : 1,
        dash: DASH[l.role],
        points: { show: false },
      }),
    ),
  ];
  const drawMarks = (u: uPlot) => {
    const ctx = u.ctx;
    const dpr = uPlot.pxRatio;
    ctx.save();
    ctx.beginPath();
    ctx.rect(u.bbox.left, u.bbox.top, u.bbox.width, u.bbox.height);
    ctx.clip();
    ctx.setLineDash([]);
    // ±1σ error bars.
    ctx.strokeStyle = TREND_COLORS.errorBar;
    ctx.lineWidth = 1.5 * dpr;
    const cap = 4 * dpr;
    for (let i = 0; i < d.xs.length; i++) {
      const lo = d.lo[i];
      const hi = d.hi[i];
      if (lo === null || hi === null) continue;
      const x = u.valToPos(d.xs[i], 'x', true);
      const y0 = u.valToPos(lo, 'y', true);
      const y1 = u.valToPos(hi, 'y', true);
      ctx.beginPath();
      ctx.moveTo(x, y0);
      ctx.lineTo(x, y1);
      ctx.moveTo(x - cap, y0);
      ctx.lineTo(x + cap, y0);
      ctx.moveTo(x - cap, y1);
      ctx.lineTo(x + cap, y1);
      ctx.stroke();
    }
    // Flagged points: a hollow square around the dot (a shape as well as a colour).
    ctx.strokeStyle = TREND_COLORS.flagged;
    ctx.lineWidth = 2 * dpr;
    const h = 7 * dpr;
    for (let i = 0; i < d.xs.length; i++) {
      const v = d.flagged[i];
      if (v === null) continue;
      const x = u.valToPos(d.xs[i], 'x', true);
      const y = u.valToPos(v, 'y', true);
      ctx.strokeRect(x - h, y - h, 2 * h, 2 * h);
    }
    ctx.restore();
  };
  return {
    width,
    height,
    tzDate: (ts: number) => uPlot.tzDate(new Date(ts * 1000), 'Etc/UTC'),
    scales: {
      x: { time: true, range: () => d.xRange },
      y: { range: () => d.yRange },
    },
    series,
    axes: [
      { stroke: '#374151', grid: { stroke: '#e5e7eb' } },
      {
        stroke: '#374151',
        grid: { stroke: '#e5e7eb' },
        label: d.unit || undefined,
        size: 60,
        values: (_u, splits, _axis, _space, incr) => splits.map((v) => v.toFixed(tickDecimals(incr))),
      },
    ],
    legend: { show: false },
    cursor: { drag: { x: false, y: false } },
    hooks: {
      draw: [drawMarks],
      setCursor: [(u: uPlot) => onHover(u.cursor.idx ?? null)],
      ready: [
        (u: uPlot) => {
          u.over.addEventListener('click', () => {
            const idx = u.cursor.idx;
            if (idx !== null && idx !== undefined && d.value[idx] !== null) onPick(d.measurementIds[idx]);
          });
        },
      ],
    },
  };
}

export function TrendChart(props: { data: TrendChartData; testId?: string; height?: number; onPick?: (measurementId: number) => void }): JSX.Element {
  const { data, testId, onPick } = props;
  const height = props.height ?? 220;
  const boxRef = useRef<HTMLDivElement>(null);
  const plotRef = useRef<HTMLDivElement>(null);
  const [width, setWidth] = useState(0);
  const [hover, setHover] = useState<number | null>(null);
  const pickRef = useRef(onPick);
  pickRef.current = onPick;

  useEffect(() => {
    const el = boxRef.current;
    if (!el) return;
    const measure = () => setWidth(Math.max(240, Math.floor(el.clientWidth)));
    measure();
    const ro = new ResizeObserver(measure);
    ro.observe(el);
    return () => ro.disconnect();
  }, []);

  useEffect(() => {
    const el = plotRef.current;
    if (!el || width <= 0) return;
    const cols: (number | null)[][] = [data.xs, data.value, data.flagged, ...data.limits.map((l) => l.values)];
    const u = new uPlot(
      makeOptions(data, width, height, (id) => pickRef.current?.(id), setHover),
      cols as uPlot.AlignedData,
      el,
    );
    return () => u.destroy();
  }, [data, width, height]);

  const unit = data.unit ? ` ${data.unit}` : '';
  const flaggedText = data.flaggedCount ? `${data.flaggedCount} flagged` : 'none flagged';
  const user = data.limits.find((l) => l.role === 'user-limit');
  const control = data.limits.find((l) => l.role === 'ucl');
  const i = hover !== null && hover >= 0 && hover < data.xs.length ? hover : null;
  let readout = 'Point at a measurement to read it; click to open it.';
  if (i !== null && data.value[i] !== null) {
    const when = new Date(data.xs[i] * 1000).toISOString();
    readout = `#${data.measurementIds[i]} · ${when.slice(0, 10)} ${when.slice(11, 16)}Z · ${formatPm(data.value[i], data.sigma[i])}${unit}${
      data.flagCodes[i].length ? ` · flags ${data.flagCodes[i].join(', ')}` : ''
    }`;
  } else if (i !== null) readout = `#${data.measurementIds[i]}: not fitted for this term`;
  return (
    <figure className="lb-chart" data-testid={testId} data-points={data.value.filter((v) => v !== null).length}>
      <figcaption className="lb-chart-title">
        <strong>{data.title}</strong>
        <span className="muted">
          {unit ? ` ·${unit}` : ''} · {flaggedText}
        </span>
      </figcaption>
      <div ref={boxRef} className="lb-chart-box">
        <div ref={plotRef} />
      </div>
      <div className="lb-chart-legend">
        <span><i className="lb-key lb-key-dot" style={{ background: TREND_COLORS.value }} /> measured ± 1σ</span>
        {data.flaggedCount ? <span><i className="lb-key lb-key-square" style={{ borderColor: TREND_COLORS.flagged }} /> flagged</span> : null}
        {user ? <span><i className="lb-key lb-key-line" style={{ borderColor: TREND_COLORS.limit['user-limit'] }} /> {user.label} {fmtNum(user.value, 3)}</span> : null}
        {control ? <span><i className="lb-key lb-key-dash" style={{ borderColor: TREND_COLORS.limit.ucl }} /> control limits (3σ)</span> : null}
      </div>
      <div className="lb-chart-readout muted" aria-live="off">{readout}</div>
    </figure>
  );
}
