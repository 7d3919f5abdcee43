export const ROLES = ['admin', 'technician', 'owner'] as const;
export type Role = (typeof ROLES)[number];

/** The signed-in person, as every guarded handler sees them (loaded fresh per request). */
export interface SessionUser {
  id: string;
  companyId: string;
  role: Role;
  email: string;
  name: string;
}

declare const visibleSiteBrand: unique symbol;

/**
 * A site the caller may see. Only `SiteAccessRepository` creates these (after the company and
 * owner-link checks), and every site-scoped repository method takes one, so a query by a
 * site's id cannot be written without having passed the scope check first.
 */
export interface VisibleSite {
  readonly [visibleSiteBrand]: true;
  id: string;
  companyId: string;
  name: string;
  timeZone: string;
  reportingIntervalS: number;
}

declare module 'fastify' {
  interface FastifyRequest {
    user?: SessionUser;
    site?: VisibleSite;
  }
}
