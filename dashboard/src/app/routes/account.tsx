import { QueryState } from '../../components/states';
import { NotificationsForm } from '../../features/account/components/notifications-form';
import { SettingsForm } from '../../features/account/components/settings-form';
import { useAccountSettings, useNotifications } from '../../features/account/api/settings';

export function AccountRoute() {
  const settings = useAccountSettings();
  const notifications = useNotifications();
  return (
    <section className="max-w-2xl space-y-4" aria-labelledby="account-title">
      <h1 id="account-title" className="text-headline font-semibold text-wk-ink-strong">
        Account
      </h1>
      <QueryState query={settings} what="Your settings could not be loaded.">
        {(s) => <SettingsForm settings={s} />}
      </QueryState>
      <QueryState query={notifications} what="Your e-mail choices could not be loaded.">
        {(p) => <NotificationsForm prefs={p} />}
      </QueryState>
    </section>
  );
}
