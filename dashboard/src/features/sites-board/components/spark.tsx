import { useMemo } from 'react';
import uPlot from 'uplot';
// uPlot's own layout rules (stacked canvases); without them the chart is twice its height.
import 'uplot/dist/uPlot.min.css';
import UplotReact from 'uplot-react';
import { paletteColour, useTheme } from '../../../lib/theme';

/** A 24-hour mini-chart (uPlot, no axes): the shape of the day at a glance. */
export function Spark(props: { start: number; values: (number | null)[]; label: string }) {
  const { resolved } = useTheme();
  const options = useMemo<uPlot.Options>(
    () => ({
      width: 120,
      height: 32,
      ms: 1,
      pxAlign: false,
      cursor: { show: false },
      legend: { show: false },
      select: { show: false, left: 0, top: 0, width: 0, height: 0 },
      scales: { x: { time: true } },
      axes: [{ show: false }, { show: false }],
      series: [
        {},
        {
          stroke: paletteColour('chart-1'),
          fill: paletteColour('chart-1', 0.1),
          width: 1.5,
          spanGaps: false,
        },
      ],
    }),
    [resolved],
  );
  const data = useMemo<uPlot.AlignedData>(
    () => [props.values.map((_, i) => props.start + i * 3_600_000), props.values],
    [props.start, props.values],
  );
  const known = props.values.filter((v): v is number => v !== null);
  if (known.length < 2) {
    return <span className="text-label text-wk-ink-faint">no data in 24 h</span>;
  }
  return (
    <div role="img" aria-label={props.label} className="h-8 w-[120px]">
      <UplotReact options={options} data={data} />
    </div>
  );
}
