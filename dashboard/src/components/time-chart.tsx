import { useLayoutEffect, useMemo, useRef, useState } from 'react';
import uPlot from 'uplot';
import 'uplot/dist/uPlot.min.css';
import UplotReact from 'uplot-react';
import { paletteColour, useTheme } from '../lib/theme';

export interface ChartSeries {
  label: string;
  /** Display unit, shown on the axis and in the legend. */
  unit: string;
  values: (number | null)[];
  /** Palette slot: chart-1 … chart-4. */
  colour: 1 | 2 | 3 | 4;
  /** Second axis on the right (e.g. current next to voltage). */
  rightAxis?: boolean;
  /** Draw as steps (switch states). */
  stepped?: boolean;
  fill?: boolean;
  /** Fraction digits in the legend. */
  digits?: number;
}

export interface TimeChartProps {
  title: string;
  /** One or two sentences saying what the chart shows, for people who cannot see it. */
  summary: string;
  t: number[];
  series: ChartSeries[];
  timeZone: string;
  /** The time range asked for (ms): the x axis spans it even where there is no data yet. */
  range?: { from: number; to: number };
  height?: number;
  /** Called with the selected range (ms) when someone drags across the chart. */
  onZoom?: (fromMs: number, toMs: number) => void;
  /** Called after each draw (benchmarks and tests wait for it). */
  onDrawn?: () => void;
}

/** The box's width, measured before the browser paints (so the chart is built in that frame). */
function useWidth(ref: React.RefObject<HTMLElement | null>): number {
  const [width, setWidth] = useState(0);
  useLayoutEffect(() => {
    const el = ref.current;
    if (!el) return;
    setWidth(el.clientWidth);
    if (typeof ResizeObserver === 'undefined') return;
    const observer = new ResizeObserver(([entry]) => {
      if (entry) setWidth(Math.floor(entry.contentRect.width));
    });
    observer.observe(el);
    return () => observer.disconnect();
  }, [ref]);
  return width;
}

/**
 * A time series drawn with uPlot on the palette's colours, with a text summary (figcaption)
 * and a drag-to-zoom selection. Times are shown in the person's time zone.
 */
export function TimeChart(props: TimeChartProps) {
  const box = useRef<HTMLDivElement>(null);
  const width = useWidth(box);
  const { resolved } = useTheme();
  const [drawn, setDrawn] = useState(false);
  const onZoom = useRef(props.onZoom);
  onZoom.current = props.onZoom;
  const onDrawn = useRef(props.onDrawn);
  onDrawn.current = props.onDrawn;

  // Read through a ref: a new range arrives with new data (setData rescales), so the chart
  // is not rebuilt for it.
  const range = useRef(props.range);
  range.current = props.range;
  const options = useMemo<uPlot.Options | null>(() => {
    if (width === 0) return null;
    const axisStroke = paletteColour('ink-soft');
    const grid = { stroke: paletteColour('grid'), width: 1 };
    const leftUnit = props.series.find((s) => !s.rightAxis)?.unit ?? '';
    const rightUnit = props.series.find((s) => s.rightAxis)?.unit;
    const font = '11px "JetBrains Mono", ui-monospace, monospace';
    const axes: uPlot.Axis[] = [
      { stroke: axisStroke, grid, ticks: grid, font },
      {
        scale: 'y',
        stroke: axisStroke,
        grid,
        ticks: grid,
        font,
        size: axisSize,
        values: (_u, splits) => splits.map((v) => `${formatTick(v)} ${leftUnit}`),
      },
    ];
    if (rightUnit !== undefined) {
      axes.push({
        scale: 'y2',
        side: 1,
        stroke: axisStroke,
        grid: { show: false },
        font,
        size: axisSize,
        values: (_u, splits) => splits.map((v) => `${formatTick(v)} ${rightUnit}`),
      });
    }
    return {
      width,
      height: props.height ?? 220,
      ms: 1,
      tzDate: (ts) => uPlot.tzDate(new Date(ts), props.timeZone),
      cursor: { drag: { x: true, y: false, setScale: false } },
      legend: { live: true },
      scales: {
        x: {
          time: true,
          range: (_u, min, max): uPlot.Range.MinMax =>
            range.current ? [range.current.from, range.current.to] : [min, max],
        },
        y: { auto: true },
        y2: { auto: true },
      },
      axes,
      series: [
        { label: 'Time' },
        ...props.series.map<uPlot.Series>((s) => ({
          label: s.unit ? `${s.label} (${s.unit})` : s.label,
          scale: s.rightAxis ? 'y2' : 'y',
          stroke: paletteColour(`chart-${s.colour}`),
          width: 1.6,
          fill: s.fill ? paletteColour(`chart-${s.colour}`, 0.12) : undefined,
          spanGaps: false,
          paths: s.stepped ? uPlot.paths.stepped!({ align: 1 }) : undefined,
          value: (_u, v) => (v === null || v === undefined ? '—' : v.toFixed(s.digits ?? 2)),
        })),
      ],
      hooks: {
        setSelect: [
          (u) => {
            if (u.select.width < 8) return;
            const from = u.posToVal(u.select.left, 'x');
            const to = u.posToVal(u.select.left + u.select.width, 'x');
            u.setSelect({ left: 0, top: 0, width: 0, height: 0 }, false);
            onZoom.current?.(from, to);
          },
        ],
        draw: [
          () => {
            setDrawn(true);
            onDrawn.current?.();
          },
        ],
      },
    };
    // Colours are read from CSS variables: rebuild when the theme flips.
  }, [width, props.height, props.series, props.timeZone, resolved]);

  const data = useMemo<uPlot.AlignedData>(
    () => [props.t, ...props.series.map((s) => s.values)] as uPlot.AlignedData,
    [props.t, props.series],
  );

  return (
    <figure className="min-w-0" data-chart={props.title} data-drawn={drawn ? 'yes' : 'no'}>
      <figcaption className="mb-1">
        <span className="text-body font-semibold text-wk-ink-strong">{props.title}</span>
        <span className="block text-label text-wk-ink-soft">{props.summary}</span>
      </figcaption>
      <div
        ref={box}
        className="wk-chart w-full overflow-hidden"
        role="img"
        aria-label={`${props.title}. ${props.summary}`}
      >
        {options && <UplotReact options={options} data={data} />}
      </div>
    </figure>
  );
}

/** Room for the widest tick label (11 px monospace: about 6.7 px a character), so "4,000 gal" is not clipped. */
function axisSize(_u: uPlot, values: string[] | null): number {
  const longest = values?.reduce((n, v) => Math.max(n, String(v).length), 0) ?? 0;
  return Math.max(40, Math.ceil(longest * 6.7) + 22);
}

function formatTick(v: number): string {
  const abs = Math.abs(v);
  if (abs >= 1000) return Math.round(v).toLocaleString('en-US');
  if (abs >= 10 || v === 0) return String(Math.round(v));
  return v.toFixed(1);
}
