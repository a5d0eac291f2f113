import { useEffect, useRef } from 'react';
import uPlot from 'uplot';
import 'uplot/dist/uPlot.min.css';
import { formatTick, indexRangesToX, plottable, seriesStyle } from '../../lib/view/chart-data';
import { PALETTE, SERIES_COLOURS } from '../../lib/view/palette';

export interface LineSeries {
  label: string;
  values: ArrayLike<number>;
  stroke?: string;
}

export interface ShadedStretch {
  /** Index range [start, end) into x. */
  start: number;
  end: number;
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
  /** Charts with the same key share the cursor. */
  syncKey?: string;
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
function shadingPlugin(stretches: ShadedStretch[], x: ArrayLike<number>): uPlot.Plugin {
  const ranges = indexRangesToX(x, stretches);
  return {
    hooks: {
      drawClear: (u) => {
        const { ctx, bbox } = u;
        ctx.save();
        ctx.globalAlpha = 0.16;
        ranges.forEach((range, i) => {
          const a = u.valToPos(range.from, 'x', true);
          const b = u.valToPos(range.to, 'x', true);
          const left = Math.max(bbox.left, Math.min(a, b));
          const right = Math.min(bbox.left + bbox.width, Math.max(a, b));
          if (right <= left) return;
          ctx.fillStyle = stretches[i]!.colour;
          ctx.fillRect(left, bbox.top, Math.max(1, right - left), bbox.height);
        });
        ctx.restore();
      },
    },
  };
}

/** A uPlot line chart in our palette that fills its container's width and redraws when the data change. */
export default function LineChart({ title, x, xLabel, yLabel, series, height = 220, logY = false, shaded = [], syncKey }: LineChartProps) {
  const containerRef = useRef<HTMLDivElement>(null);
  const hasGaps = series.some((s) => plottable(s.values, logY) !== s.values);

  useEffect(() => {
    const container = containerRef.current;
    if (!container) return;
    const options: uPlot.Options = {
      width: Math.max(240, container.clientWidth),
      height,
      scales: { x: { time: false }, y: logY ? { distr: 3, range: logRange } : {} },
      axes: [axis(xLabel, false), axis(yLabel, true)],
      series: [
        { label: xLabel },
        ...series.map((s, i) => {
          const style = seriesStyle(i, SERIES_COLOURS);
          return { label: s.label, stroke: s.stroke ?? style.stroke, dash: style.dash, width: 1.5, points: { show: false } };
        }),
      ],
      legend: { show: true, live: true },
      cursor: syncKey ? { sync: { key: syncKey } } : {},
      plugins: shaded.length > 0 ? [shadingPlugin(shaded, x)] : [],
    };
    const data = [x, ...series.map((s) => plottable(s.values, logY))] as uPlot.AlignedData;
    const chart = new uPlot(options, data, container);
    // uPlot's stylesheet is not in a cascade layer, so it outranks utility classes; an inline font wins.
    chart.root.style.fontFamily = '"IBM Plex Sans", sans-serif';
    chart.root.style.fontSize = '12px';
    const observer = new ResizeObserver(() => {
      const width = Math.max(240, container.clientWidth);
      if (width !== chart.width) chart.setSize({ width, height });
    });
    observer.observe(container);
    return () => {
      observer.disconnect();
      chart.destroy();
    };
  }, [title, x, xLabel, yLabel, series, height, logY, shaded, syncKey]);

  return (
    <figure className="min-w-0" data-testid="line-chart">
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
