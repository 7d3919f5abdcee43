import { NavLink, Outlet, useNavigate } from 'react-router';
import { ThemeSwitch } from '../../components/theme-switch';
import { Loading } from '../../components/states';
import { paths } from '../../config/paths';
import { useMe, type Role } from '../../features/auth/api/get-me';
import { useSignOut } from '../../features/auth/api/sign-out';
import { PersonSettingsProvider } from '../../lib/person-settings';

const ROLE_WORDS: Record<Role, string> = {
  admin: 'Admin',
  technician: 'Technician',
  owner: 'Owner',
};

/** The signed-in frame: brand, navigation for the person's role, and who is signed in. */
export function AppShellRoute() {
  const me = useMe();
  const navigate = useNavigate();
  const signOut = useSignOut();
  if (!me.data) return <Loading />;
  const { user, company } = me.data;
  const nav = [
    { to: paths.board.href(), label: 'Sites', end: true },
    { to: paths.alerts.href(), label: 'Alerts' },
    ...(user.role === 'admin' ? [{ to: paths.team.href(), label: 'Team' }] : []),
    { to: paths.account.href(), label: 'Account' },
  ];
  return (
    <PersonSettingsProvider value={{ unitSystem: user.unitSystem, timeZone: user.timeZone }}>
      <a
        href="#main"
        className="sr-only focus:not-sr-only focus:absolute focus:left-2 focus:top-2 focus:z-50 focus:rounded focus:bg-wk-surface focus:px-3 focus:py-2"
      >
        Skip to content
      </a>
      <header className="border-b border-wk-line bg-wk-surface">
        <div className="mx-auto flex max-w-6xl flex-wrap items-center gap-x-6 gap-y-2 px-4 py-2">
          <NavLink
            to={paths.board.href()}
            className="flex items-center gap-2 text-wk-brand-strong"
            aria-label="Wellkept, your sites"
          >
            <svg viewBox="0 0 32 32" className="h-7 w-7" aria-hidden="true">
              <rect width="32" height="32" rx="8" className="fill-wk-brand-strong" />
              <path
                d="M16 6c-4 6-7 9.5-7 13a7 7 0 0 0 14 0c0-3.5-3-7-7-13z"
                className="fill-wk-sun"
              />
            </svg>
            <span className="font-semibold tracking-tight">Wellkept</span>
          </NavLink>
          <nav
            aria-label="Main"
            className="order-last -mx-1 flex w-full gap-1 overflow-x-auto sm:order-none sm:w-auto"
          >
            {nav.map((item) => (
              <NavLink
                key={item.to}
                to={item.to}
                end={item.end}
                className={({ isActive }) =>
                  `whitespace-nowrap rounded-md px-3 py-1.5 font-medium ${
                    isActive
                      ? 'bg-wk-brand-faint text-wk-brand-strong'
                      : 'text-wk-ink-soft hover:text-wk-ink'
                  }`
                }
              >
                {item.label}
              </NavLink>
            ))}
          </nav>
          <div className="ml-auto flex items-center gap-3">
            <ThemeSwitch />
            <div className="hidden text-right leading-tight sm:block">
              <div className="text-label font-medium text-wk-ink" data-testid="who">
                {user.name}
              </div>
              <div className="text-label text-wk-ink-soft">
                {ROLE_WORDS[user.role]} · {company.name}
              </div>
            </div>
            <button
              type="button"
              className="wk-button-quiet"
              onClick={() =>
                signOut.mutate(undefined, {
                  onSettled: () => void navigate(paths.signIn.href(), { replace: true }),
                })
              }
            >
              Sign out
            </button>
          </div>
        </div>
      </header>
      <main id="main" className="mx-auto max-w-6xl px-4 py-5">
        <Outlet />
      </main>
    </PersonSettingsProvider>
  );
}
