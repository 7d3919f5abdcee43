import { Inject, Injectable } from '@nestjs/common';
import { JwtService } from '@nestjs/jwt';
import type { FastifyReply, FastifyRequest } from 'fastify';
import { API_CONFIG, type ApiConfig } from '../config/api-config.js';
import type { Role, SessionUser } from '../access/session-user.js';
import { UsersRepository } from '../users/users.repository.js';
import { hashOpaqueToken, newOpaqueToken } from './opaque-tokens.js';
import { RefreshTokensRepository } from './refresh-tokens.repository.js';

export const SESSION_COOKIE = 'wk_session';
export const REFRESH_COOKIE = 'wk_refresh';
/** The refresh cookie only travels to the auth routes, nowhere else. */
const REFRESH_PATH = '/api/auth';

interface AccessClaims {
  sub: string;
  cid: string;
  role: Role;
}

/**
 * Sessions: a short-lived signed access token (JWT) and a long-lived random refresh token,
 * both in httpOnly, SameSite=Strict cookies. The refresh token is stored hashed and replaced
 * on every use.
 */
@Injectable()
export class SessionService {
  constructor(
    @Inject(API_CONFIG) private readonly config: ApiConfig,
    private readonly jwt: JwtService,
    private readonly users: UsersRepository,
    private readonly refreshTokens: RefreshTokensRepository,
  ) {}

  /** Starts a session for a user: sets both cookies. */
  async start(reply: FastifyReply, user: { id: string; companyId: string; role: Role }) {
    const access = await this.jwt.signAsync(
      { sub: user.id, cid: user.companyId, role: user.role } satisfies AccessClaims,
      { expiresIn: this.config.accessTokenTtlSeconds },
    );
    const refresh = newOpaqueToken();
    await this.refreshTokens.create(
      user.id,
      hashOpaqueToken(refresh),
      this.config.refreshTokenTtlSeconds,
    );
    const base = { httpOnly: true, sameSite: 'strict' as const, secure: this.config.secureCookies };
    void reply.setCookie(SESSION_COOKIE, access, {
      ...base,
      path: '/',
      maxAge: this.config.accessTokenTtlSeconds,
    });
    void reply.setCookie(REFRESH_COOKIE, refresh, {
      ...base,
      path: REFRESH_PATH,
      maxAge: this.config.refreshTokenTtlSeconds,
    });
  }

  clear(reply: FastifyReply): void {
    const base = { httpOnly: true, sameSite: 'strict' as const, secure: this.config.secureCookies };
    void reply.clearCookie(SESSION_COOKIE, { ...base, path: '/' });
    void reply.clearCookie(REFRESH_COOKIE, { ...base, path: REFRESH_PATH });
  }

  /**
   * The signed-in user of a request, or null. The token proves who it is; the row is read
   * again so a deactivation or role change takes effect at once.
   */
  async userFromRequest(request: FastifyRequest): Promise<SessionUser | null> {
    const token = request.cookies?.[SESSION_COOKIE];
    if (!token) return null;
    let claims: AccessClaims;
    try {
      claims = await this.jwt.verifyAsync<AccessClaims>(token);
    } catch {
      return null;
    }
    const row = await this.users.findActiveById(claims.sub);
    if (!row || row.company_id !== claims.cid) return null;
    return {
      id: row.id,
      companyId: row.company_id,
      role: row.role,
      email: row.email,
      name: row.name,
    };
  }

  refreshTokenOf(request: FastifyRequest): string | undefined {
    return request.cookies?.[REFRESH_COOKIE];
  }
}
