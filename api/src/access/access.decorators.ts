import { createParamDecorator, type ExecutionContext, SetMetadata } from '@nestjs/common';
import type { FastifyRequest } from 'fastify';
import { ApiCookieAuth } from '@nestjs/swagger';
import { applyDecorators } from '@nestjs/common';
import type { Role } from './session-user.js';

export const ACCESS_KEY = 'wellkept:access';

/** Who may call a route. Every route declares one; a route without is refused (fail closed). */
export type AccessRule =
  | { kind: 'public' }
  | { kind: 'roles'; roles: readonly Role[] }
  | { kind: 'site'; roles: readonly Role[]; param: string };

/** No session needed (sign-in, invitation and reset links, the OpenAPI page). */
export const Public = (): MethodDecorator & ClassDecorator =>
  SetMetadata(ACCESS_KEY, { kind: 'public' } satisfies AccessRule);

/** Signed-in callers with one of these roles; company-wide data is scoped in the service. */
export const Allow = (...roles: Role[]): MethodDecorator & ClassDecorator =>
  applyDecorators(
    SetMetadata(ACCESS_KEY, { kind: 'roles', roles } satisfies AccessRule),
    ApiCookieAuth('wk_session'),
  );

export const ANY_ROLE: readonly Role[] = ['admin', 'technician', 'owner'];
export const STAFF: readonly Role[] = ['admin', 'technician'];

/**
 * A route about one site (path parameter `siteId`). The guard first checks the caller may see
 * the site (same company; owners only linked sites) and answers 404 otherwise, then checks
 * the role (403), so another tenant's id never reveals that it exists.
 */
export const SiteAccess = (roles: readonly Role[], param = 'siteId'): MethodDecorator =>
  applyDecorators(
    SetMetadata(ACCESS_KEY, { kind: 'site', roles, param } satisfies AccessRule),
    ApiCookieAuth('wk_session'),
  );

/** The signed-in user (guarded routes only). */
export const CurrentUser = createParamDecorator((_data: unknown, ctx: ExecutionContext) => {
  const user = ctx.switchToHttp().getRequest<FastifyRequest>().user;
  if (!user) throw new Error('CurrentUser used on a route without a session');
  return user;
});

/** The site checked by `SiteAccess` for this request. */
export const CurrentSite = createParamDecorator((_data: unknown, ctx: ExecutionContext) => {
  const site = ctx.switchToHttp().getRequest<FastifyRequest>().site;
  if (!site) throw new Error('CurrentSite used on a route without SiteAccess');
  return site;
});
