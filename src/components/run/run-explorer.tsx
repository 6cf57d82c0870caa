'use client';

import { useQuery } from '@tanstack/react-query';
import { useCallback, useEffect, useMemo, useRef, useState, type KeyboardEvent } from 'react';
import { SeriesChart } from '@/src/components/charts/series-chart';
import { Card } from '@/src/components/ui/card';
import { Notice } from '@/src/components/ui/notice';
import { clampPosition, indexOfSorted, nearestIndex, type CellWindow } from '@/src/lib/chart-math';
import { findingWindow, type RunSelection } from '@/src/lib/run-selection';
import type { ChartSeriesView, FindingView, RunPageData, VariableView } from '@/src/lib/run-views';
import { getJson, retryServerErrors, runApi, runKeys } from './api';
import { FieldPanel } from './field-panel';
import { FindingsList } from './findings-list';
import { Legend } from './legend';
import { findingMarkers, METRIC_VIEWS, metricChart, type MetricView } from './metric-views';
import { StepControl } from './step-control';

export type RunExplorerProps = { data: RunPageData; initial: RunSelection };

/** Keys that move the step while a chart has focus, and by how much. */
function stepDelta(event: KeyboardEvent, position: number, count: number): number | null {
  switch (event.key) {
    case 'ArrowRight':
      return position + 1;
    case 'ArrowLeft':
      return position - 1;
    case 'PageDown':
      return position + 10;
    case 'PageUp':
      return position - 10;
    case 'Home':
      return 0;
    case 'End':
      return count - 1;
    default:
      return null;
  }
}

function useChartSeries(runId: string | null, variable: string) {
  return useQuery({
    queryKey: runKeys.chart(runId ?? '', variable),
    queryFn: ({ signal }) => getJson<ChartSeriesView>(runApi.chart(runId ?? '', variable), signal),
    enabled: runId !== null,
    retry: retryServerErrors,
  });
}

function VariableTabs({
  variables,
  active,
  onChange,
}: {
  variables: VariableView[];
  active: string;
  onChange: (name: string) => void;
}) {
  const refs = useRef<(HTMLButtonElement | null)[]>([]);
  const move = (event: KeyboardEvent, index: number) => {
    const next = event.key === 'ArrowRight' ? index + 1 : event.key === 'ArrowLeft' ? index - 1 : null;
    if (next === null) return;
    event.preventDefault();
    const k = (next + variables.length) % variables.length;
    refs.current[k]?.focus();
    onChange(variables[k]!.name);
  };
  return (
    <div
      role="tablist"
      aria-label="Variables"
      className="flex flex-wrap gap-1 border-b border-slate-200 dark:border-slate-800"
    >
      {variables.map((v, i) => {
        const selected = v.name === active;
        return (
          <button
            key={v.name}
            ref={(el) => {
              refs.current[i] = el;
            }}
            type="button"
            role="tab"
            id={`tab-${v.name}`}
            aria-selected={selected}
            aria-controls="variable-panel"
            tabIndex={selected ? 0 : -1}
            onKeyDown={(e) => move(e, i)}
            onClick={() => onChange(v.name)}
            className={`-mb-px rounded-t-md border px-3 py-1.5 text-sm ${
              selected
                ? 'border-slate-200 border-b-white bg-white font-semibold dark:border-slate-800 dark:border-b-slate-900 dark:bg-slate-900'
                : 'border-transparent text-slate-600 hover:bg-slate-100 dark:text-slate-300 dark:hover:bg-slate-800'
            }`}
          >
            {v.name} <span className="text-xs font-normal text-slate-500">{v.shape.join('×')}</span>
          </button>
        );
      })}
    </div>
  );
}

/**
 * The interactive part of the run page: findings, variable tabs, the metric chart and the field
 * at the chosen step. Selection (variable, step, zoom) lives here and in the URL, so a link
 * opens the same view.
 */
export function RunExplorer({ data, initial }: RunExplorerProps) {
  const runId = data.run.id;
  const [variableName, setVariableName] = useState(initial.variable);
  const [position, setPositionRaw] = useState(initial.position);
  const [findingId, setFindingId] = useState<string | null>(initial.findingId);
  const [zoom, setZoom] = useState<CellWindow | null>(null);
  const [view, setView] = useState<MetricView>('tv');
  const fieldRef = useRef<HTMLDivElement>(null);

  const variable = data.variables.find((v) => v.name === variableName) ?? data.variables[0]!;
  const count = variable.steps.length;
  const step = variable.steps[position] ?? 0;
  const finding = data.findings.find((f) => f.id === findingId) ?? null;
  const baselineRun =
    data.baseline && !data.baseline.isThisRun && data.baseline.variables.includes(variable.name)
      ? data.baseline.runId
      : null;

  const chart = useChartSeries(runId, variable.name);
  const baselineChart = useChartSeries(baselineRun, variable.name);

  const setPosition = useCallback((p: number) => setPositionRaw(clampPosition(p, count)), [count]);

  // Keep the address bar in step with the view, without a navigation, so a copied link reopens
  // it. Not on the first render: changing the URL while the page is still hydrating makes the
  // router re-render a half-hydrated tree; the page as loaded already matches its URL anyway.
  const synced = useRef({ variable: initial.variable, position: initial.position, changed: false });
  useEffect(() => {
    const last = synced.current;
    if (!last.changed && last.variable === variable.name && last.position === position) return;
    synced.current = { variable: variable.name, position, changed: true };
    const url = new URL(window.location.href);
    url.searchParams.set('variable', variable.name);
    url.searchParams.set('step', String(step));
    window.history.replaceState(window.history.state, '', url);
  }, [variable.name, position, step]);

  const onKeyDown = useCallback(
    (event: KeyboardEvent<HTMLDivElement>) => {
      const next = stepDelta(event, position, count);
      if (next === null) return;
      event.preventDefault();
      setPosition(next);
    },
    [position, count, setPosition],
  );

  const selectFinding = (f: FindingView) => {
    const v = data.variables.find((x) => x.name === f.variable);
    if (!v) return;
    setVariableName(v.name);
    setFindingId(f.id);
    const p = f.step === null ? -1 : indexOfSorted(v.steps, f.step);
    setPositionRaw(p >= 0 ? p : 0);
    setZoom(v.shape.length === 1 ? findingWindow(f, v.shape[0] ?? 0) : null);
    fieldRef.current?.scrollIntoView({ block: 'nearest', behavior: 'smooth' });
  };

  const changeVariable = (name: string) => {
    if (name === variable.name) return;
    const v = data.variables.find((x) => x.name === name);
    setVariableName(name);
    setZoom(null);
    setFindingId(null);
    // Stay at the same step number when the other variable has it.
    const p = v ? indexOfSorted(v.steps, step) : -1;
    setPositionRaw(p >= 0 ? p : 0);
  };

  const selectStep = useCallback(
    (s: number) => {
      const p = nearestIndex(variable.steps, s);
      if (p >= 0) setPosition(p);
    },
    [variable.steps, setPosition],
  );

  const markers = useMemo(() => findingMarkers(data.findings, variable.name), [data.findings, variable.name]);
  const spec = useMemo(
    () => (chart.data ? metricChart(view, chart.data, baselineChart.data ?? null, variable) : null),
    [view, chart.data, baselineChart.data, variable],
  );

  return (
    <div className="grid gap-6 lg:grid-cols-[minmax(0,22rem)_minmax(0,1fr)]">
      <div className="space-y-6">
        <Card title={`Findings (${data.findings.length})`}>
          <FindingsList findings={data.findings} activeId={findingId} onSelect={selectFinding} />
        </Card>
      </div>

      <div className="min-w-0 space-y-4">
        {data.variables.length > 1 ? (
          <VariableTabs variables={data.variables} active={variable.name} onChange={changeVariable} />
        ) : null}
        <div
          id="variable-panel"
          role={data.variables.length > 1 ? 'tabpanel' : undefined}
          aria-labelledby={data.variables.length > 1 ? `tab-${variable.name}` : undefined}
          className="space-y-4"
        >
          <Card
            title={`${variable.name}: metrics per step`}
            actions={
              <div role="group" aria-label="Metric shown" className="flex flex-wrap gap-1">
                {METRIC_VIEWS.map((m) => (
                  <button
                    key={m.id}
                    type="button"
                    aria-pressed={view === m.id}
                    onClick={() => setView(m.id)}
                    className={`rounded-md px-2 py-1 text-xs ${view === m.id ? 'bg-slate-900 text-white dark:bg-slate-100 dark:text-slate-900' : 'text-slate-600 hover:bg-slate-100 dark:text-slate-300 dark:hover:bg-slate-800'}`}
                  >
                    {m.label}
                  </button>
                ))}
              </div>
            }
          >
            {chart.isError ? (
              <Notice tone="error">Could not load the metrics: {chart.error.message}</Notice>
            ) : !chart.data || !spec ? (
              <div
                className="flex h-[284px] items-center justify-center rounded-md bg-slate-100 text-sm text-slate-500 dark:bg-slate-800/60"
                aria-busy="true"
              >
                Loading the metrics of {variable.name}…
              </div>
            ) : (
              <div className="space-y-2" data-testid="metric-chart" data-view={view}>
                <SeriesChart
                  x={chart.data.step}
                  lines={spec.lines}
                  bands={spec.bands}
                  rules={spec.rules}
                  markers={markers}
                  current={step}
                  onSelect={selectStep}
                  onKeyDown={onKeyDown}
                  yLabel={spec.yLabel}
                  ariaLabel={`${METRIC_VIEWS.find((m) => m.id === view)?.label} of ${variable.name} per step; click a step to show its field, or use the arrow keys.`}
                  testId="tv-chart"
                />
                <Legend items={spec.legend} label="Metric chart legend" />
                <p className="text-xs text-slate-600 dark:text-slate-400">{spec.note}</p>
                {!chart.data.complete ? (
                  <p className="text-xs text-slate-500">
                    {chart.data.count} steps, drawn at {chart.data.positions.length} of them (each stretch keeps its
                    highest and lowest values and every step with a finding).
                  </p>
                ) : null}
                {data.baseline && baselineRun === null && !data.baseline.isThisRun ? (
                  <p className="text-xs text-slate-500">The baseline run has no variable {variable.name}.</p>
                ) : null}
              </div>
            )}
          </Card>

          <div ref={fieldRef}>
            <Card title={`${variable.name} at the chosen step`}>
              <div className="space-y-4">
                <StepControl steps={variable.steps} times={variable.times} position={position} onChange={setPosition} />
                <FieldPanel
                  key={variable.name}
                  runId={runId}
                  variable={variable}
                  position={position}
                  baseline={data.baseline}
                  finding={finding}
                  zoom={zoom}
                  onZoom={setZoom}
                  onKeyDown={onKeyDown}
                />
              </div>
            </Card>
          </div>
        </div>
      </div>
    </div>
  );
}
