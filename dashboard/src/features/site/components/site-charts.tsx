import { useQueries, type UseQueryResult } from '@tanstack/react-query';
import { useCallback, useMemo, useRef, useState } from 'react';
import { useSearchParams } from 'react-router';
import { TimeChart } from '../../../components/time-chart';
import { Empty, Failure, Loading } from '../../../components/states';
import type { RangePreset } from '../../../config/paths';
import { usePersonSettings } from '../../../lib/person-settings';
import { formatDateTime } from '../../../lib/time-format';
import { seriesQueryOptions, type SeriesResponse } from '../api/get-series';
import { useChannels } from '../api/get-channels';
import {
  batteryCharts,
  chartChannelGroups,
  pumpCharts,
  pvCharts,
  waterCharts,
  type ChartEquipment,
  type ChartSpec,
} from './chart-data';

const PRESETS: Record<RangePreset, { label: string; words: string; ms: number }> = {
  '24h': { label: '24 h', words: 'the last 24 hours', ms: 24 * 3600_000 },
  '7d': { label: '7 d', words: 'the last 7 days', ms: 7 * 86400_000 },
  '30d': { label: '30 d', words: 'the last 30 days', ms: 30 * 86400_000 },
  '1y': { label: '1 y', words: 'the last year', ms: 365 * 86400_000 },
};

/** Module-level so TanStack Query can keep its result between renders. */
function combineSeries(list: UseQueryResult<SeriesResponse>[]) {
  const first = list.find((r) => r.data)?.data;
  return {
    results: list,
    merged: first ? { ...first, series: list.flatMap((r) => r.data?.series ?? []) } : undefined,
  };
}

interface Range {
  from: number;
  to: number;
  preset: RangePreset | null;
}

/** The end of a preset range, rounded to the minute so the query key stays put between renders. */
function presetRange(preset: RangePreset): Range {
  const to = Math.ceil(Date.now() / 60_000) * 60_000;
  return { from: to - PRESETS[preset].ms, to, preset };
}

/**
 * The site's time series (battery, water, pumps, PV) drawn with uPlot. Range presets, drag to
 * zoom, and earlier/later to pan: each change asks the API again, and the API picks the
 * resolution for the new range.
 */
export function SiteCharts(props: {
  siteId: string;
  equipment: ChartEquipment;
  sections?: ('battery' | 'water' | 'pumps' | 'pv')[];
  /** Bumped by the site's live updates: a preset range slides up to now. */
  liveTick?: number;
}) {
  const { unitSystem, timeZone } = usePersonSettings();
  const channels = useChannels(props.siteId);
  // ?range=30d opens the page on another preset (links and the benchmark use it).
  const [params] = useSearchParams();
  const [range, setRange] = useState<Range>(() => {
    const asked = params.get('range');
    return presetRange(asked && asked in PRESETS ? (asked as RangePreset) : '7d');
  });
  const drawn = useRef(new Set<string>());
  const [seenTick, setSeenTick] = useState(props.liveTick ?? 0);
  if ((props.liveTick ?? 0) !== seenTick) {
    setSeenTick(props.liveTick ?? 0);
    if (range.preset) setRange(presetRange(range.preset));
  }

  const available = useMemo(
    () => new Set((channels.data ?? []).map((c) => c.name)),
    [channels.data],
  );
  const groups = useMemo(
    () => chartChannelGroups(props.equipment, available),
    [props.equipment, available],
  );
  // `combine` keeps one merged answer (stable between renders) from the per-group requests.
  const { results, merged } = useQueries({
    queries: groups.map((g) =>
      seriesQueryOptions({ siteId: props.siteId, channels: g, from: range.from, to: range.to }),
    ),
    combine: combineSeries,
  });

  const rangeWords = range.preset
    ? PRESETS[range.preset].words
    : `${formatDateTime(range.from, timeZone)} to ${formatDateTime(range.to, timeZone)}`;
  const sections = props.sections ?? ['battery', 'water', 'pumps', 'pv'];
  const charts: { section: string; specs: ChartSpec[] }[] = useMemo(
    () =>
      [
        { section: 'battery', specs: batteryCharts(merged, props.equipment, rangeWords) },
        { section: 'water', specs: waterCharts(merged, props.equipment, unitSystem, rangeWords) },
        { section: 'pumps', specs: pumpCharts(merged, props.equipment, rangeWords) },
        { section: 'pv', specs: pvCharts(merged, props.equipment, rangeWords) },
      ].filter((c) => sections.includes(c.section as 'battery') && c.specs.length > 0),
    [merged, props.equipment, unitSystem, rangeWords, sections.join(',')],
  );
  const total = charts.reduce((n, c) => n + c.specs.length, 0);

  const onZoom = useCallback((from: number, to: number) => {
    if (to - from < 10 * 60_000) return; // closer than ten minutes shows nothing new
    setRange({ from: Math.round(from), to: Math.round(to), preset: null });
  }, []);
  const pan = (direction: -1 | 1) => {
    const span = range.to - range.from;
    const shift = (span / 2) * direction;
    const now = Date.now();
    const to = Math.min(range.to + shift, Math.ceil(now / 60_000) * 60_000);
    setRange({ from: to - span, to, preset: null });
  };
  // Marks the moment every chart has drawn once (read by the benchmark).
  const onDrawn = useCallback(
    (id: string) => {
      if (drawn.current.has(id)) return;
      drawn.current.add(id);
      if (drawn.current.size === total) performance.mark('wellkept:charts-drawn');
    },
    [total],
  );

  const resolution = results.find((r) => r.data)?.data?.resolution;
  const fetching = results.some((r) => r.isFetching);
  const failed = results.find((r) => r.error);

  return (
    <section aria-labelledby="charts-title" className="space-y-3">
      <div className="flex flex-wrap items-center justify-between gap-2">
        <h2 id="charts-title" className="text-body font-semibold text-wk-ink-strong">
          History
        </h2>
        <div className="flex flex-wrap items-center gap-1" role="group" aria-label="Time range">
          <button
            type="button"
            className="wk-button-quiet"
            onClick={() => pan(-1)}
            aria-label="Show earlier"
          >
            ‹ Earlier
          </button>
          {(Object.keys(PRESETS) as RangePreset[]).map((p) => (
            <button
              key={p}
              type="button"
              aria-pressed={range.preset === p}
              onClick={() => setRange(presetRange(p))}
              className={`rounded-lg border px-3 py-1.5 font-mono text-label ${
                range.preset === p
                  ? 'border-wk-brand bg-wk-brand text-wk-on-brand'
                  : 'border-wk-line bg-wk-surface text-wk-ink hover:bg-wk-sunken'
              }`}
            >
              {PRESETS[p].label}
            </button>
          ))}
          <button
            type="button"
            className="wk-button-quiet"
            onClick={() => pan(1)}
            disabled={range.to >= Date.now() - 60_000}
            aria-label="Show later"
          >
            Later ›
          </button>
        </div>
      </div>
      <p className="text-label text-wk-ink-soft" aria-live="polite" data-range-note>
        {rangeWords}
        {resolution &&
          ` · one point per ${resolution.label === 'raw readings' ? 'reading' : resolution.label}`}
        {fetching && ' · loading…'}
        {' · drag across a chart to zoom in'}
      </p>
      {channels.isPending || results.some((r) => r.isPending) ? (
        <Loading label="Loading charts…" rows={5} />
      ) : channels.error ? (
        <Failure
          error={channels.error}
          what="The measurements could not be loaded."
          onRetry={() => void channels.refetch()}
        />
      ) : failed?.error ? (
        <Failure
          error={failed.error}
          what="The history could not be loaded."
          onRetry={() => void failed.refetch()}
        />
      ) : total === 0 ? (
        <Empty title="No history to chart yet">
          Charts appear once the site's gateway has sent readings.
        </Empty>
      ) : (
        <div className="grid gap-4 lg:grid-cols-2">
          {charts.flatMap((c) =>
            c.specs.map((spec) => (
              <div key={spec.id} className="wk-card min-w-0 p-3">
                <TimeChart
                  title={spec.title}
                  summary={spec.summary}
                  t={spec.t}
                  series={spec.series}
                  height={spec.height}
                  timeZone={timeZone}
                  range={range}
                  onZoom={onZoom}
                  onDrawn={() => onDrawn(spec.id)}
                />
              </div>
            )),
          )}
        </div>
      )}
    </section>
  );
}
