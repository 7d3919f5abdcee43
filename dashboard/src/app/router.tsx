import type { QueryClient } from '@tanstack/react-query';
import { createBrowserRouter, redirect, type LoaderFunctionArgs } from 'react-router';
import { paths } from '../config/paths';
import { meQueryOptions } from '../features/auth/api/get-me';
import { ApiError, onSessionExpired } from '../lib/api-client';
import { RouteError } from './routes/route-error';
import { Loading } from '../components/states';

function PageLoading() {
  return (
    <div className="mx-auto max-w-6xl p-6">
      <Loading rows={4} />
    </div>
  );
}

/**
 * Every screen is its own lazy chunk; the signed-out pages load without Tremor or uPlot.
 * The signed-in shell's loader makes sure there is a session (GET /auth/me) before any
 * screen renders, reusing the same query the screens read.
 */
export function createAppRouter(queryClient: QueryClient) {
  const requireSession = async ({ request }: LoaderFunctionArgs) => {
    try {
      return await queryClient.ensureQueryData(meQueryOptions());
    } catch (error) {
      if (error instanceof ApiError && error.status === 401) {
        const url = new URL(request.url);
        throw redirect(paths.signIn.href(url.pathname + url.search));
      }
      throw error;
    }
  };

  const router = createBrowserRouter([
    {
      path: paths.signIn.path,
      lazy: () => import('./routes/sign-in').then((m) => ({ Component: m.SignInRoute })),
    },
    {
      path: paths.acceptInvitation.path,
      lazy: () =>
        import('./routes/accept-invitation').then((m) => ({ Component: m.AcceptInvitationRoute })),
    },
    {
      path: paths.resetPassword.path,
      lazy: () =>
        import('./routes/reset-password').then((m) => ({ Component: m.ResetPasswordRoute })),
    },
    {
      path: '/',
      loader: requireSession,
      ErrorBoundary: RouteError,
      HydrateFallback: PageLoading,
      lazy: () => import('./routes/app-shell').then((m) => ({ Component: m.AppShellRoute })),
      children: [
        {
          index: true,
          lazy: () => import('./routes/board').then((m) => ({ Component: m.BoardRoute })),
        },
        {
          path: paths.site.path,
          lazy: () => import('./routes/site').then((m) => ({ Component: m.SiteRoute })),
        },
        {
          path: paths.siteSection.path,
          lazy: () => import('./routes/site').then((m) => ({ Component: m.SiteRoute })),
        },
        {
          path: paths.alerts.path,
          lazy: () => import('./routes/alerts').then((m) => ({ Component: m.AlertsRoute })),
        },
        {
          path: paths.team.path,
          lazy: () => import('./routes/team').then((m) => ({ Component: m.TeamRoute })),
        },
        {
          path: paths.account.path,
          lazy: () => import('./routes/account').then((m) => ({ Component: m.AccountRoute })),
        },
        {
          path: '*',
          lazy: () => import('./routes/not-found').then((m) => ({ Component: m.NotFoundRoute })),
        },
      ],
    },
  ]);

  // The one place an expired session is handled: forget everything cached, go to sign-in.
  onSessionExpired(() => {
    queryClient.clear();
    const here = window.location.pathname + window.location.search;
    if (!window.location.pathname.startsWith(paths.signIn.path)) {
      void router.navigate(paths.signIn.href(here), { replace: true });
    }
  });
  return router;
}
