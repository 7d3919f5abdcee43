import { type CanActivate, type ExecutionContext, Injectable, Logger } from '@nestjs/common';
import { Reflector } from '@nestjs/core';
import type { FastifyRequest } from 'fastify';
import { ApiError, forbidden, notFound, unauthorized } from '../common/api-error.js';
import { SessionService } from '../auth/session.service.js';
import { ACCESS_KEY, type AccessRule } from './access.decorators.js';
import { SiteAccessRepository } from './site-access.repository.js';

/**
 * The global guard. Order matters: session (401), then the site's visibility (404 for another
 * tenant's or an unlinked site), then the role (403). Routes that declare no rule are refused.
 */
@Injectable()
export class AccessGuard implements CanActivate {
  private readonly logger = new Logger('access');

  constructor(
    private readonly reflector: Reflector,
    private readonly sessions: SessionService,
    private readonly sites: SiteAccessRepository,
  ) {}

  async canActivate(context: ExecutionContext): Promise<boolean> {
    const rule = this.reflector.getAllAndOverride<AccessRule | undefined>(ACCESS_KEY, [
      context.getHandler(),
      context.getClass(),
    ]);
    if (!rule) {
      this.logger.error(
        `${context.getClass().name}.${context.getHandler().name} declares no access rule`,
      );
      throw new ApiError(
        500,
        'internal_error',
        'Something went wrong on our side; try again shortly',
      );
    }
    if (rule.kind === 'public') return true;
    const request = context.switchToHttp().getRequest<FastifyRequest>();
    const user = await this.sessions.userFromRequest(request);
    if (!user) throw unauthorized();
    request.user = user;
    if (rule.kind === 'site') {
      const siteId = (request.params as Record<string, string | undefined>)[rule.param] ?? '';
      const site = await this.sites.findVisible(user, siteId);
      if (!site) throw notFound('Site');
      request.site = site;
    }
    if (!rule.roles.includes(user.role)) throw forbidden();
    return true;
  }
}
