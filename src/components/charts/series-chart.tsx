'use client';

import * as d3 from 'd3';
import { useEffect, useId, useMemo, useRef, useState, type KeyboardEvent } from 'react';
import { extentOf, formatNumber, frameScales, innerSize, nearestIndex, type Frame } from '@/src/lib/chart-math';
import { drawFrame } from './frame';
import { useChartWidth } from './use-chart-width';

/** One curve over steps; `x` defaults to the chart's `x`. */
export interface SeriesLine {
  id: string;
  label: string;
  values: readonly (number | null)[];
  x?: readonly number[];
  /** Tailwind stroke classes (light and dark). */
  className: string;
  dash?: 'dashed' | 'dotted';
  /** Draw as a staircase (counts that hold between steps). */
  steps?: boolean;
  /** Shown in the hover read-out; false for helper lines. */
  readout?: boolean;
}

/** A shaded area between two curves over the chart's `x`. */
export interface SeriesBand {
  id: string;
  lower: readonly (number | null)[];
  upper: readonly (number | null)[];
  className: string;
}

/** A horizontal line at a fixed value (a bound). */
export interface SeriesRule {
  id: string;
  value: number;
  label: string;
  className: string;
}

/** A step with findings, drawn as a dot along the top edge; clicking it selects the step. */
export interface SeriesMarker {
  x: number;
  severity: 'warn' | 'fail';
  label: string;
}

export interface SeriesChartProps {
  x: readonly number[];
  lines: SeriesLine[];
  bands?: SeriesBand[];
  rules?: SeriesRule[];
  markers?: SeriesMarker[];
  /** The selected step, drawn as a vertical line. */
  current?: number | null;
  onSelect?: (x: number) => void;
  onKeyDown?: (event: KeyboardEvent<HTMLDivElement>) => void;
  xLabel?: string;
  yLabel: string;
  ariaLabel: string;
  height?: number;
  testId?: string;
}

const MARGIN = { top: 18, right: 16, bottom: 36, left: 64 };
const DASH = { dashed: '6 4', dotted: '2 3' } as const;

/**
 * A line chart of per-step metrics with tolerance bands, bound lines, finding markers and the
 * selected step. d3 draws into the SVG; React owns only the hover read-out.
 */
export function SeriesChart({
  x,
  lines,
  bands = [],
  rules = [],
  markers = [],
  current = null,
  onSelect,
  onKeyDown,
  xLabel = 'step',
  yLabel,
  ariaLabel,
  height = 260,
  testId,
}: SeriesChartProps) {
  const [box, width] = useChartWidth<HTMLDivElement>();
  const svgRef = useRef<SVGSVGElement>(null);
  const [hover, setHover] = useState<number | null>(null);
  const clipId = `clip-${useId().replace(/[^A-Za-z0-9_-]/g, '')}`;
  const frame: Frame = useMemo(() => ({ width, height, margin: MARGIN }), [width, height]);

  const scales = useMemo(() => {
    const xs = [...x, ...lines.flatMap((l) => l.x ?? [])];
    const xDomain = extentOf([xs], { pad: 0 });
    const yDomain = extentOf([...lines.map((l) => l.values), ...bands.flatMap((b) => [b.lower, b.upper])], {
      include: rules.map((r) => r.value),
      pad: 0.06,
    });
    return frameScales(frame, xDomain, yDomain);
  }, [x, lines, bands, rules, frame]);

  useEffect(() => {
    const svg = svgRef.current;
    if (!svg) return;
    const { width: w, height: h } = innerSize(frame);
    const root = d3.select(svg);
    root.selectAll('*').remove();
    const g = root.append('g').attr('transform', `translate(${MARGIN.left},${MARGIN.top})`);
    const { x: sx, y: sy } = scales;

    const plot = drawFrame(g, clipId, { sx, sy, width: w, height: h, margin: MARGIN, xLabel, yLabel, yLabelOffset: 6 });
    for (const band of bands) {
      const area = d3
        .area<number>()
        .defined((i) => band.lower[i] != null && band.upper[i] != null)
        .x((i) => sx(x[i]!))
        .y0((i) => sy(band.lower[i]!))
        .y1((i) => sy(band.upper[i]!));
      plot
        .append('path')
        .attr('data-testid', 'series-band')
        .attr('data-band', band.id)
        .attr('class', band.className)
        .attr('d', area(d3.range(x.length)));
    }
    for (const rule of rules) {
      plot
        .append('line')
        .attr('data-testid', 'series-rule')
        .attr('class', rule.className)
        .attr('x1', 0)
        .attr('x2', w)
        .attr('y1', sy(rule.value))
        .attr('y2', sy(rule.value))
        .attr('stroke-dasharray', '4 3');
    }
    for (const line of lines) {
      const lx = line.x ?? x;
      const path = d3
        .line<number>()
        .defined((i) => line.values[i] != null && lx[i] != null)
        .x((i) => sx(lx[i]!))
        .y((i) => sy(line.values[i]!))
        .curve(line.steps ? d3.curveStepAfter : d3.curveLinear);
      plot
        .append('path')
        .attr('data-testid', 'series-line')
        .attr('data-series', line.id)
        .attr('class', `fill-none ${line.className}`)
        .attr('stroke-width', 1.75)
        .attr('stroke-dasharray', line.dash ? DASH[line.dash] : null)
        .attr('d', path(d3.range(Math.min(lx.length, line.values.length))));
    }
    if (current !== null) {
      plot
        .append('line')
        .attr('data-testid', 'current-step-line')
        .attr('class', 'stroke-slate-900 dark:stroke-slate-100')
        .attr('stroke-width', 1.25)
        .attr('x1', sx(current))
        .attr('x2', sx(current))
        .attr('y1', 0)
        .attr('y2', h);
    }
    if (hover !== null) {
      g.append('line')
        .attr('class', 'stroke-slate-400')
        .attr('stroke-dasharray', '2 2')
        .attr('x1', sx(hover))
        .attr('x2', sx(hover))
        .attr('y1', 0)
        .attr('y2', h);
    }
    // The overlay catches pointer events for the whole plot; markers sit above it.
    g.append('rect')
      .attr('width', w)
      .attr('height', h)
      .attr('fill', 'transparent')
      .style('cursor', onSelect ? 'pointer' : 'default')
      .on('mousemove', (event: MouseEvent) => {
        const i = nearestIndex(x, sx.invert(d3.pointer(event)[0]));
        setHover(i >= 0 ? x[i]! : null);
      })
      .on('mouseleave', () => setHover(null))
      .on('click', (event: MouseEvent) => {
        const i = nearestIndex(x, sx.invert(d3.pointer(event)[0]));
        if (i >= 0 && onSelect) onSelect(x[i]!);
      });
    g.append('g')
      .selectAll('circle')
      .data(markers)
      .join('circle')
      .attr('data-testid', 'finding-marker')
      .attr('cx', (m) => sx(m.x))
      .attr('cy', -8)
      .attr('r', 5)
      .attr('class', (m) => (m.severity === 'fail' ? 'fill-red-600 dark:fill-red-500' : 'fill-amber-500'))
      .style('cursor', 'pointer')
      .on('click', (_event: MouseEvent, m) => onSelect?.(m.x))
      .append('title')
      .text((m) => m.label);
    // The SVG is redrawn whole; d3 owns everything inside it.
  }, [scales, frame, x, lines, bands, rules, markers, current, hover, onSelect, xLabel, yLabel, clipId]);

  const readout = hover === null ? null : readoutAt(hover, x, lines);
  return (
    <div ref={box} className="w-full" data-testid={testId}>
      <p className="h-5 truncate text-xs text-slate-600 dark:text-slate-300" aria-live="off">
        {readout ?? '\u00a0'}
      </p>
      <div
        role="group"
        tabIndex={onKeyDown ? 0 : undefined}
        onKeyDown={onKeyDown}
        aria-label={ariaLabel}
        className="rounded focus-visible:outline-2 focus-visible:outline-offset-2 focus-visible:outline-sky-600"
      >
        <svg
          ref={svgRef}
          width={width}
          height={height}
          className="block text-slate-500 dark:text-slate-400"
          aria-hidden="true"
        />
      </div>
    </div>
  );
}

/** "step 12 · TV 2.034 · baseline 2.001": the value of each line at the nearest kept step. */
function readoutAt(step: number, x: readonly number[], lines: SeriesLine[]): string {
  const parts = [`step ${step}`];
  for (const line of lines) {
    if (line.readout === false) continue;
    const lx = line.x ?? x;
    const i = nearestIndex(lx, step);
    if (i < 0 || lx[i] !== step) continue;
    parts.push(`${line.label} ${formatNumber(line.values[i])}`);
  }
  return parts.join(' · ');
}
