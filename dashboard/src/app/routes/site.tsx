import { useQuery } from '@tanstack/react-query';
import { NavLink, useParams } from 'react-router';
import { Failure, Loading } from '../../components/states';
import { env } from '../../config/env';
import { paths, SITE_SECTIONS, type SiteSection } from '../../config/paths';
import { AlertList } from '../../features/alerts/components/alert-list';
import { ThresholdsPanel } from '../../features/alerts/components/thresholds-form';
import { useMe } from '../../features/auth/api/get-me';
import { useEquipment } from '../../features/equipment/api/get-equipment';
import { EquipmentPanel } from '../../features/equipment/components/equipment-panel';
import { GatewayPanel } from '../../features/gateways/components/gateway-panel';
import { useSite } from '../../features/site/api/get-site';
import { VisitList } from '../../features/visits/components/visit-list';
import { useSiteLive } from '../../features/site/api/site-live';
import { OwnerSummary } from '../../features/site/components/owner-summary';
import { RunLog } from '../../features/site/components/run-log';
import { SiteCharts } from '../../features/site/components/site-charts';
import { SiteHeader, type SiteKeyNumbers } from '../../features/site/components/site-header';
import { fleetQueryOptions, type FleetSite } from '../../features/sites-board/api/get-fleet';
import { boardFigures } from '../../features/sites-board/components/board-figures';
import { usePersonSettings } from '../../lib/person-settings';

const SECTION_WORDS: Record<SiteSection, string> = {
  overview: 'Overview',
  runs: 'Run log',
  alerts: 'Alerts',
  visits: 'Service visits',
  equipment: 'Equipment and thresholds',
  gateways: 'Gateways',
};

/** One site: header and charts, with its run log, alerts, visits, equipment and gateways. */
export function SiteRoute() {
  const { siteId = '', section = 'overview' } = useParams();
  const me = useMe();
  const { unitSystem } = usePersonSettings();
  const site = useSite(siteId);
  const equipment = useEquipment(siteId);
  // The key numbers come from the fleet overview (the same query the board uses).
  const fleetEntry = useQuery({
    ...fleetQueryOptions(),
    select: (f) => f.sites.find((s) => s.id === siteId),
  });
  const live = useSiteLive(siteId);

  if (site.isPending || !me.data) return <Loading rows={4} />;
  if (site.error)
    return (
      <Failure
        error={site.error}
        what="This site could not be opened."
        onRetry={() => void site.refetch()}
      />
    );
  const role = me.data.user.role;
  const entry: FleetSite | undefined = fleetEntry.data;
  const f = entry ? boardFigures(entry, unitSystem) : null;

  if (role === 'owner') {
    return (
      <div className="space-y-5">
        <OwnerSummary
          siteName={site.data.name}
          health={entry?.health ?? null}
          healthReason={entry?.healthReason ?? ''}
          stored={f?.stored ?? null}
          fullness={f?.fullness ?? null}
          daysLeft={f?.daysLeft ?? null}
          charge={f?.charge ?? null}
          chargePercent={entry?.battery?.stateOfChargePercent ?? null}
          chargeBand={f?.chargeBand ?? null}
          lastSeenAt={entry?.lastSeenAt ?? null}
        />
        <section aria-labelledby="owner-alerts" className="space-y-2">
          <h2 id="owner-alerts" className="text-body font-semibold text-wk-ink-strong">
            Recent alerts
          </h2>
          <AlertList siteId={siteId} plain canAcknowledge />
        </section>
        {equipment.data && (
          <SiteCharts
            siteId={siteId}
            equipment={equipment.data}
            sections={['water', 'battery']}
            liveTick={live.tick}
          />
        )}
      </div>
    );
  }

  const numbers: SiteKeyNumbers | null =
    entry && f
      ? {
          health: entry.health,
          healthReason: entry.healthReason,
          lastSeenAt: entry.lastSeenAt,
          charge: f.charge,
          chargeDetail: f.chargeBand
            ? `range ${f.chargeBand}`
            : entry.battery?.volts
              ? `${entry.battery.volts.toFixed(2)} V`
              : undefined,
          stored: f.stored,
          storedDetail: f.fullness ? `${f.fullness.text} full` : undefined,
          daysLeft: f.daysLeft,
          openAlerts: entry.openAlerts.count,
        }
      : null;
  const sections = SITE_SECTIONS.filter(
    (s) => s !== 'gateways' || role === 'admin' || role === 'technician',
  );
  const current = (sections as readonly string[]).includes(section)
    ? (section as SiteSection)
    : 'overview';

  return (
    <div className="space-y-4">
      <SiteHeader site={site.data} numbers={numbers} />
      <nav
        aria-label="Site pages"
        className="-mx-1 flex gap-1 overflow-x-auto border-b border-wk-line"
      >
        {sections.map((s) => (
          <NavLink
            key={s}
            to={s === 'overview' ? paths.site.href(siteId) : paths.siteSection.href(siteId, s)}
            end
            className={() =>
              `whitespace-nowrap border-b-2 px-3 py-2 font-medium ${
                current === s
                  ? 'border-wk-brand text-wk-brand-strong'
                  : 'border-transparent text-wk-ink-soft hover:text-wk-ink'
              }`
            }
          >
            {SECTION_WORDS[s]}
          </NavLink>
        ))}
        <span
          className="ml-auto self-center whitespace-nowrap px-2 text-label text-wk-ink-soft"
          aria-live="polite"
        >
          {live.state === 'open' ? 'Live' : live.state === 'retrying' ? 'Reconnecting…' : ''}
        </span>
      </nav>
      {current === 'overview' &&
        (equipment.error ? (
          <Failure
            error={equipment.error}
            what="The equipment could not be loaded."
            onRetry={() => void equipment.refetch()}
          />
        ) : equipment.data ? (
          <SiteCharts siteId={siteId} equipment={equipment.data} liveTick={live.tick} />
        ) : (
          <Loading rows={5} />
        ))}
      {current === 'runs' && <RunLog siteId={siteId} pumps={equipment.data?.pumps ?? []} />}
      {current === 'alerts' && <AlertList siteId={siteId} canAcknowledge />}
      {current === 'visits' && <VisitList siteId={siteId} canEdit />}
      {current === 'equipment' && (
        <EquipmentPanel
          siteId={siteId}
          isAdmin={role === 'admin'}
          extra={<ThresholdsPanel siteId={siteId} canEdit={role === 'admin'} />}
        />
      )}
      {current === 'gateways' && (
        <GatewayPanel siteId={siteId} isAdmin={role === 'admin'} mqttHost={env.mqttUrl} />
      )}
    </div>
  );
}
