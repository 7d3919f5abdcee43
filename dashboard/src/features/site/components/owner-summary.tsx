import type { DisplayQuantity, SiteHealth } from '@wellkept/core';
import { Figure } from '../../../components/figure';
import { HealthMark } from '../../../components/health-mark';
import { SafetyCaution } from '../../../components/safety-caution';
import { formatAgo } from '../../../lib/time-format';

/** Battery charge in words an owner can act on. */
export function chargeWords(percent: number | null): string {
  if (percent === null) return 'Charge cannot be read from the voltage right now';
  if (percent >= 80) return 'Well charged';
  if (percent >= 50) return 'Comfortable';
  if (percent >= 30) return 'Getting low: go easy on power tonight';
  return 'Low: use as little power as you can';
}

/** The owner's view of a site: water, days left and battery, in plain terms, no settings. */
export function OwnerSummary(props: {
  siteName: string;
  health: SiteHealth | null;
  healthReason: string;
  stored: DisplayQuantity | null;
  fullness: DisplayQuantity | null;
  daysLeft: DisplayQuantity | null;
  chargePercent: number | null;
  /** "20–90 %" when the voltage only narrows the charge down to a band. */
  chargeBand?: string | null;
  charge: DisplayQuantity | null;
  lastSeenAt: string | null;
}) {
  return (
    <section className="space-y-3" aria-labelledby="owner-title">
      <header className="flex flex-wrap items-start justify-between gap-2">
        <div>
          <h1 id="owner-title" className="text-headline font-semibold text-wk-ink-strong">
            {props.siteName}
          </h1>
          <p className="text-wk-ink-soft">
            {props.lastSeenAt ? `Last report ${formatAgo(props.lastSeenAt)}` : 'No reports yet'}
          </p>
        </div>
        {props.health && <HealthMark health={props.health} size="lg" reason={props.healthReason} />}
      </header>
      <div className="grid gap-3 sm:grid-cols-2">
        <div className="wk-card p-4">
          <h2 className="wk-label">Water in storage</h2>
          {props.stored ? (
            <>
              <p className="mt-1">
                <Figure quantity={props.stored} size="lg" label="Water in storage" />
              </p>
              <p className="text-wk-ink-soft">
                {props.fullness?.text} full
                {props.daysLeft && (
                  <>
                    {' '}
                    · about <span className="wk-figure text-wk-ink">
                      {props.daysLeft.text}
                    </span>{' '}
                    left at your usual use
                  </>
                )}
              </p>
            </>
          ) : (
            <p className="text-wk-ink-soft">No tank level is reported for this site.</p>
          )}
        </div>
        <div className="wk-card p-4">
          <h2 className="wk-label">Battery</h2>
          {props.charge ? (
            <p className="mt-1">
              <Figure quantity={props.charge} size="lg" label="Battery charge" />
            </p>
          ) : null}
          {props.chargePercent === null && props.chargeBand ? (
            <p className="text-wk-ink">
              Somewhere between <span className="wk-figure">{props.chargeBand}</span>: the battery
              voltage alone cannot say more just now.
            </p>
          ) : (
            <p className="text-wk-ink">{chargeWords(props.chargePercent)}</p>
          )}
        </div>
      </div>
      <SafetyCaution topics={['owner']} />
    </section>
  );
}
