import { useCallback, useEffect, useLayoutEffect, useMemo, useRef, useState, type KeyboardEvent } from 'react';
// The ES module build of the core component: the CommonJS one under lib/ reaches the bundle as a module object.
import ReactEChartsCore from 'echarts-for-react/esm/core';
import type { EChartsType } from 'echarts/core';
import { echarts } from '../lib/echarts';
import { buildControlChartOption, edgeLabelSeries, indexChart, markerSets, nearestPoint, SELECTED_SERIES_ID, thinMarkers, type ChartIndex, type MarkerSets } from '../lib/control-chart-option';
import type { CharacteristicChart, ChartPointRecord } from '@shared/schemas/charts';
import type { PlantClock } from '@shared/time';

export interface ZoomWindow {
  /** First and last point index in view. */
  first: number;
  last: number;
}

interface ControlChartProps {
  chart: CharacteristicChart;
  /** The plant's clock, in which production times are shown. */
  clock: PlantClock;
  /** Index of the selected point, or null. */
  selected: number | null;
  onSelect: (index: number) => void;
  /** Enter on a selected point, or a click: show the lot. */
  onOpen: (index: number) => void;
  onZoom?: (window: ZoomWindow) => void;
  /** Bumped by the page to bring the selected point into view and show its tooltip. */
  revealRequest?: number;
  className?: string;
}

/** Points shown either side of a point brought into view. */
const REVEAL_SPAN = 60;

interface ZoomEvent {
  start?: number;
  end?: number;
  startValue?: number;
  endValue?: number;
  batch?: ZoomEvent[];
}

/**
 * The window a zoom event leaves in view, from the event itself: reading it back with getOption()
 * would copy every series of the chart on each step of the wheel.
 */
function zoomFromEvent(event: ZoomEvent, index: ChartIndex): ZoomWindow {
  const e = event.batch?.[0] ?? event;
  const span = index.last - index.first + 1;
  const from = e.startValue ?? (e.start !== undefined ? index.first - 0.5 + (span * e.start) / 100 : index.first);
  const to = e.endValue ?? (e.end !== undefined ? index.first - 0.5 + (span * e.end) / 100 : index.last);
  return { first: Math.max(index.first, Math.ceil(from)), last: Math.min(index.last, Math.floor(to)) };
}

/**
 * The location chart above the dispersion chart, one zoomable axis for both. Keyboard: with the
 * chart focused, ← and → step from point to point (Page Up / Page Down by ten, Home / End to the
 * ends), Enter opens the lot of the selected point.
 */
export function ControlChart({ chart, clock, selected, onSelect, onOpen, onZoom, revealRequest = 0, className }: ControlChartProps) {
  const index = useMemo(() => indexChart(chart), [chart]);
  const option = useMemo(() => buildControlChartOption(chart, clock, index), [chart, clock, index]);
  const instance = useRef<EChartsType | null>(null);
  const [ready, setReady] = useState(0);
  const positionOf = useMemo(() => new Map(chart.points.map((p, i) => [p.index, i])), [chart]);
  const marks = useMemo(() => markerSets(chart, index), [chart, index]);

  // echarts keeps the listeners bound at start-up; they read the current props through this.
  const latest = useRef<{ chart: CharacteristicChart; index: ChartIndex; marks: MarkerSets; onSelect: typeof onSelect; onOpen: typeof onOpen; onZoom: typeof onZoom }>({ chart, index, marks, onSelect, onOpen, onZoom });
  useLayoutEffect(() => {
    latest.current = { chart, index, marks, onSelect, onOpen, onZoom };
  });
  const rethin = useRef(0);
  const zoomed = useRef<ZoomWindow | null>(null);

  const showTipAt = useCallback((p: ChartPointRecord) => {
    const chartInstance = instance.current;
    if (!chartInstance) return;
    const [x, y] = chartInstance.convertToPixel({ xAxisIndex: 0, yAxisIndex: 0 }, [p.index, p.location]) as number[];
    chartInstance.dispatchAction({ type: 'showTip', x, y });
  }, []);

  /** Moves the zoom window just enough to hold the point. */
  const bringIntoView = useCallback(
    (p: ChartPointRecord, centre: boolean) => {
      const chartInstance = instance.current;
      if (!chartInstance) return;
      const known = zoomed.current;
      const view = known && known.first >= index.first && known.last <= index.last ? known : { first: index.first, last: index.last };
      if (!centre && p.index >= view.first && p.index <= view.last) return;
      const span = centre ? Math.min(REVEAL_SPAN, Math.max(10, view.last - view.first)) : view.last - view.first;
      const start = Math.max(index.first, Math.min(index.last - span, p.index - Math.round(span / 2)));
      chartInstance.dispatchAction({ type: 'dataZoom', startValue: start - 0.5, endValue: Math.min(index.last, start + span) + 0.5 });
    },
    [index],
  );

  useEffect(() => () => window.clearTimeout(rethin.current), []);

  // The selection ring is its own series, so moving it never redraws the thousands of points.
  useEffect(() => {
    const chartInstance = instance.current;
    if (!chartInstance) return;
    const p = selected === null ? undefined : index.byIndex.get(selected);
    chartInstance.setOption({ series: [{ id: SELECTED_SERIES_ID, data: p ? [[p.index, p.location]] : [] }] });
  }, [selected, index, option, ready]);

  // A new state of the chart (after an exclusion, say) keeps the part of the axis the user was looking at.
  useEffect(() => {
    const chartInstance = instance.current;
    const view = zoomed.current;
    if (chartInstance && view && view.first >= index.first && view.last <= index.last) chartInstance.dispatchAction({ type: 'dataZoom', startValue: view.first - 0.5, endValue: view.last + 0.5 });
  }, [option, index, ready]);

  // Each request is served once, when the chart is drawn and the point known: a later click on another
  // point selects it without moving the view.
  const revealed = useRef(0);
  useEffect(() => {
    if (revealRequest === revealed.current || selected === null || ready === 0) return;
    const p = index.byIndex.get(selected);
    if (!p) return;
    bringIntoView(p, true);
    // The zoom redraws first; the tooltip then finds the point where it now lies. The request counts as
    // served only then: a render in between runs this again.
    const timer = window.setTimeout(() => {
      revealed.current = revealRequest;
      showTipAt(p);
    }, 80);
    return () => window.clearTimeout(timer);
  }, [revealRequest, ready, selected, index, bringIntoView, showTipAt]);

  const onChartReady = useCallback((chartInstance: EChartsType) => {
    instance.current = chartInstance;
    chartInstance.getZr().on('click', (event: { offsetX: number; offsetY: number }) => {
      const pixel = [event.offsetX, event.offsetY];
      if (!chartInstance.containPixel({ gridIndex: [0, 1] }, pixel)) return;
      const x = chartInstance.convertFromPixel({ xAxisIndex: 0 }, pixel) as unknown as number;
      const p = nearestPoint(latest.current.chart, Array.isArray(x) ? x[0] : x);
      if (!p) return;
      latest.current.onSelect(p.index);
      latest.current.onOpen(p.index);
    });
    chartInstance.on('datazoom', (event: unknown) => {
      const view = zoomFromEvent(event as ZoomEvent, latest.current.index);
      zoomed.current = view;
      latest.current.onZoom?.(view);
      // Once the wheel rests, the markers are thinned again for the part in view (all of them when zoomed in),
      // and the edge labels name the limits that end at the right of the view.
      window.clearTimeout(rethin.current);
      rethin.current = window.setTimeout(() => {
        chartInstance.setOption({ series: [...thinMarkers(latest.current.marks, view.first, view.last), ...edgeLabelSeries(latest.current.chart, view.last)] });
      }, 120);
    });
    setReady((n) => n + 1);
  }, []);

  const onKeyDown = (event: KeyboardEvent<HTMLDivElement>) => {
    const pts = chart.points;
    if (pts.length === 0) return;
    const at = selected === null ? -1 : (positionOf.get(selected) ?? -1);
    const step: Record<string, number> = { ArrowRight: 1, ArrowLeft: -1, PageDown: 10, PageUp: -10 };
    let next: number | null = null;
    if (event.key in step) next = at === -1 ? (step[event.key] > 0 ? 0 : pts.length - 1) : Math.max(0, Math.min(pts.length - 1, at + step[event.key]));
    else if (event.key === 'Home') next = 0;
    else if (event.key === 'End') next = pts.length - 1;
    else if ((event.key === 'Enter' || event.key === ' ') && selected !== null) {
      event.preventDefault();
      onOpen(selected);
      return;
    }
    if (next === null) return;
    event.preventDefault();
    const p = pts[next];
    onSelect(p.index);
    bringIntoView(p, false);
    window.setTimeout(() => showTipAt(p), 30);
  };

  return (
    <div
      tabIndex={0}
      role="group"
      aria-roledescription="control chart"
      aria-label={`${chart.characteristic.name}: ${chart.points.length} points. Use the arrow keys to step through the points and Enter to open a lot.`}
      onKeyDown={onKeyDown}
      className={className ?? 'h-[34rem] rounded-md focus-visible:outline-2 focus-visible:outline-offset-2 focus-visible:outline-accent-600'}
      data-testid="control-chart"
    >
      <ReactEChartsCore
        echarts={echarts}
        option={option}
        notMerge
        lazyUpdate
        onChartReady={onChartReady}
        style={{ height: '100%', width: '100%' }}
        opts={{ renderer: 'canvas' }}
      />
    </div>
  );
}
