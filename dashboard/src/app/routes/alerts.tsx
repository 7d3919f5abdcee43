import { paths } from '../../config/paths';
import { AlertList } from '../../features/alerts/components/alert-list';
import { useMe } from '../../features/auth/api/get-me';

export function AlertsRoute() {
  const me = useMe();
  const owner = me.data?.user.role === 'owner';
  return (
    <section className="space-y-3" aria-labelledby="alerts-title">
      <h1 id="alerts-title" className="text-headline font-semibold text-wk-ink-strong">
        Alerts
      </h1>
      <AlertList plain={owner} canAcknowledge siteHref={paths.site.href} />
    </section>
  );
}
