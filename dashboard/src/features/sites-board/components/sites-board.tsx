import {
  SITE_HEALTH_LABELS,
  SITE_HEALTH_ORDER,
  compareSiteHealth,
  type SiteHealth,
} from '@wellkept/core';
import { useMemo, useState } from 'react';
import { Link } from 'react-router';
import { Figure } from '../../../components/figure';
import { HealthGlyph, HealthMark } from '../../../components/health-mark';
import { Empty, QueryState } from '../../../components/states';
import { paths } from '../../../config/paths';
import { displayScale } from '../../../lib/channel-units';
import { usePersonSettings } from '../../../lib/person-settings';
import { formatAgo, formatDateTime } from '../../../lib/time-format';
import { useFleetLive } from '../api/fleet-live';
import { type FleetOverview, type FleetSite, useFleet } from '../api/get-fleet';
import { boardFigures } from './board-figures';
import { Spark } from './spark';

type SortKey = 'worst' | 'name' | 'lastSeen' | 'daysLeft' | 'charge';
const SORTS: Record<SortKey, string> = {
  worst: 'Worst first',
  name: 'Name',
  lastSeen: 'Longest silent',
  daysLeft: 'Fewest days of water',
  charge: 'Lowest charge',
};

function sortSites(sites: FleetSite[], key: SortKey): FleetSite[] {
  const copy = [...sites];
  const byName = (a: FleetSite, b: FleetSite) => a.name.localeCompare(b.name);
  const nullsLast = (a: number | null | undefined, b: number | null | undefined) =>
    (a ?? Infinity) - (b ?? Infinity);
  switch (key) {
    case 'worst':
      return copy.sort((a, b) => compareSiteHealth(a.health, b.health) || byName(a, b));
    case 'name':
      return copy.sort(byName);
    case 'lastSeen':
      return copy.sort(
        (a, b) =>
          nullsLast(
            a.lastSeenAt ? Date.parse(a.lastSeenAt) : -Infinity,
            b.lastSeenAt ? Date.parse(b.lastSeenAt) : -Infinity,
          ) || byName(a, b),
      );
    case 'daysLeft':
      return copy.sort((a, b) => nullsLast(a.water?.daysLeft, b.water?.daysLeft) || byName(a, b));
    case 'charge':
      return copy.sort(
        (a, b) =>
          nullsLast(a.battery?.stateOfChargePercent, b.battery?.stateOfChargePercent) ||
          byName(a, b),
      );
  }
}

/** The installer's first screen: every visible site, worst first, updating live. */
export function SitesBoard() {
  const fleet = useFleet();
  const live = useFleetLive();
  return (
    <section aria-labelledby="board-title" className="space-y-4">
      <div className="flex flex-wrap items-end justify-between gap-2">
        <div>
          <h1 id="board-title" className="text-headline font-semibold text-wk-ink-strong">
            Sites
          </h1>
          <p className="text-wk-ink-soft">
            Every system you look after, the ones needing you first.
          </p>
        </div>
        <p className="text-label text-wk-ink-soft" aria-live="polite">
          {live === 'open' ? (
            <span className="inline-flex items-center gap-1.5">
              <span className="h-2 w-2 rounded-full bg-wk-steady" aria-hidden="true" /> Live
            </span>
          ) : fleet.data ? (
            `Updated ${formatAgo(fleet.data.generatedAt)}, refreshes every minute`
          ) : null}
        </p>
      </div>
      <QueryState query={fleet} what="The sites could not be loaded." loadingRows={6}>
        {(data) => <BoardBody data={data} />}
      </QueryState>
    </section>
  );
}

function BoardBody({ data }: { data: FleetOverview }) {
  const [search, setSearch] = useState('');
  const [health, setHealth] = useState<SiteHealth | 'all'>('all');
  const [sort, setSort] = useState<SortKey>('worst');
  const shown = useMemo(() => {
    const needle = search.trim().toLowerCase();
    const filtered = data.sites.filter(
      (s) =>
        (health === 'all' || s.health === health) &&
        (!needle ||
          s.name.toLowerCase().includes(needle) ||
          s.locality.toLowerCase().includes(needle)),
    );
    return sortSites(filtered, sort);
  }, [data.sites, search, health, sort]);

  if (data.sites.length === 0) {
    return (
      <Empty title="No sites yet">Sites appear here once they are created and linked to you.</Empty>
    );
  }
  return (
    <>
      <div className="flex flex-wrap gap-2" role="group" aria-label="Show sites by health">
        <FilterChip active={health === 'all'} onClick={() => setHealth('all')}>
          All <span className="wk-figure">{data.sites.length}</span>
        </FilterChip>
        {SITE_HEALTH_ORDER.map((h) => (
          <FilterChip key={h} active={health === h} onClick={() => setHealth(h)}>
            <HealthGlyph health={h} />
            {SITE_HEALTH_LABELS[h]} <span className="wk-figure">{data.counts[h]}</span>
          </FilterChip>
        ))}
      </div>
      <div className="flex flex-col gap-2 sm:flex-row">
        <label className="flex-1">
          <span className="sr-only">Search sites</span>
          <input
            type="search"
            className="wk-input"
            placeholder="Search by name or place"
            value={search}
            onChange={(e) => setSearch(e.target.value)}
          />
        </label>
        <label className="flex items-center gap-2 text-label text-wk-ink-soft">
          Sort
          <select
            className="wk-input w-auto"
            value={sort}
            onChange={(e) => setSort(e.target.value as SortKey)}
          >
            {Object.entries(SORTS).map(([k, label]) => (
              <option key={k} value={k}>
                {label}
              </option>
            ))}
          </select>
        </label>
      </div>
      {shown.length === 0 ? (
        <Empty title="No site matches">Clear the search or pick another health.</Empty>
      ) : (
        <>
          {/* Column headings for wide screens. Hidden from assistive technology: every cell
              already carries its own label (visible on narrow screens, screen-reader-only on
              wide ones), so reading these too would say each name twice. */}
          <div
            aria-hidden="true"
            data-testid="board-headings"
            className={`wk-label hidden gap-x-4 border border-l-4 border-transparent px-3 sm:grid ${ROW_COLUMNS}`}
          >
            <span>Site</span>
            <span>Charge</span>
            <span>Water stored</span>
            <span>Days of water</span>
            <span>Last seen</span>
            <span>Last 24 hours</span>
          </div>
          <ul className="space-y-2" aria-label="Sites">
            {shown.map((site) => (
              <SiteRow key={site.id} site={site} sparkStart={data.sparkStart} />
            ))}
          </ul>
        </>
      )}
    </>
  );
}

function FilterChip(props: { active: boolean; onClick: () => void; children: React.ReactNode }) {
  return (
    <button
      type="button"
      aria-pressed={props.active}
      onClick={props.onClick}
      className={`inline-flex items-center gap-1.5 rounded-full border px-3 py-1 text-label font-medium ${
        props.active
          ? 'border-wk-brand bg-wk-brand-faint text-wk-brand-strong'
          : 'border-wk-line bg-wk-surface text-wk-ink hover:bg-wk-sunken'
      }`}
    >
      {props.children}
    </button>
  );
}

/** The wide-screen columns of a site row and of the headings above them (the chart is 120 px). */
const ROW_COLUMNS = 'sm:grid-cols-[minmax(0,2.2fr)_repeat(4,minmax(0,1fr))_120px]';

const HEALTH_EDGE: Record<SiteHealth, string> = {
  act: 'border-l-wk-act',
  silent: 'border-l-wk-silent',
  watch: 'border-l-wk-watch',
  steady: 'border-l-wk-steady',
};

function SiteRow({ site, sparkStart }: { site: FleetSite; sparkStart: number }) {
  const { unitSystem, timeZone } = usePersonSettings();
  const f = boardFigures(site, unitSystem);
  const sparkScale = site.spark ? displayScale(site.spark.unit, unitSystem) : null;
  const sparkValues =
    site.spark && sparkScale
      ? site.spark.values.map((v) => (v === null ? null : sparkScale.convert(v)))
      : [];
  const known = sparkValues.filter((v): v is number => v !== null);
  const sparkLabel =
    site.spark && sparkScale && known.length
      ? `${site.spark.measurement.startsWith('battery') ? 'Battery voltage' : 'Tank level'} over 24 hours, from ${Math.min(...known).toFixed(1)} to ${Math.max(...known).toFixed(1)} ${sparkScale.unit}`
      : 'No readings in the last 24 hours';
  return (
    <li
      className={`wk-card grid grid-cols-2 gap-x-4 gap-y-3 border-l-4 p-3 sm:items-center ${ROW_COLUMNS} ${HEALTH_EDGE[site.health]}`}
      data-site-id={site.id}
    >
      <div className="col-span-2 min-w-0 sm:col-span-1">
        <Link
          to={paths.site.href(site.id)}
          className="block truncate text-body font-semibold text-wk-ink-strong hover:underline"
        >
          {site.name}
        </Link>
        <div className="flex flex-wrap items-center gap-x-2 text-label text-wk-ink-soft">
          <HealthMark health={site.health} reason={site.healthReason} />
          <span className="truncate">{site.healthReason}</span>
        </div>
      </div>
      <Cell label="Charge">
        {f.charge ? (
          <Figure quantity={f.charge} label="Battery charge" />
        ) : (
          <span className="text-wk-ink-faint">
            {site.battery ? (f.chargeBand ?? '—') : 'no battery'}
          </span>
        )}
        {f.charge && f.chargeBand && (
          <span className="block text-label text-wk-ink-faint">range {f.chargeBand}</span>
        )}
      </Cell>
      <Cell label="Water stored">
        {f.stored && f.fullness ? (
          <>
            <Figure quantity={f.stored} label="Water in storage" />
            <span className="block text-label text-wk-ink-soft">{f.fullness.text} full</span>
          </>
        ) : (
          <span className="text-wk-ink-faint">no tank</span>
        )}
      </Cell>
      <Cell label="Days of water">
        {f.daysLeft ? (
          <Figure quantity={f.daysLeft} label="Days of water left" />
        ) : (
          <span className="text-wk-ink-faint">—</span>
        )}
      </Cell>
      <Cell label="Last seen">
        {site.lastSeenAt ? (
          <time
            dateTime={site.lastSeenAt}
            title={formatDateTime(site.lastSeenAt, timeZone)}
            className="text-wk-ink"
          >
            {formatAgo(site.lastSeenAt)}
          </time>
        ) : (
          <span className="text-wk-ink-faint">never</span>
        )}
        <span className="block text-label text-wk-ink-soft">
          {site.openAlerts.count === 0
            ? 'no open alerts'
            : `${site.openAlerts.count} open alert${site.openAlerts.count === 1 ? '' : 's'}`}
        </span>
      </Cell>
      <div className="col-span-2 sm:col-span-1">
        {site.spark ? (
          <Spark start={sparkStart} values={sparkValues} label={sparkLabel} />
        ) : (
          <span className="text-label text-wk-ink-faint">no chart</span>
        )}
      </div>
    </li>
  );
}

function Cell(props: { label: string; children: React.ReactNode }) {
  return (
    <div className="min-w-0">
      <div className="wk-label sm:sr-only">{props.label}</div>
      {props.children}
    </div>
  );
}
