import { multipart } from '../support/multipart.js';
import { type SiteKey, type SiteWorld, unique, type World } from './world.js';

export type Role = 'admin' | 'technician' | 'owner';
export type Caller = Role | 'anonymous';

/**
 * Who may call a route, said independently of the code's decorators:
 * - public: no session; `publicStatus` gives the answer per caller;
 * - any / admin: signed-in callers (admin: admins only), company-wide;
 * - site:any / site:staff / site:admin: a route about one site (staff = admin or technician).
 */
export type Access = 'public' | 'any' | 'admin' | 'site:any' | 'site:staff' | 'site:admin';

export interface Ctx {
  world: World;
  /** Site routes: the site's relation to company A's people. */
  site: SiteWorld;
  siteKey: SiteKey;
  /** Company routes with an id: whose row the id is. */
  tenant: 'own' | 'other';
}

export interface Req {
  url: string;
  payload?: unknown;
  headers?: Record<string, string>;
}

export interface RouteRow {
  method: 'GET' | 'POST' | 'PUT' | 'PATCH' | 'DELETE';
  path: string;
  access: Access;
  /** Status of a successful call. */
  ok: number;
  /** Public routes: the answer per caller (default `ok` for everyone). */
  publicStatus?: (caller: Caller) => number;
  /** Company routes whose path carries another row's id: also tried with another tenant's id. */
  tenantId?: boolean;
  /** Event streams: read the status, then hang up. */
  stream?: boolean;
  /** Sign in again before the call (the route ends or rotates the session). */
  freshSession?: boolean;
  request: (ctx: Ctx) => Req | Promise<Req>;
}

const s = (ctx: Ctx) => `/api/sites/${ctx.site.siteId}`;
const day = () => ({
  from: new Date(Date.now() - 86400_000).toISOString(),
  to: new Date().toISOString(),
});
const q = (params: Record<string, string>) => `?${new URLSearchParams(params).toString()}`;

/** Every route of the API. The matrix test fails when a registered route has no row here. */
export const ROUTES: RouteRow[] = [
  // Auth ---------------------------------------------------------------------------------
  {
    method: 'POST',
    path: '/api/auth/sign-in',
    access: 'public',
    ok: 200,
    request: ({ world }) => ({
      url: '/api/auth/sign-in',
      payload: { email: world.a.colleagueEmail, password: 'correct horse battery' },
    }),
  },
  {
    method: 'POST',
    path: '/api/auth/refresh',
    access: 'public',
    ok: 200,
    freshSession: true,
    publicStatus: (c) => (c === 'anonymous' ? 401 : 200),
    request: () => ({ url: '/api/auth/refresh' }),
  },
  {
    method: 'POST',
    path: '/api/auth/sign-out',
    access: 'public',
    ok: 204,
    freshSession: true,
    request: () => ({ url: '/api/auth/sign-out' }),
  },
  {
    method: 'GET',
    path: '/api/auth/me',
    access: 'any',
    ok: 200,
    request: () => ({ url: '/api/auth/me' }),
  },
  {
    method: 'GET',
    path: '/api/auth/invitations/:token',
    access: 'public',
    ok: 200,
    request: async ({ world }) => ({
      url: `/api/auth/invitations/${(await world.freshInvitation('own')).token}`,
    }),
  },
  {
    method: 'POST',
    path: '/api/auth/invitations/accept',
    access: 'public',
    ok: 200,
    request: async ({ world }) => ({
      url: '/api/auth/invitations/accept',
      payload: {
        token: (await world.freshInvitation('own')).token,
        password: 'a new long password',
      },
    }),
  },
  {
    method: 'POST',
    path: '/api/auth/password-reset',
    access: 'public',
    ok: 202,
    request: () => ({
      url: '/api/auth/password-reset',
      payload: { email: 'nobody@people.example' },
    }),
  },
  {
    method: 'POST',
    path: '/api/auth/password-reset/confirm',
    access: 'public',
    ok: 204,
    request: async ({ world }) => ({
      url: '/api/auth/password-reset/confirm',
      payload: { token: await world.freshResetToken(), password: 'another long password' },
    }),
  },

  // Company, people, account -------------------------------------------------------------
  {
    method: 'GET',
    path: '/api/company',
    access: 'any',
    ok: 200,
    request: () => ({ url: '/api/company' }),
  },
  {
    method: 'PATCH',
    path: '/api/company',
    access: 'admin',
    ok: 200,
    request: () => ({ url: '/api/company', payload: { name: unique('Company ') } }),
  },
  {
    method: 'GET',
    path: '/api/audit-log',
    access: 'admin',
    ok: 200,
    request: () => ({ url: '/api/audit-log' }),
  },
  {
    method: 'GET',
    path: '/api/users',
    access: 'admin',
    ok: 200,
    request: () => ({ url: '/api/users' }),
  },
  {
    method: 'PATCH',
    path: '/api/users/:userId',
    access: 'admin',
    ok: 200,
    tenantId: true,
    request: ({ world, tenant }) => ({
      url: `/api/users/${tenant === 'own' ? world.a.colleague : world.b.userId}`,
      payload: { name: 'Renamed person' },
    }),
  },
  {
    method: 'POST',
    path: '/api/users/:userId/deactivate',
    access: 'admin',
    ok: 204,
    tenantId: true,
    request: async ({ world, tenant }) => ({
      url: `/api/users/${await world.freshUser(tenant)}/deactivate`,
    }),
  },
  {
    method: 'GET',
    path: '/api/invitations',
    access: 'admin',
    ok: 200,
    request: () => ({ url: '/api/invitations' }),
  },
  {
    method: 'POST',
    path: '/api/invitations',
    access: 'admin',
    ok: 201,
    request: () => ({
      url: '/api/invitations',
      payload: { email: `${unique('new')}@people.example`, role: 'technician' },
    }),
  },
  {
    method: 'DELETE',
    path: '/api/invitations/:invitationId',
    access: 'admin',
    ok: 204,
    tenantId: true,
    request: async ({ world, tenant }) => ({
      url: `/api/invitations/${(await world.freshInvitation(tenant)).id}`,
    }),
  },
  {
    method: 'GET',
    path: '/api/account/settings',
    access: 'any',
    ok: 200,
    request: () => ({ url: '/api/account/settings' }),
  },
  {
    method: 'PATCH',
    path: '/api/account/settings',
    access: 'any',
    ok: 200,
    request: () => ({ url: '/api/account/settings', payload: { unitSystem: 'metric' } }),
  },
  {
    method: 'GET',
    path: '/api/account/notifications',
    access: 'any',
    ok: 200,
    request: () => ({ url: '/api/account/notifications' }),
  },
  {
    method: 'PUT',
    path: '/api/account/notifications',
    access: 'any',
    ok: 200,
    request: () => ({
      url: '/api/account/notifications',
      payload: { kinds: ['low_charge'], siteIds: null, onOpen: true, onClear: false },
    }),
  },

  // Fleet-wide ---------------------------------------------------------------------------
  {
    method: 'GET',
    path: '/api/fleet',
    access: 'any',
    ok: 200,
    request: () => ({ url: '/api/fleet' }),
  },
  {
    method: 'GET',
    path: '/api/alerts',
    access: 'any',
    ok: 200,
    request: () => ({ url: '/api/alerts' }),
  },
  {
    method: 'GET',
    path: '/api/events',
    access: 'any',
    ok: 200,
    stream: true,
    request: () => ({ url: '/api/events' }),
  },
  {
    method: 'GET',
    path: '/api/sites',
    access: 'any',
    ok: 200,
    request: () => ({ url: '/api/sites' }),
  },
  {
    method: 'POST',
    path: '/api/sites',
    access: 'admin',
    ok: 201,
    request: () => ({
      url: '/api/sites',
      payload: { name: unique('Site '), latitude: 40, longitude: -105, timeZone: 'America/Denver' },
    }),
  },

  // One site -----------------------------------------------------------------------------
  {
    method: 'GET',
    path: '/api/sites/:siteId',
    access: 'site:any',
    ok: 200,
    request: (c) => ({ url: s(c) }),
  },
  {
    method: 'PATCH',
    path: '/api/sites/:siteId',
    access: 'site:admin',
    ok: 200,
    request: (c) => ({ url: s(c), payload: { notes: 'Gate code at the office' } }),
  },
  {
    method: 'DELETE',
    path: '/api/sites/:siteId',
    access: 'site:admin',
    ok: 204,
    request: async (c) => ({ url: `/api/sites/${await c.world.freshSite(c.siteKey)}` }),
  },
  {
    method: 'GET',
    path: '/api/sites/:siteId/equipment',
    access: 'site:any',
    ok: 200,
    request: (c) => ({ url: `${s(c)}/equipment` }),
  },
  {
    method: 'PUT',
    path: '/api/sites/:siteId/equipment/battery-bank',
    access: 'site:admin',
    ok: 200,
    request: (c) => ({
      url: `${s(c)}/equipment/battery-bank`,
      payload: { chemistry: 'agm', nominalVoltageV: 24, capacityAh: 400 },
    }),
  },
  {
    method: 'DELETE',
    path: '/api/sites/:siteId/equipment/battery-bank',
    access: 'site:admin',
    ok: 204,
    request: async (c) => {
      await c.world.ensureBattery(c.site.siteId);
      return { url: `${s(c)}/equipment/battery-bank` };
    },
  },
  {
    method: 'PUT',
    path: '/api/sites/:siteId/equipment/well',
    access: 'site:admin',
    ok: 200,
    request: (c) => ({
      url: `${s(c)}/equipment/well`,
      payload: { depthM: 90, casingDiameterM: 0.1 },
    }),
  },
  {
    method: 'DELETE',
    path: '/api/sites/:siteId/equipment/well',
    access: 'site:admin',
    ok: 204,
    request: async (c) => {
      await c.world.ensureWell(c.site.siteId);
      return { url: `${s(c)}/equipment/well` };
    },
  },
  {
    method: 'POST',
    path: '/api/sites/:siteId/equipment/:kind',
    access: 'site:admin',
    ok: 201,
    request: (c) => ({
      url: `${s(c)}/equipment/pumps`,
      payload: {
        key: unique('p'),
        name: 'Booster',
        kind: 'booster',
        supply: 'battery',
        ratedCurrentA: 8,
      },
    }),
  },
  {
    method: 'PATCH',
    path: '/api/sites/:siteId/equipment/:kind/:itemId',
    access: 'site:admin',
    ok: 200,
    request: (c) => ({
      url: `${s(c)}/equipment/pumps/${c.site.pumpId}`,
      payload: { name: 'Renamed pump' },
    }),
  },
  {
    method: 'DELETE',
    path: '/api/sites/:siteId/equipment/:kind/:itemId',
    access: 'site:admin',
    ok: 204,
    request: async (c) => ({
      url: `${s(c)}/equipment/pumps/${await c.world.freshPump(c.site.siteId)}`,
    }),
  },
  {
    method: 'PUT',
    path: '/api/sites/:siteId/equipment/:kind/:itemId/notes',
    access: 'site:staff',
    ok: 200,
    request: (c) => ({
      url: `${s(c)}/equipment/pumps/${c.site.pumpId}/notes`,
      payload: { notes: 'Pulled and checked' },
    }),
  },
  {
    method: 'GET',
    path: '/api/sites/:siteId/gateways',
    access: 'site:staff',
    ok: 200,
    request: (c) => ({ url: `${s(c)}/gateways` }),
  },
  {
    method: 'POST',
    path: '/api/sites/:siteId/gateways',
    access: 'site:admin',
    ok: 201,
    request: (c) => ({ url: `${s(c)}/gateways`, payload: { id: unique('gw-') } }),
  },
  {
    method: 'POST',
    path: '/api/sites/:siteId/gateways/:gatewayId/rotate',
    access: 'site:admin',
    ok: 200,
    request: (c) => ({ url: `${s(c)}/gateways/${c.site.gatewayId}/rotate` }),
  },
  {
    method: 'POST',
    path: '/api/sites/:siteId/gateways/:gatewayId/revoke',
    access: 'site:admin',
    ok: 200,
    request: async (c) => ({
      url: `${s(c)}/gateways/${await c.world.freshGateway(c.site.siteId)}/revoke`,
    }),
  },
  {
    method: 'GET',
    path: '/api/sites/:siteId/gateways/:gatewayId/rejects',
    access: 'site:staff',
    ok: 200,
    request: (c) => ({ url: `${s(c)}/gateways/${c.site.gatewayId}/rejects` }),
  },
  {
    method: 'GET',
    path: '/api/sites/:siteId/alerts',
    access: 'site:any',
    ok: 200,
    request: (c) => ({ url: `${s(c)}/alerts` }),
  },
  {
    method: 'GET',
    path: '/api/sites/:siteId/alerts/:alertId',
    access: 'site:any',
    ok: 200,
    request: (c) => ({ url: `${s(c)}/alerts/${c.site.alertId}` }),
  },
  {
    method: 'POST',
    path: '/api/sites/:siteId/alerts/:alertId/acknowledge',
    access: 'site:any',
    ok: 200,
    request: async (c) => ({
      url: `${s(c)}/alerts/${await c.world.freshAlert(c.site.siteId)}/acknowledge`,
      payload: { note: 'Seen it' },
    }),
  },
  {
    method: 'GET',
    path: '/api/sites/:siteId/alert-settings',
    access: 'site:any',
    ok: 200,
    request: (c) => ({ url: `${s(c)}/alert-settings` }),
  },
  {
    method: 'PUT',
    path: '/api/sites/:siteId/alert-settings/:kind',
    access: 'site:admin',
    ok: 200,
    request: (c) => ({
      url: `${s(c)}/alert-settings/water_low`,
      payload: { enabled: true, params: { floorDays: 3 } },
    }),
  },
  {
    method: 'GET',
    path: '/api/sites/:siteId/channels',
    access: 'site:any',
    ok: 200,
    request: (c) => ({ url: `${s(c)}/channels` }),
  },
  {
    method: 'GET',
    path: '/api/sites/:siteId/series',
    access: 'site:any',
    ok: 200,
    request: (c) => ({ url: `${s(c)}/series${q({ channels: 'battery/voltage', ...day() })}` }),
  },
  {
    method: 'GET',
    path: '/api/sites/:siteId/readings.csv',
    access: 'site:any',
    ok: 200,
    request: (c) => ({ url: `${s(c)}/readings.csv${q(day())}` }),
  },
  {
    method: 'GET',
    path: '/api/sites/:siteId/pump-runs',
    access: 'site:any',
    ok: 200,
    request: (c) => ({ url: `${s(c)}/pump-runs` }),
  },
  {
    method: 'GET',
    path: '/api/sites/:siteId/pump-runs.csv',
    access: 'site:any',
    ok: 200,
    request: (c) => ({ url: `${s(c)}/pump-runs.csv` }),
  },
  {
    method: 'GET',
    path: '/api/sites/:siteId/visits',
    access: 'site:any',
    ok: 200,
    request: (c) => ({ url: `${s(c)}/visits` }),
  },
  {
    method: 'POST',
    path: '/api/sites/:siteId/visits',
    access: 'site:staff',
    ok: 201,
    request: (c) => ({
      url: `${s(c)}/visits`,
      payload: { visitedAt: new Date().toISOString(), summary: 'Replaced the float switch' },
    }),
  },
  {
    method: 'GET',
    path: '/api/sites/:siteId/visits/:visitId',
    access: 'site:any',
    ok: 200,
    request: (c) => ({ url: `${s(c)}/visits/${c.site.visitId}` }),
  },
  {
    method: 'PATCH',
    path: '/api/sites/:siteId/visits/:visitId',
    access: 'site:staff',
    ok: 200,
    request: (c) => ({
      url: `${s(c)}/visits/${c.site.visitId}`,
      payload: { findings: 'Float cable chafed' },
    }),
  },
  {
    method: 'DELETE',
    path: '/api/sites/:siteId/visits/:visitId',
    access: 'site:staff',
    ok: 204,
    request: async (c) => ({ url: `${s(c)}/visits/${await c.world.freshVisit(c.site.siteId)}` }),
  },
  {
    method: 'POST',
    path: '/api/sites/:siteId/visits/:visitId/attachments',
    access: 'site:staff',
    ok: 201,
    request: (c) => {
      const body = multipart({}, { name: 'float.png', type: 'image/png', content: c.world.png });
      return {
        url: `${s(c)}/visits/${c.site.visitId}/attachments`,
        payload: body.payload,
        headers: body.headers,
      };
    },
  },
  {
    method: 'GET',
    path: '/api/sites/:siteId/attachments/:attachmentId',
    access: 'site:any',
    ok: 200,
    request: (c) => ({ url: `${s(c)}/attachments/${c.site.attachmentId}` }),
  },
  {
    method: 'GET',
    path: '/api/sites/:siteId/attachments/:attachmentId/thumbnail',
    access: 'site:any',
    ok: 200,
    request: (c) => ({ url: `${s(c)}/attachments/${c.site.attachmentId}/thumbnail` }),
  },
  {
    method: 'DELETE',
    path: '/api/sites/:siteId/attachments/:attachmentId',
    access: 'site:staff',
    ok: 204,
    request: async (c) => ({
      url: `${s(c)}/attachments/${await c.world.freshAttachment(c.site.siteId, c.site.visitId)}`,
    }),
  },
  {
    method: 'POST',
    path: '/api/sites/:siteId/imports/preview',
    access: 'site:staff',
    ok: 200,
    request: (c) => {
      const body = multipart(
        {},
        {
          name: 'logger.csv',
          type: 'text/csv',
          content: Buffer.from('time,battery/voltage\n2025-01-01T00:00:00Z,25.1\n'),
        },
      );
      return { url: `${s(c)}/imports/preview`, payload: body.payload, headers: body.headers };
    },
  },
  {
    method: 'POST',
    path: '/api/sites/:siteId/imports/commit',
    access: 'site:staff',
    ok: 200,
    request: (c) => {
      const mapping = {
        timeColumn: 'time',
        columns: [{ column: 'battery/voltage', measurement: 'battery/voltage' }],
      };
      const body = multipart(
        { mapping: JSON.stringify(mapping) },
        {
          name: 'logger.csv',
          type: 'text/csv',
          content: Buffer.from('time,battery/voltage\n2025-01-01T00:00:00Z,25.1\n'),
        },
      );
      return { url: `${s(c)}/imports/commit`, payload: body.payload, headers: body.headers };
    },
  },
  {
    method: 'GET',
    path: '/api/sites/:siteId/events',
    access: 'site:any',
    ok: 200,
    stream: true,
    request: (c) => ({ url: `${s(c)}/events` }),
  },

  // The OpenAPI page (served by @nestjs/swagger) -----------------------------------------
  {
    method: 'GET',
    path: '/api/docs',
    access: 'public',
    ok: 200,
    request: () => ({ url: '/api/docs' }),
  },
  {
    method: 'GET',
    path: '/api/docs-yaml',
    access: 'public',
    ok: 200,
    request: () => ({ url: '/api/docs-yaml' }),
  },
  {
    method: 'GET',
    path: '/api/docs/openapi.json',
    access: 'public',
    ok: 200,
    request: () => ({ url: '/api/docs/openapi.json' }),
  },
];

/** The status a caller must get, from the row's access rule and the context. */
export function expectedStatus(
  row: RouteRow,
  caller: Caller,
  ctx: Pick<Ctx, 'siteKey' | 'tenant'>,
): number {
  if (row.access === 'public') return row.publicStatus?.(caller) ?? row.ok;
  if (caller === 'anonymous') return 401;
  if (row.access === 'any') return row.ok;
  if (row.access === 'admin') {
    if (caller !== 'admin') return 403;
    return ctx.tenant === 'other' ? 404 : row.ok;
  }
  const visible = ctx.siteKey === 'linked' || (ctx.siteKey === 'unlinked' && caller !== 'owner');
  if (!visible) return 404;
  const allowed: Caller[] =
    row.access === 'site:any'
      ? ['admin', 'technician', 'owner']
      : row.access === 'site:staff'
        ? ['admin', 'technician']
        : ['admin'];
  return allowed.includes(caller) ? row.ok : 403;
}
