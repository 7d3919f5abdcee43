import type { DisplayQuantity, SiteHealth } from '@wellkept/core';
import { KeyFigure } from '../../../components/figure';
import { HealthMark } from '../../../components/health-mark';
import { usePersonSettings } from '../../../lib/person-settings';
import { formatAgo, formatDateTime } from '../../../lib/time-format';
import type { Site } from '../api/get-site';

export interface SiteKeyNumbers {
  health: SiteHealth;
  healthReason: string;
  lastSeenAt: string | null;
  charge: DisplayQuantity | null;
  chargeDetail?: string;
  stored: DisplayQuantity | null;
  storedDetail?: string;
  daysLeft: DisplayQuantity | null;
  openAlerts: number;
}

/** Name, place, health and the numbers that matter most, above every site sub-page. */
export function SiteHeader(props: { site: Site; numbers: SiteKeyNumbers | null }) {
  const { timeZone } = usePersonSettings();
  const n = props.numbers;
  const dash: DisplayQuantity = { value: null, unit: '', text: '—' };
  return (
    <header className="wk-card p-4">
      <div className="flex flex-wrap items-start justify-between gap-2">
        <div className="min-w-0">
          <h1 className="text-headline font-semibold text-wk-ink-strong">{props.site.name}</h1>
          <p className="text-wk-ink-soft">{props.site.locality}</p>
        </div>
        {n && (
          <div className="text-right">
            <HealthMark health={n.health} size="lg" />
            <p className="text-label text-wk-ink-soft">{n.healthReason}</p>
          </div>
        )}
      </div>
      <dl className="mt-4 grid grid-cols-2 gap-4 sm:grid-cols-4">
        <KeyFigure label="Battery charge" quantity={n?.charge ?? dash} detail={n?.chargeDetail} />
        <KeyFigure label="Water stored" quantity={n?.stored ?? dash} detail={n?.storedDetail} />
        <KeyFigure
          label="Days of water"
          quantity={n?.daysLeft ?? dash}
          detail="at the last week’s use"
        />
        <div>
          <dt className="wk-label">Last heard from</dt>
          <dd className="mt-0.5 text-body text-wk-ink">
            {n?.lastSeenAt ? (
              <time dateTime={n.lastSeenAt} title={formatDateTime(n.lastSeenAt, timeZone)}>
                {formatAgo(n.lastSeenAt)}
              </time>
            ) : (
              'never'
            )}
            <span className="block text-label text-wk-ink-soft">
              {n ? `${n.openAlerts} open alert${n.openAlerts === 1 ? '' : 's'}` : ''}
            </span>
          </dd>
        </div>
      </dl>
    </header>
  );
}
