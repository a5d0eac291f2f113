import { useEffect, useLayoutEffect, useRef } from 'react';
import uPlot from 'uplot';
import 'uplot/dist/uPlot.min.css';
import { formatTick, indexRangesToX, plottable, seriesStyle } from '../../lib/view/chart-data';
import { PALETTE, SERIES_COLOURS } from '../../lib/view/palette';
import { dragShift, panBy, rangeBetween, wheelFactor, zoomAt, type XRange } from '../../lib/view/zoom';

export interface LineSeries {
  label: string;
  values: ArrayLike<number>;
  stroke?: string;
  dash?: number[];
  width?: number;
}

export interface ShadedStretch {
  /** Index range [start, end) into x. */
  start: number;
  end: number;
  colour: string;
}

/** A background stretch given in x units, such as a warning band over time. */
export interface ShadedBand extends XRange {
  colour: string;
}

export interface LineChartProps {
  title: string;
  x: ArrayLike<number>;
  xLabel: string;
  yLabel: string;
  series: LineSeries[];
  height?: number;
  logY?: boolean;
  /** Background stretches, such as where warnings were raised. */
  shaded?: ShadedStretch[];
  /** Background stretches in x units, drawn like `shaded`. */
  bands?: ShadedBand[];
  /** Charts with the same key share the cursor. */
  syncKey?: string;
  /** The visible x range (null: all); only with onXRangeChange. */
  xRange?: XRange | null;
  /**
   * Makes the x axis zoomable by the caller, which holds the range (so charts can share it): the
   * wheel zooms about the pointer, a drag selects a range, a shift-drag pans, a double click shows
   * all. The chart asks for each new range here and shows whatever xRange it is given.
   */
  onXRangeChange?: (range: XRange | null) => void;
}

const AXIS_FONT = '11px "JetBrains Mono", monospace';
const LABEL_FONT = '600 12px "IBM Plex Sans", sans-serif';

function axis(label: string, formatted: boolean): uPlot.Axis {
  return {
    label,
    ...(formatted ? { values: (_: uPlot, ticks: (number | null)[]) => ticks.map((tick) => (tick == null ? '' : formatTick(tick))), size: 56 } : {}),
    stroke: PALETTE.graphite,
    font: AXIS_FONT,
    labelFont: LABEL_FONT,
    grid: { stroke: PALETTE.grid, width: 1 },
    ticks: { stroke: PALETTE.rule, width: 1 },
  };
}

/**
 * Log-axis range that survives what sheets produce: a single repeated value (uPlot's own log
 * range collapses on it) or no drawable value at all.
 */
const logRange: uPlot.Range.Function = (_u, min, max) => {
  if (min == null || max == null || !(min > 0)) return [1, 10];
  return min === max ? uPlot.rangeLog(min / 10, max * 10, 10, true) : uPlot.rangeLog(min, max, 10, true);
};

/** Paints the shaded stretches behind the lines, across the plotting area. */
function shadingPlugin(stretches: ShadedStretch[], bands: ShadedBand[], x: ArrayLike<number>): uPlot.Plugin {
  const ranges = [
    ...indexRangesToX(x, stretches).map((range, i) => ({ from: range.from, to: range.to, colour: stretches[i]!.colour })),
    ...bands.map((band) => ({ from: band.min, to: band.max, colour: band.colour })),
  ];
  return {
    hooks: {
      drawClear: (u) => {
        const { ctx, bbox } = u;
        ctx.save();
        ctx.globalAlpha = 0.16;
        ranges.forEach((range) => {
          const a = u.valToPos(range.from, 'x', true);
          const b = u.valToPos(range.to, 'x', true);
          const left = Math.max(bbox.left, Math.min(a, b));
          const right = Math.min(bbox.left + bbox.width, Math.max(a, b));
          if (right <= left) return;
          ctx.fillStyle = range.colour;
          ctx.fillRect(left, bbox.top, Math.max(1, right - left), bbox.height);
        });
        ctx.restore();
      },
    },
  };
}

// Shared empty defaults: a fresh [] per render would change the effect's inputs and rebuild the chart on every render.
const NO_STRETCHES: ShadedStretch[] = [];
const NO_BANDS: ShadedBand[] = [];

/** The first and last x (the data's full range), or null when there are fewer than two distinct values. */
function boundsOf(x: ArrayLike<number>): XRange | null {
  const min = x[0], max = x[x.length - 1];
  return min !== undefined && max !== undefined && max > min ? { min, max } : null;
}

/** Wheel, drag and shift-drag on the plot, each answered with the range it asks for (see LineChartProps.onXRangeChange). */
function zoomHandlers(bounds: XRange, current: () => XRange | null, ask: (range: XRange | null) => void) {
  const shown = () => current() ?? bounds;
  const startPan = (u: uPlot, down: MouseEvent) => {
    const start = shown();
    const width = u.over.clientWidth;
    const move = (e: MouseEvent) => ask(panBy(start, dragShift(start, e.clientX - down.clientX, width), bounds));
    const up = () => {
      document.removeEventListener('mousemove', move);
      document.removeEventListener('mouseup', up);
    };
    document.addEventListener('mousemove', move);
    document.addEventListener('mouseup', up);
  };
  const bind: uPlot.Cursor.Bind = {
    mousedown: (u, _target, handler) => (e) => {
      if (!e.shiftKey) return handler(e);
      e.preventDefault();
      startPan(u, e);
      return null;
    },
    dblclick: () => () => {
      ask(null);
      return null;
    },
  };
  const onSelect = (u: uPlot) => {
    const { left, width } = u.select;
    if (width <= 0) return;
    u.setSelect({ left: 0, top: 0, width: 0, height: 0 }, false);
    const range = rangeBetween(u.posToVal(left, 'x'), u.posToVal(left + width, 'x'), bounds);
    if (range) ask(range);
  };
  const onWheel = (u: uPlot) => (e: WheelEvent) => {
    e.preventDefault();
    ask(zoomAt(shown(), u.posToVal(e.offsetX, 'x'), wheelFactor(e.deltaY, e.deltaMode), bounds));
  };
  return { bind, onSelect, onWheel };
}

/** A uPlot line chart in our palette that fills its container's width and redraws when the data change. */
export default function LineChart({ title, x, xLabel, yLabel, series, height = 220, logY = false, shaded = NO_STRETCHES, bands = NO_BANDS, syncKey, xRange = null, onXRangeChange }: LineChartProps) {
  const containerRef = useRef<HTMLDivElement>(null);
  const chartRef = useRef<uPlot | null>(null);
  // Handlers read the latest range and callback without rebuilding the chart on every zoom step.
  const rangeRef = useRef(xRange);
  rangeRef.current = xRange;
  const askRef = useRef(onXRangeChange);
  askRef.current = onXRangeChange;
  const zoomable = onXRangeChange !== undefined;
  // A zoom step redraws only the charts on screen; one scrolled out of view catches up when it comes back.
  const onScreenRef = useRef(true);
  const behindRef = useRef(false);
  const hasGaps = series.some((s) => plottable(s.values, logY) !== s.values);
  const widthRef = useRef(0);

  // Every chart of a render reads its width here, before any of them builds (below): a read after another chart has
  // changed the page would make the browser lay the whole page out again, once per chart.
  useLayoutEffect(() => {
    widthRef.current = containerRef.current?.clientWidth ?? 0;
  }, [title, x, xLabel, yLabel, series, height, logY, shaded, bands, syncKey, zoomable]);

  useEffect(() => {
    const container = containerRef.current;
    if (!container) return;
    const bounds = zoomable ? boundsOf(x) : null;
    const zoom = bounds ? zoomHandlers(bounds, () => rangeRef.current, (range) => askRef.current?.(range)) : null;
    const options: uPlot.Options = {
      width: Math.max(240, widthRef.current),
      height,
      scales: { x: { time: false }, y: logY ? { distr: 3, range: logRange } : {} },
      axes: [axis(xLabel, false), axis(yLabel, true)],
      series: [
        { label: xLabel },
        ...series.map((s, i) => {
          const style = seriesStyle(i, SERIES_COLOURS);
          return { label: s.label, stroke: s.stroke ?? style.stroke, dash: s.dash ?? style.dash, width: s.width ?? 1.5, points: { show: false } };
        }),
      ],
      legend: { show: true, live: true },
      cursor: {
        ...(syncKey ? { sync: { key: syncKey } } : {}),
        ...(zoom ? { drag: { x: true, y: false, setScale: false }, bind: zoom.bind } : {}),
      },
      hooks: zoom ? { setSelect: [zoom.onSelect] } : {},
      plugins: shaded.length > 0 || bands.length > 0 ? [shadingPlugin(shaded, bands, x)] : [],
    };
    const data = [x, ...series.map((s) => plottable(s.values, logY))] as uPlot.AlignedData;
    const chart = new uPlot(options, data);
    // uPlot's stylesheet is not in a cascade layer, so it outranks utility classes; an inline font wins.
    chart.root.style.fontFamily = '"IBM Plex Sans", sans-serif';
    chart.root.style.fontSize = '12px';
    chartRef.current = chart;
    // uPlot draws in a microtask; the chart joins the page in the next one, once drawn. Drawn inside the page, each font
    // change on its canvas made the browser restyle and lay out the panel (a size container) first, once per chart.
    queueMicrotask(() => {
      if (chartRef.current === chart) container.appendChild(chart.root);
    });
    const wheel = zoom?.onWheel(chart);
    if (wheel) chart.over.addEventListener('wheel', wheel, { passive: false });
    if (bounds && rangeRef.current) chart.setScale('x', rangeRef.current);
    const observer = new ResizeObserver(() => {
      const width = Math.max(240, container.clientWidth);
      if (width !== chart.width) chart.setSize({ width, height });
    });
    observer.observe(container);
    const visibility = bounds
      ? new IntersectionObserver(([entry]) => {
          onScreenRef.current = entry?.isIntersecting ?? true;
          if (!onScreenRef.current || !behindRef.current) return;
          behindRef.current = false;
          chart.setScale('x', rangeRef.current ?? bounds);
        })
      : null;
    visibility?.observe(container);
    return () => {
      observer.disconnect();
      visibility?.disconnect();
      if (wheel) chart.over.removeEventListener('wheel', wheel);
      chartRef.current = null;
      chart.destroy();
    };
  }, [title, x, xLabel, yLabel, series, height, logY, shaded, bands, syncKey, zoomable]);

  useEffect(() => {
    const chart = chartRef.current;
    const bounds = boundsOf(x);
    if (!chart || !zoomable || !bounds) return;
    if (!onScreenRef.current) {
      behindRef.current = true;
      return;
    }
    chart.setScale('x', xRange ?? bounds);
  }, [x, xRange, zoomable]);

  return (
    <figure className="min-w-0" data-testid="line-chart" data-x-label={xLabel} data-y-label={yLabel} data-zoomed={zoomable && xRange !== null ? 'true' : undefined}>
      <figcaption className="text-sm font-semibold">{title}</figcaption>
      <div ref={containerRef} className="w-full" role="img" aria-label={`${title}: ${series.map((s) => s.label).join(', ')} over ${xLabel}`} />
      {hasGaps && (
        <p className="text-xs text-graphite" data-testid="chart-gaps">
          Gaps: values that cannot be drawn ({logY ? 'infinite or not positive on this log axis' : 'infinite or undefined'}).
        </p>
      )}
    </figure>
  );
}
