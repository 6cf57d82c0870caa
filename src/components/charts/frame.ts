import * as d3 from 'd3';
import { formatNumber, tickCount } from '@/src/lib/chart-math';

type Group = d3.Selection<SVGGElement, unknown, null, undefined>;

export interface FrameOptions {
  sx: d3.ScaleLinear<number, number>;
  sy: d3.ScaleLinear<number, number>;
  width: number;
  height: number;
  margin: { left: number };
  xLabel: string;
  yLabel: string;
  /** Tick labels of the x axis (cell indices want integers only, times and steps any number). */
  xTickFormat?: (v: d3.NumberValue) => string;
  /** Vertical offset of the y label above the plot. */
  yLabelOffset?: number;
}

/**
 * What every line chart of the run page draws first: horizontal grid lines, both axes and their
 * labels, and a clip path; returns the clipped group to draw the data into.
 */
export function drawFrame(g: Group, clipId: string, o: FrameOptions): Group {
  g.append('g')
    .attr('class', 'text-slate-200 dark:text-slate-800')
    .call(
      d3
        .axisLeft(o.sy)
        .ticks(tickCount(o.height, 40))
        .tickSize(-o.width)
        .tickFormat(() => ''),
    )
    .call((sel) => sel.select('.domain').remove());
  g.append('g')
    .attr('transform', `translate(0,${o.height})`)
    .call(
      d3
        .axisBottom(o.sx)
        .ticks(tickCount(o.width))
        .tickFormat(o.xTickFormat ?? ((v) => formatNumber(Number(v)))),
    );
  g.append('g').call(
    d3
      .axisLeft(o.sy)
      .ticks(tickCount(o.height, 40))
      .tickFormat((v) => formatNumber(Number(v))),
  );
  g.append('text')
    .attr('x', o.width)
    .attr('y', o.height + 30)
    .attr('text-anchor', 'end')
    .attr('class', 'fill-current text-[11px]')
    .text(o.xLabel);
  g.append('text')
    .attr('x', -o.margin.left + 4)
    .attr('y', -(o.yLabelOffset ?? 2))
    .attr('class', 'fill-current text-[11px]')
    .text(o.yLabel);
  g.append('clipPath').attr('id', clipId).append('rect').attr('width', o.width).attr('height', o.height);
  return g.append('g').attr('clip-path', `url(#${clipId})`);
}
