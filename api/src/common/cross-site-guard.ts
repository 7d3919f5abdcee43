import type { FastifyReply, FastifyRequest, HookHandlerDoneFunction } from 'fastify';
import type { ErrorBody } from './api-error.js';

/** Methods that change nothing; everything else must come from the dashboard itself. */
const SAFE_METHODS = new Set(['GET', 'HEAD', 'OPTIONS']);

/**
 * Refuses state-changing requests that a browser sends on behalf of another site (cross-site
 * request forgery). The session cookies are SameSite=Strict already; this is the second line,
 * for browsers or set-ups where that is not enough (a sibling subdomain is "same-site").
 *
 * A browser marks every such request with `Origin` (and modern ones with `Sec-Fetch-Site`):
 * - `Origin` present: it must be the dashboard's own origin (`PUBLIC_URL`) or the origin the
 *   request was addressed to (same-origin, e.g. through the dashboard's proxy); `null` is refused;
 * - no `Origin` but `Sec-Fetch-Site: cross-site` or `same-site`: refused;
 * - neither: not a browser (scripts, curl, the test client), which cannot ride on someone's
 *   cookies, so it is let through.
 */
export function crossSiteGuard(publicUrl: string) {
  const dashboardOrigin = new URL(publicUrl).origin;
  return (request: FastifyRequest, reply: FastifyReply, done: HookHandlerDoneFunction): void => {
    if (SAFE_METHODS.has(request.method)) {
      done();
      return;
    }
    const origin = header(request, 'origin');
    const fetchSite = header(request, 'sec-fetch-site');
    let allowed: boolean;
    if (origin !== undefined) {
      allowed = origin === dashboardOrigin || sameOrigin(origin, header(request, 'host'));
    } else {
      allowed = fetchSite !== 'cross-site' && fetchSite !== 'same-site';
    }
    if (allowed) {
      done();
      return;
    }
    const body: ErrorBody = {
      error: {
        status: 403,
        code: 'cross_site_request',
        message:
          'This request came from another site and was refused; use the Wellkept dashboard to make changes',
      },
    };
    void reply.code(403).header('cache-control', 'no-store').send(body);
  };
}

function header(request: FastifyRequest, name: string): string | undefined {
  const value = request.headers[name];
  return Array.isArray(value) ? value[0] : value;
}

function sameOrigin(origin: string, host: string | undefined): boolean {
  if (!host || origin === 'null') return false;
  try {
    const url = new URL(origin);
    return (url.protocol === 'http:' || url.protocol === 'https:') && url.host === host;
  } catch {
    return false;
  }
}
