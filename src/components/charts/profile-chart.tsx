'use client';

import * as d3 from 'd3';
import { useEffect, useId, useMemo, useRef, type KeyboardEvent, type ReactNode } from 'react';
import { extentOf, formatNumber, frameScales, innerSize, type BoundSpan, type Frame } from '@/src/lib/chart-math';
import { drawFrame } from './frame';
import { useChartWidth } from './use-chart-width';

/** One profile of a 1D field: kept cell indices and their values. */
export interface ProfileSeries {
  id: string;
  label: string;
  index: readonly number[];
  values: readonly (number | null)[];
  /** Tailwind stroke classes (light and dark). */
  className: string;
  dash?: 'dashed' | 'dotted';
  width?: number;
}

export interface ProfileMark {
  cell: number;
  value: number;
}

export interface ProfileChartProps {
  /** Drawn in order; put the selected step last so it lies on top. */
  series: ProfileSeries[];
  xDomain: [number, number];
  bounds: { lower: number; upper: number };
  /** Cells outside the bounds, shaded. */
  spans: BoundSpan[];
  /** New extrema of the selected step, circled. */
  marks: ProfileMark[];
  /** The finding's cell range, tinted. */
  highlight?: { from: number; to: number } | null;
  xLabel: string;
  yLabel: string;
  ariaLabel: string;
  onKeyDown?: (event: KeyboardEvent<HTMLDivElement>) => void;
  height?: number;
  children?: ReactNode;
}

const MARGIN = { top: 12, right: 16, bottom: 36, left: 64 };
const DASH = { dashed: '6 4', dotted: '2 3' } as const;

/**
 * A 1D field at one step against other steps, with the bounds, the cells outside them and the
 * new extrema. Focusable: the page moves the step with the arrow keys while it has focus.
 */
export function ProfileChart({
  series,
  xDomain,
  bounds,
  spans,
  marks,
  highlight = null,
  xLabel,
  yLabel,
  ariaLabel,
  onKeyDown,
  height = 300,
  children,
}: ProfileChartProps) {
  const [box, width] = useChartWidth<HTMLDivElement>();
  const svgRef = useRef<SVGSVGElement>(null);
  const clipId = `clip-${useId().replace(/[^A-Za-z0-9_-]/g, '')}`;
  const frame: Frame = useMemo(() => ({ width, height, margin: MARGIN }), [width, height]);
  const scales = useMemo(() => {
    const inWindow = series.map((s) =>
      s.values.filter((_, i) => s.index[i]! >= xDomain[0] && s.index[i]! <= xDomain[1]),
    );
    const yDomain = extentOf(inWindow, { include: [bounds.lower, bounds.upper], pad: 0.06 });
    return frameScales(frame, [xDomain[0] - 0.5, xDomain[1] + 0.5], yDomain);
  }, [series, xDomain, bounds, frame]);

  useEffect(() => {
    const svg = svgRef.current;
    if (!svg) return;
    const { width: w, height: h } = innerSize(frame);
    const { x: sx, y: sy } = scales;
    const root = d3.select(svg);
    root.selectAll('*').remove();
    const g = root.append('g').attr('transform', `translate(${MARGIN.left},${MARGIN.top})`);
    const plot = drawFrame(g, clipId, {
      sx,
      sy,
      width: w,
      height: h,
      margin: MARGIN,
      xLabel,
      yLabel,
      xTickFormat: (v) => (Number.isInteger(Number(v)) ? String(v) : ''),
      yLabelOffset: 2,
    });
    if (highlight) {
      plot
        .append('rect')
        .attr('data-testid', 'finding-range')
        .attr('class', 'fill-sky-500/10 dark:fill-sky-400/15')
        .attr('x', sx(highlight.from - 0.5))
        .attr('width', Math.max(1, sx(highlight.to + 0.5) - sx(highlight.from - 0.5)))
        .attr('y', 0)
        .attr('height', h);
    }
    plot
      .selectAll('rect.violation')
      .data(spans)
      .join('rect')
      .attr('data-testid', 'violation-span')
      .attr('class', 'violation fill-red-500/15 dark:fill-red-400/20')
      .attr('x', (s) => sx(s.from))
      .attr('width', (s) => Math.max(1, sx(s.to) - sx(s.from)))
      .attr('y', 0)
      .attr('height', h);
    for (const [value, label] of [
      [bounds.upper, 'upper bound'],
      [bounds.lower, 'lower bound'],
    ] as const) {
      plot
        .append('line')
        .attr('data-testid', 'bound-line')
        .attr('class', 'stroke-red-600/70 dark:stroke-red-400/70')
        .attr('stroke-dasharray', '4 3')
        .attr('x1', 0)
        .attr('x2', w)
        .attr('y1', sy(value))
        .attr('y2', sy(value))
        .append('title')
        .text(`${label} ${formatNumber(value)}`);
    }
    for (const s of series) {
      const path = d3
        .line<number>()
        .defined((i) => s.values[i] != null)
        .x((i) => sx(s.index[i]!))
        .y((i) => sy(s.values[i]!));
      plot
        .append('path')
        .attr('data-testid', 'profile-line')
        .attr('data-series', s.id)
        .attr('class', `fill-none ${s.className}`)
        .attr('stroke-width', s.width ?? 1.5)
        .attr('stroke-dasharray', s.dash ? DASH[s.dash] : null)
        .attr('d', path(d3.range(s.index.length)));
    }
    plot
      .selectAll('circle.mark')
      .data(marks)
      .join('circle')
      .attr('data-testid', 'extremum-mark')
      .attr('class', 'mark fill-none stroke-fuchsia-600 dark:stroke-fuchsia-400')
      .attr('stroke-width', 2)
      .attr('cx', (m) => sx(m.cell))
      .attr('cy', (m) => sy(m.value))
      .attr('r', 5)
      .append('title')
      .text((m) => `new extremum at cell ${m.cell}: ${formatNumber(m.value)}`);
  }, [scales, frame, series, spans, marks, highlight, bounds, xLabel, yLabel, clipId]);

  return (
    <div ref={box} className="w-full">
      <div
        role="group"
        tabIndex={0}
        aria-label={ariaLabel}
        onKeyDown={onKeyDown}
        data-testid="field-chart"
        className="rounded focus-visible:outline-2 focus-visible:outline-offset-2 focus-visible:outline-sky-600"
      >
        <svg
          ref={svgRef}
          width={width}
          height={height}
          className="block text-slate-500 dark:text-slate-400"
          aria-hidden="true"
        />
        {children}
      </div>
    </div>
  );
}
