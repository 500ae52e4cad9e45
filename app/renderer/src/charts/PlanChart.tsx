/**
 * The bench planner's chart (uPlot on a canvas): predicted 1σ of astigmatism (solid) and coma (dashed)
 * against the camera distance, one colour per disc diameter, σ on a logarithmic axis. Unusable
 * candidates leave a gap.
 */
import { useEffect, useRef, useState } from 'react';
import type { JSX } from 'react';
import uPlot from 'uplot';
import 'uplot/dist/uPlot.min.css';
import type { PlanReport } from '../../../../core/plan/types.ts';
import { planChartData } from '../lib/planner.ts';
import { fmtNum, fmtTick } from '../lib/format.ts';

/** Our colours, one per disc diameter (repeating after eight). */
export const PLAN_COLORS = ['#1d4e89', '#c2410c', '#0b6e69', '#7c3aed', '#a16207', '#be185d', '#4b5563', '#15803d'] as const;

export function PlanChart(props: { report: PlanReport; testId?: string; height?: number }): JSX.Element {
  const { report, testId } = props;
  const height = props.height ?? 260;
  const boxRef = useRef<HTMLDivElement>(null);
  const plotRef = useRef<HTMLDivElement>(null);
  const [width, setWidth] = useState(0);
  const data = planChartData(report);

  useEffect(() => {
    const el = boxRef.current;
    if (!el) return;
    const measure = () => setWidth(Math.max(280, Math.floor(el.clientWidth)));
    measure();
    const ro = new ResizeObserver(measure);
    ro.observe(el);
    return () => ro.disconnect();
  }, []);

  useEffect(() => {
    const el = plotRef.current;
    if (!el || width <= 0) return;
    const d = planChartData(report);
    const series: uPlot.Series[] = [{ label: 'camera distance (m)', value: (_u, v) => (v == null ? '—' : fmtNum(v, 3)) }];
    const cols: (number | null)[][] = [d.distancesM];
    d.series.forEach((s, i) => {
      const color = PLAN_COLORS[i % PLAN_COLORS.length]!;
      const mm = fmtNum(s.discDiameterM * 1e3, 3);
      const fmt = (_u: uPlot, v: number | null) => (v == null ? '—' : fmtNum(v, 2));
      series.push({ label: `${mm} mm astig.`, stroke: color, width: 2, points: { show: true, size: 5, fill: color, stroke: color }, value: fmt });
      series.push({ label: `${mm} mm coma`, stroke: color, width: 1.5, dash: [6, 4], points: { show: true, size: 5, fill: '#fff', stroke: color }, value: fmt });
      cols.push(s.astigmatism, s.coma);
    });
    const u = new uPlot(
      {
        width,
        height,
        scales: { x: { time: false }, y: { distr: 3 } },
        series,
        axes: [
          { label: 'camera distance (m)', stroke: '#374151', grid: { stroke: '#e5e7eb' } },
          { label: 'predicted 1σ (waves)', stroke: '#374151', grid: { stroke: '#e5e7eb' }, size: 70, values: (_u, splits) => splits.map((v) => (v == null ? '' : fmtTick(v))) },
        ],
        legend: { show: true, live: true },
        cursor: { drag: { x: false, y: false } },
      },
      cols as uPlot.AlignedData,
      el,
    );
    return () => u.destroy();
  }, [report, width, height]);

  return (
    <figure className="chart plan-chart" data-testid={testId} data-series={data.series.length}>
      <figcaption className="image-title">Predicted 1σ against camera distance: astigmatism (solid) and coma (dashed), one colour per disc</figcaption>
      <div ref={boxRef} className="plan-chart-box">
        <div ref={plotRef} />
      </div>
    </figure>
  );
}
