/**
 * Every route path, declared once. `path` is the React Router pattern; `href` builds a link.
 * The API e-mails links to /accept-invitation?token=… and /reset-password?token=…
 */
export type RangePreset = '24h' | '7d' | '30d' | '1y';

const withQuery = (base: string, query: Record<string, string | undefined>) => {
  const params = new URLSearchParams();
  for (const [k, v] of Object.entries(query)) if (v) params.set(k, v);
  const qs = params.toString();
  return qs ? `${base}?${qs}` : base;
};

export const paths = {
  signIn: { path: '/sign-in', href: (next?: string) => withQuery('/sign-in', { next }) },
  acceptInvitation: {
    path: '/accept-invitation',
    href: (token: string) => withQuery('/accept-invitation', { token }),
  },
  resetPassword: {
    path: '/reset-password',
    href: (token?: string) => withQuery('/reset-password', { token }),
  },
  board: { path: '/', href: () => '/' },
  site: { path: '/sites/:siteId', href: (siteId: string) => `/sites/${siteId}` },
  siteSection: {
    path: '/sites/:siteId/:section',
    href: (siteId: string, section: SiteSection) => `/sites/${siteId}/${section}`,
  },
  alerts: { path: '/alerts', href: () => '/alerts' },
  team: { path: '/team', href: () => '/team' },
  account: { path: '/account', href: () => '/account' },
} as const;

/** Sub-pages of a site, in the order the site page lists them. */
export const SITE_SECTIONS = [
  'overview',
  'runs',
  'alerts',
  'visits',
  'equipment',
  'gateways',
] as const;
export type SiteSection = (typeof SITE_SECTIONS)[number];
