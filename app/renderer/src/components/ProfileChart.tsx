/**
 * Radial profile of the measured frame against the fitted model (uPlot): radius on the camera in mm
 * against counts, azimuthally averaged about the fitted centre.
 */
import { useEffect, useRef } from 'react';
import type { JSX } from 'react';
import uPlot from 'uplot';
import 'uplot/dist/uPlot.min.css';

export const PROFILE_COLORS = { measured: '#2b3a55', model: '#e0531f' } as const;

export function ProfileChart(props: {
  profile: { radiusM: number[]; measured: number[]; model: number[] };
  width?: number;
  height?: number;
  testId?: string;
  title?: string;
}): JSX.Element {
  const { profile, width = 560, height = 260, testId, title } = props;
  const hostRef = useRef<HTMLDivElement>(null);

  useEffect(() => {
    const host = hostRef.current;
    if (!host) return;
    const x = profile.radiusM.map((r) => r * 1e3);
    const clean = (a: number[]): (number | null)[] => a.map((v) => (Number.isFinite(v) ? v : null));
    const opts: uPlot.Options = {
      width,
      height,
      scales: { x: { time: false } },
      legend: { show: true },
      cursor: { drag: { x: true, y: false } },
      axes: [
        { label: 'radius on the camera (mm)', stroke: '#333', grid: { stroke: '#e4e4e4' } },
        { label: 'counts', stroke: '#333', grid: { stroke: '#e4e4e4' }, size: 60 },
      ],
      series: [
        { label: 'radius (mm)', value: (_u, v) => (v == null ? '—' : v.toFixed(3)) },
        {
          label: 'measured',
          stroke: PROFILE_COLORS.measured,
          width: 1,
          points: { show: true, size: 4, stroke: PROFILE_COLORS.measured, fill: PROFILE_COLORS.measured },
          value: (_u, v) => (v == null ? '—' : v.toFixed(1)),
        },
        { label: 'model', stroke: PROFILE_COLORS.model, width: 2, points: { show: false }, value: (_u, v) => (v == null ? '—' : v.toFixed(1)) },
      ],
    };
    const plot = new uPlot(opts, [x, clean(profile.measured), clean(profile.model)] as uPlot.AlignedData, host);
    return () => plot.destroy();
  }, [profile, width, height]);

  return (
    <figure className="chart" data-testid={testId}>
      {title ? <figcaption className="image-title">{title}</figcaption> : null}
      <div ref={hostRef} />
    </figure>
  );
}
