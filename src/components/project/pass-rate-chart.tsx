'use client';

import { scaleBand, scaleLinear } from 'd3';
import type { TrendPoint } from '@/src/lib/pass-rate';

export type PassRateChartProps = { points: TrendPoint[]; window: number };

const W = 720;
const H = 180;
const M = { top: 10, right: 36, bottom: 24, left: 30 };

/**
 * Builds per day (bars: passed below, failed above) and the trailing pass rate (line, right
 * axis). d3 computes the scales; React draws the SVG.
 */
export function PassRateChart({ points, window }: PassRateChartProps) {
  if (points.length === 0)
    return <p className="text-sm text-slate-500">No finished builds on this branch in the period.</p>;
  const x = scaleBand<string>()
    .domain(points.map((p) => p.day))
    .range([M.left, W - M.right])
    .padding(0.2);
  const maxBuilds = Math.max(1, ...points.map((p) => p.builds));
  const yCount = scaleLinear()
    .domain([0, maxBuilds])
    .range([H - M.bottom, M.top]);
  const yRate = scaleLinear()
    .domain([0, 1])
    .range([H - M.bottom, M.top]);
  const line = points
    .map((p) => (p.rate === null ? null : `${x(p.day)! + x.bandwidth() / 2},${yRate(p.rate)}`))
    .filter((s): s is string => s !== null);
  const labelEvery = Math.ceil(points.length / 8);
  return (
    <svg
      viewBox={`0 0 ${W} ${H}`}
      className="h-auto w-full"
      role="img"
      aria-label={`Builds per day and ${window}-day pass rate`}
      data-testid="pass-rate-chart"
    >
      {[0, 0.5, 1].map((r) => (
        <g key={r}>
          <line
            x1={M.left}
            x2={W - M.right}
            y1={yRate(r)}
            y2={yRate(r)}
            className="stroke-slate-200 dark:stroke-slate-800"
          />
          <text x={W - M.right + 4} y={yRate(r) + 4} className="fill-slate-500 text-[10px]">{`${r * 100} %`}</text>
        </g>
      ))}
      {points.map((p, i) => (
        <g key={p.day}>
          <rect
            x={x(p.day)}
            width={x.bandwidth()}
            y={yCount(p.passed)}
            height={yCount(0) - yCount(p.passed)}
            className="fill-green-600/70"
          />
          <rect
            x={x(p.day)}
            width={x.bandwidth()}
            y={yCount(p.builds)}
            height={yCount(p.passed) - yCount(p.builds)}
            className="fill-red-600/70"
          />
          <title>{`${p.day}: ${p.passed} of ${p.builds} builds passed`}</title>
          {i % labelEvery === 0 ? (
            <text
              x={x(p.day)! + x.bandwidth() / 2}
              y={H - 6}
              textAnchor="middle"
              className="fill-slate-500 text-[10px]"
            >
              {p.day.slice(5)}
            </text>
          ) : null}
        </g>
      ))}
      <text x={4} y={M.top + 8} className="fill-slate-500 text-[10px]">
        {maxBuilds}
      </text>
      {line.length > 1 ? (
        <polyline points={line.join(' ')} fill="none" className="stroke-sky-700 dark:stroke-sky-400" strokeWidth={2} />
      ) : null}
    </svg>
  );
}
