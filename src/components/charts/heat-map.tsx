'use client';

import * as d3 from 'd3';
import { useEffect, useId, useMemo, useRef } from 'react';
import { formatNumber, type Domain } from '@/src/lib/chart-math';
import { useChartWidth } from './use-chart-width';

export interface HeatMapProps {
  rows: number;
  cols: number;
  /** Row-major, rows x cols; null cells (NaN, infinity) are drawn grey. */
  values: readonly (number | null)[];
  domain: Domain;
  /** `sequential` for field values, `diverging` (centred on zero) for growth. */
  scheme: 'sequential' | 'diverging';
  /** A box to outline, in block coordinates (the finding's cells). */
  box?: { rowFrom: number; rowTo: number; colFrom: number; colTo: number } | null;
  /** Cells to outline in red (values outside the bounds). */
  flag?: (value: number) => boolean;
  xLabel: string;
  yLabel: string;
  legend: string;
  ariaLabel: string;
  testId: string;
  maxHeight?: number;
}

const MARGIN = { top: 8, right: 12, bottom: 58, left: 40 };

/**
 * A 2D field (or the growth of its local variation) as coloured cells, row 0 at the bottom like a
 * y axis, with a colour legend. At most a few thousand cells arrive (the API block-averages), so
 * plain SVG rectangles are fast enough.
 */
export function HeatMap({
  rows,
  cols,
  values,
  domain,
  scheme,
  box = null,
  flag,
  xLabel,
  yLabel,
  legend,
  ariaLabel,
  testId,
  maxHeight = 340,
}: HeatMapProps) {
  const [container, width] = useChartWidth<HTMLDivElement>();
  const svgRef = useRef<SVGSVGElement>(null);
  const gradientId = `grad-${useId().replace(/[^A-Za-z0-9_-]/g, '')}`;
  const layout = useMemo(() => {
    const plotWidth = Math.max(60, width - MARGIN.left - MARGIN.right);
    // Square cells, unless that makes the map taller than maxHeight.
    const cell = Math.max(1, Math.min(plotWidth / cols, (maxHeight - MARGIN.top - MARGIN.bottom) / rows));
    return { cell, plotWidth: cell * cols, plotHeight: cell * rows };
  }, [width, rows, cols, maxHeight]);
  const color = useMemo(() => {
    const interpolate = scheme === 'diverging' ? (t: number) => d3.interpolateRdBu(1 - t) : d3.interpolateViridis;
    return d3.scaleSequential(interpolate).domain(domain);
  }, [scheme, domain]);

  useEffect(() => {
    const svg = svgRef.current;
    if (!svg) return;
    const { cell, plotWidth, plotHeight } = layout;
    const root = d3.select(svg);
    root.selectAll('*').remove();
    const g = root.append('g').attr('transform', `translate(${MARGIN.left},${MARGIN.top})`);
    const cells = d3.range(rows * cols);
    g.append('g')
      .selectAll('rect')
      .data(cells)
      .join('rect')
      .attr('data-testid', 'heat-cell')
      .attr('x', (k) => (k % cols) * cell)
      .attr('y', (k) => plotHeight - (Math.floor(k / cols) + 1) * cell)
      .attr('width', cell + 0.5)
      .attr('height', cell + 0.5)
      .attr('fill', (k) => {
        const v = values[k];
        return v === null || v === undefined ? '#9ca3af' : color(v);
      })
      .attr('stroke', (k) => {
        const v = values[k];
        return flag && v !== null && v !== undefined && flag(v) ? '#dc2626' : null;
      })
      .attr('stroke-width', 1.5)
      .append('title')
      .text((k) => `row ${Math.floor(k / cols)}, column ${k % cols}: ${formatNumber(values[k])}`);
    if (box) {
      g.append('rect')
        .attr('data-testid', 'finding-box')
        .attr('class', 'fill-none stroke-slate-900 dark:stroke-white')
        .attr('stroke-width', 2)
        .attr('stroke-dasharray', '5 3')
        .attr('x', box.colFrom * cell)
        .attr('y', plotHeight - (box.rowTo + 1) * cell)
        .attr('width', (box.colTo - box.colFrom + 1) * cell)
        .attr('height', (box.rowTo - box.rowFrom + 1) * cell);
    }
    const xs = d3.scaleLinear().domain([0, cols]).range([0, plotWidth]);
    const ys = d3.scaleLinear().domain([0, rows]).range([plotHeight, 0]);
    g.append('g')
      .attr('transform', `translate(0,${plotHeight})`)
      .call(
        d3
          .axisBottom(xs)
          .ticks(Math.min(cols, Math.max(2, Math.floor(plotWidth / 60))))
          .tickFormat(d3.format('d')),
      );
    g.append('g').call(
      d3
        .axisLeft(ys)
        .ticks(Math.min(rows, Math.max(2, Math.floor(plotHeight / 40))))
        .tickFormat(d3.format('d')),
    );
    g.append('text')
      .attr('x', plotWidth)
      .attr('y', plotHeight + 28)
      .attr('text-anchor', 'end')
      .attr('class', 'fill-current text-[11px]')
      .text(xLabel);
    g.append('text')
      .attr('transform', `translate(${-30},0) rotate(-90)`)
      .attr('text-anchor', 'end')
      .attr('class', 'fill-current text-[11px]')
      .text(yLabel);

    // Colour legend: a gradient bar with the domain's ends.
    const gradient = root.append('defs').append('linearGradient').attr('id', gradientId);
    for (const t of d3.range(0, 1.0001, 0.1)) {
      gradient
        .append('stop')
        .attr('offset', `${t * 100}%`)
        .attr('stop-color', color(domain[0] + t * (domain[1] - domain[0])));
    }
    const legendY = plotHeight + 38;
    // Leave room for the legend's label beside the bar on narrow screens.
    const legendWidth = Math.min(220, Math.max(60, plotWidth - 150));
    g.append('rect')
      .attr('x', 0)
      .attr('y', legendY)
      .attr('width', legendWidth)
      .attr('height', 8)
      .attr('fill', `url(#${gradientId})`);
    g.append('text')
      .attr('x', 0)
      .attr('y', legendY + 19)
      .attr('class', 'fill-current text-[10px]')
      .text(formatNumber(domain[0]));
    g.append('text')
      .attr('x', legendWidth)
      .attr('y', legendY + 19)
      .attr('text-anchor', 'end')
      .attr('class', 'fill-current text-[10px]')
      .text(formatNumber(domain[1]));
    g.append('text')
      .attr('x', legendWidth + 8)
      .attr('y', legendY + 8)
      .attr('class', 'fill-current text-[10px]')
      .text(legend);
  }, [layout, rows, cols, values, color, domain, box, flag, xLabel, yLabel, legend, gradientId]);

  return (
    <div ref={container} className="w-full" data-testid={testId}>
      <svg
        ref={svgRef}
        role="img"
        aria-label={ariaLabel}
        width={layout.plotWidth + MARGIN.left + MARGIN.right}
        height={layout.plotHeight + MARGIN.top + MARGIN.bottom}
        className="block text-slate-500 dark:text-slate-400"
      />
    </div>
  );
}
