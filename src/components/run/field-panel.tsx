'use client';

import { keepPreviousData, useQuery } from '@tanstack/react-query';
import { useCallback, useId, useMemo, useState, type KeyboardEvent } from 'react';
import { HeatMap } from '@/src/components/charts/heat-map';
import { ProfileChart, type ProfileMark, type ProfileSeries } from '@/src/components/charts/profile-chart';
import { Notice } from '@/src/components/ui/notice';
import {
  blockRange,
  cellWindow,
  extentOf,
  formatNumber,
  outOfBoundsSpans,
  symmetricExtent,
  type CellWindow,
} from '@/src/lib/chart-math';
import { fastestRange } from '@/src/lib/run-selection';
import type { BaselineView, FindingView, GrowthView, StepView, VariableView } from '@/src/lib/run-views';
import { getJson, PLANE_POINTS, PROFILE_POINTS, retryServerErrors, runApi, runKeys, type StepOptions } from './api';
import { Legend } from './legend';
import type { LegendItem } from './metric-views';

export type FieldPanelProps = {
  runId: string;
  variable: VariableView;
  position: number;
  baseline: BaselineView | null;
  /** The finding being looked at: its cells are tinted (1D) or outlined (2D). */
  finding: FindingView | null;
  zoom: CellWindow | null;
  onZoom: (zoom: CellWindow | null) => void;
  onKeyDown: (event: KeyboardEvent<HTMLDivElement>) => void;
};

function useStep(runId: string, variable: string, step: number | null, options: StepOptions, keepPrevious = false) {
  return useQuery({
    queryKey: runKeys.step(runId, variable, step ?? -1, options),
    queryFn: ({ signal }) => getJson<StepView>(runApi.step(runId, variable, step ?? 0, options), signal),
    enabled: step !== null,
    retry: retryServerErrors,
    placeholderData: keepPrevious ? keepPreviousData : undefined,
  });
}

/** The baseline run can be overlaid when it is another run and has this variable. */
function usableBaseline(baseline: BaselineView | null, variable: string): BaselineView | null {
  return baseline && !baseline.isThisRun && baseline.variables.includes(variable) ? baseline : null;
}

/**
 * How far values may leave the bounds before they are shaded: the policy's absolute tolerance or
 * its relative tolerance times the bounds' range. (The per-step rounding floor is left out: it
 * is far below a pixel.)
 */
function shadeTolerance(v: VariableView): number {
  const b = v.rules.bounds;
  return Math.max(b.tolerance, b.relativeTolerance * (b.upper - b.lower));
}

function ChartPlaceholder({ text, height }: { text: string; height: number }) {
  return (
    <div
      style={{ height }}
      className="flex items-center justify-center rounded-md bg-slate-100 text-sm text-slate-500 dark:bg-slate-800/60 dark:text-slate-400"
      aria-busy="true"
    >
      {text}
    </div>
  );
}

function LineField({ runId, variable: v, position, baseline, finding, zoom, onZoom, onKeyDown }: FieldPanelProps) {
  const step = v.steps[position] ?? null;
  const previousStep = position > 0 ? v.steps[position - 1]! : null;
  const firstStep = position > 1 ? v.steps[0]! : null;
  const options: StepOptions = { points: PROFILE_POINTS, from: zoom?.from, to: zoom?.to };
  const overlayBaseline = usableBaseline(baseline, v.name);
  const current = useStep(runId, v.name, step, options, true);
  const previous = useStep(runId, v.name, previousStep, options);
  const first = useStep(runId, v.name, firstStep, options);
  const base = useStep(overlayBaseline?.runId ?? runId, v.name, overlayBaseline ? step : null, options);
  const size = v.shape[0] ?? 0;
  const axis = v.axes[0]?.name ?? 'x';

  const series = useMemo(() => {
    const list: ProfileSeries[] = [];
    const add = (
      id: string,
      label: string,
      data: StepView | undefined,
      className: string,
      dash?: ProfileSeries['dash'],
      width?: number,
    ) => {
      if (data?.index) list.push({ id, label, index: data.index, values: data.values, className, dash, width });
    };
    add('first', 'first step', first.data, 'stroke-emerald-600 dark:stroke-emerald-400', 'dotted');
    add('previous', 'previous step', previous.data, 'stroke-slate-400 dark:stroke-slate-500', 'dashed');
    add('baseline', 'baseline', base.data, 'stroke-amber-600 dark:stroke-amber-400', 'dashed');
    add('current', 'this step', current.data, 'stroke-sky-700 dark:stroke-sky-400', undefined, 2);
    return list;
  }, [first.data, previous.data, base.data, current.data]);

  const bounds = useMemo(() => ({ lower: v.rules.bounds.lower, upper: v.rules.bounds.upper }), [v]);
  const spans = useMemo(
    () =>
      current.data?.index ? outOfBoundsSpans(current.data.index, current.data.values, bounds, shadeTolerance(v)) : [],
    [current.data, bounds, v],
  );
  const marks = useMemo((): ProfileMark[] => {
    const data = current.data;
    if (!data?.index || !data.newExtrema) return [];
    const at = new Map(data.index.map((cell, i) => [cell, data.values[i]]));
    return data.newExtrema.flatMap((cell) => {
      const value = at.get(cell);
      return value === null || value === undefined ? [] : [{ cell, value }];
    });
  }, [current.data]);
  const range = fastestRange(finding && finding.variable === v.name ? finding.location?.ranges : undefined);
  const highlight = range && range.last >= range.first ? { from: range.first, to: range.last } : null;
  const xDomain: [number, number] = zoom ? [zoom.from, zoom.to] : [0, Math.max(0, size - 1)];

  const legend: LegendItem[] = [
    { label: 'this step', swatch: 'stroke-sky-700 dark:stroke-sky-400', shape: 'line' },
    ...(previous.data
      ? [
          {
            label: position === 1 ? 'previous (first) step' : 'previous step',
            swatch: 'stroke-slate-400',
            shape: 'line' as const,
            dash: 'dashed' as const,
          },
        ]
      : []),
    ...(first.data
      ? [
          {
            label: 'first step',
            swatch: 'stroke-emerald-600 dark:stroke-emerald-400',
            shape: 'line' as const,
            dash: 'dotted' as const,
          },
        ]
      : []),
    ...(base.data
      ? [
          {
            label: 'baseline, same step',
            swatch: 'stroke-amber-600 dark:stroke-amber-400',
            shape: 'line' as const,
            dash: 'dashed' as const,
          },
        ]
      : []),
    {
      label: 'bounds',
      swatch: 'stroke-red-600',
      shape: 'line',
      dash: 'dashed',
      title: `${formatNumber(bounds.lower)} to ${formatNumber(bounds.upper)}; cells beyond them are shaded red.`,
    },
    {
      label: 'new extremum',
      swatch: 'fill-none stroke-fuchsia-600 dark:stroke-fuchsia-400',
      shape: 'dot',
      title:
        'An extremum of this step with no extremum of the same kind within 3 cells at the previous step (marked only at steps where the extrema count rose).',
    },
  ];

  return (
    <div className="space-y-3">
      <div className="flex flex-wrap items-center gap-2 text-xs text-slate-600 dark:text-slate-400">
        {zoom ? (
          <>
            <span data-testid="zoom-label">
              Cells {zoom.from}–{zoom.to} of {size}, at full resolution
            </span>
            <button
              type="button"
              className="rounded border border-slate-300 px-2 py-0.5 hover:bg-slate-50 dark:border-slate-700 dark:hover:bg-slate-800"
              onClick={() => onZoom(null)}
            >
              Show the whole line
            </button>
          </>
        ) : (
          <span>
            All {size} cells
            {current.data && !current.data.complete
              ? `, thinned to ${current.data.index?.length ?? 0} points keeping every extremum`
              : ''}
          </span>
        )}
        {highlight && !zoom ? (
          <button
            type="button"
            className="rounded border border-slate-300 px-2 py-0.5 hover:bg-slate-50 dark:border-slate-700 dark:hover:bg-slate-800"
            onClick={() => onZoom(cellWindow(highlight.from, highlight.to, size))}
          >
            Zoom to the finding&apos;s cells
          </button>
        ) : null}
        {overlayBaseline && base.isError ? <span>The baseline has no step {step}.</span> : null}
      </div>
      {current.isError ? (
        <Notice tone="error">
          Could not load step {step}: {current.error.message}
        </Notice>
      ) : !current.data ? (
        <ChartPlaceholder text={`Loading step ${step}…`} height={300} />
      ) : (
        <ProfileChart
          series={series}
          xDomain={xDomain}
          bounds={bounds}
          spans={spans}
          marks={marks}
          highlight={highlight}
          xLabel={`cell along ${axis}`}
          yLabel={v.name}
          ariaLabel={`Field ${v.name} at step ${step}. Left and right arrow keys move one step, Page Up and Page Down ten, Home and End to the first and last step.`}
          onKeyDown={onKeyDown}
        />
      )}
      <Legend items={legend} label="Field chart legend" />
    </div>
  );
}

/** The finding's box in the block coordinates of a downsampled plane. */
function planeBox(finding: FindingView | null, v: VariableView, rows: number, cols: number) {
  if (!finding || finding.variable !== v.name || !finding.location) return null;
  const rowAxis = v.axes[v.axes.length - 2];
  const colAxis = v.axes[v.axes.length - 1];
  if (!rowAxis || !colAxis) return null;
  const r = finding.location.ranges.find((x) => x.axis === rowAxis.name);
  const c = finding.location.ranges.find((x) => x.axis === colAxis.name);
  if (!r && !c) return null;
  const rr = r ? blockRange(r.first, r.last, rowAxis.size, rows) : { from: 0, to: rows - 1 };
  const cc = c ? blockRange(c.first, c.last, colAxis.size, cols) : { from: 0, to: cols - 1 };
  return { rowFrom: rr.from, rowTo: rr.to, colFrom: cc.from, colTo: cc.to };
}

function PlaneField({ runId, variable: v, position, finding, onKeyDown }: FieldPanelProps) {
  const sliceId = useId();
  const depth = v.shape.length === 3 ? v.shape[0]! : 0;
  const [slice, setSlice] = useState(Math.floor(depth / 2));
  const sliceParam = depth > 0 ? slice : undefined;
  const step = v.steps[position] ?? null;
  const current = useStep(runId, v.name, step, { points: PLANE_POINTS, slice: sliceParam }, true);
  const growth = useQuery({
    queryKey: runKeys.growth(runId, v.name, step ?? -1, sliceParam),
    queryFn: ({ signal }) => getJson<GrowthView>(runApi.growth(runId, v.name, step ?? 0, sliceParam), signal),
    enabled: step !== null && position > 0,
    retry: retryServerErrors,
    placeholderData: keepPreviousData,
  });
  const b = v.rules.bounds;
  const tol = shadeTolerance(v);
  const flag = useCallback((value: number) => value > b.upper + tol || value < b.lower - tol, [b.upper, b.lower, tol]);
  const rowAxis = v.axes[v.axes.length - 2]?.name ?? 'y';
  const colAxis = v.axes[v.axes.length - 1]?.name ?? 'x';
  const fieldDomain = useMemo(
    () => extentOf([current.data?.values ?? []], { include: [b.lower, b.upper], pad: 0 }),
    [current.data, b.lower, b.upper],
  );
  const growthDomain = useMemo(() => symmetricExtent(growth.data?.values ?? []), [growth.data]);

  return (
    <div
      className="space-y-4 rounded focus-visible:outline-2 focus-visible:outline-offset-4 focus-visible:outline-sky-600"
      role="group"
      tabIndex={0}
      onKeyDown={onKeyDown}
      aria-label={`Field ${v.name} at step ${step}; arrow keys move the step.`}
      data-testid="plane-field"
    >
      {depth > 0 ? (
        <div className="flex flex-wrap items-center gap-3 text-sm">
          <label htmlFor={sliceId} className="font-medium">
            Slice along {v.axes[0]?.name ?? 'z'}
          </label>
          <input
            id={sliceId}
            type="range"
            min={0}
            max={depth - 1}
            value={slice}
            onChange={(e) => setSlice(Number(e.target.value))}
            className="w-48 accent-sky-600"
            data-testid="slice-slider"
          />
          <output htmlFor={sliceId} className="tabular-nums">
            {slice} of 0–{depth - 1}
          </output>
        </div>
      ) : null}
      <div className="grid gap-6 xl:grid-cols-2">
        <figure className="min-w-0">
          <figcaption className="mb-1 text-sm font-medium">Field at step {step}</figcaption>
          {current.isError ? (
            <Notice tone="error">
              Could not load step {step}: {current.error.message}
            </Notice>
          ) : !current.data?.rows ? (
            <ChartPlaceholder text={`Loading step ${step}…`} height={240} />
          ) : (
            <HeatMap
              rows={current.data.rows}
              cols={current.data.cols ?? 1}
              values={current.data.values}
              domain={fieldDomain}
              scheme="sequential"
              flag={flag}
              box={planeBox(finding, v, current.data.rows, current.data.cols ?? 1)}
              xLabel={colAxis}
              yLabel={rowAxis}
              legend={v.name}
              ariaLabel={`Heat map of ${v.name} at step ${step}`}
              testId="heat-map-field"
            />
          )}
          <p className="mt-1 text-xs text-slate-500">
            {current.data && !current.data.complete ? 'Block averages of the cells. ' : ''}Cells outside the bounds (
            {formatNumber(b.lower)} to {formatNumber(b.upper)}) are outlined in red.
          </p>
        </figure>
        <figure className="min-w-0">
          <figcaption className="mb-1 text-sm font-medium">
            Where variation grew{growth.data ? `, step ${growth.data.previousStep} → ${growth.data.step}` : ''}
          </figcaption>
          {position === 0 ? (
            <p className="rounded-md bg-slate-100 p-4 text-sm text-slate-600 dark:bg-slate-800/60 dark:text-slate-300">
              The first step has nothing before it to compare with; move to a later step.
            </p>
          ) : growth.isError ? (
            <Notice tone="error">Could not compute the growth: {growth.error.message}</Notice>
          ) : !growth.data ? (
            <ChartPlaceholder text="Computing where variation grew…" height={240} />
          ) : (
            <HeatMap
              rows={growth.data.rows}
              cols={growth.data.cols}
              values={growth.data.values}
              domain={growthDomain}
              scheme="diverging"
              box={planeBox(finding, v, growth.data.rows, growth.data.cols)}
              xLabel={colAxis}
              yLabel={rowAxis}
              legend="growth of local variation"
              ariaLabel={`Heat map of where the local variation of ${v.name} grew between steps ${growth.data.previousStep} and ${growth.data.step}`}
              testId="heat-map-growth"
            />
          )}
          {growth.data ? (
            <p className="mt-1 text-xs text-slate-500">
              Red: local variation (sum of |differences| to the next cell along each axis) grew; blue: it fell. Sum over
              the plane {formatNumber(growth.data.total)}, largest single cell {formatNumber(growth.data.peak)}.
            </p>
          ) : null}
        </figure>
      </div>
    </div>
  );
}

/** The field at the chosen step: a profile chart for 1D variables, heat maps for 2D and 3D. */
export function FieldPanel(props: FieldPanelProps) {
  return props.variable.shape.length === 1 ? <LineField {...props} /> : <PlaneField {...props} />;
}
