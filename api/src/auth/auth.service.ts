import { Inject, Injectable } from '@nestjs/common';
import type { Database } from '@wellkept/db';
import type { FastifyReply, FastifyRequest } from 'fastify';
import { API_CONFIG, type ApiConfig } from '../config/api-config.js';
import { ApiError, unauthorized } from '../common/api-error.js';
import type { SessionUser } from '../access/session-user.js';
import { SiteAccessRepository } from '../access/site-access.repository.js';
import { AuditRepository } from '../audit/audit.repository.js';
import { InjectDb } from '../database/database.module.js';
import { MailService } from '../mail/mail.service.js';
import { passwordResetMail } from '../mail/templates.js';
import { InvitationsRepository } from '../users/invitations.repository.js';
import { UsersRepository } from '../users/users.repository.js';
import type {
  AcceptInvitationBody,
  ConfirmResetBody,
  MeResponse,
  SignInBody,
} from './dto/auth.dto.js';
import { hashOpaqueToken, newOpaqueToken } from './opaque-tokens.js';
import { PasswordHasher } from './password-hasher.js';
import { PasswordResetsRepository } from './password-resets.repository.js';
import { RefreshTokensRepository } from './refresh-tokens.repository.js';
import { SessionService } from './session.service.js';
import { SignInLimiter } from './sign-in-limiter.js';

@Injectable()
export class AuthService {
  constructor(
    @Inject(API_CONFIG) private readonly config: ApiConfig,
    @InjectDb() private readonly db: Database,
    private readonly users: UsersRepository,
    private readonly sessions: SessionService,
    private readonly refreshTokens: RefreshTokensRepository,
    private readonly hasher: PasswordHasher,
    private readonly limiter: SignInLimiter,
    private readonly audit: AuditRepository,
    private readonly invitations: InvitationsRepository,
    private readonly resets: PasswordResetsRepository,
    private readonly mail: MailService,
    private readonly siteAccess: SiteAccessRepository,
  ) {}

  async signIn(
    body: SignInBody,
    request: FastifyRequest,
    reply: FastifyReply,
  ): Promise<MeResponse> {
    const ip = request.ip;
    await this.limiter.check(body.email, ip);
    const user = await this.users.findForSignIn(body.email);
    const ok =
      user?.active && user.password_hash
        ? await this.hasher.verify(user.password_hash, body.password)
        : await this.hasher.verifyUnknown(body.password);
    await this.limiter.record(body.email, ip, ok);
    if (!ok || !user) {
      if (user) {
        await this.audit.record({
          companyId: user.company_id,
          userId: user.id,
          action: 'sign_in_failed',
          ip,
        });
      }
      throw new ApiError(401, 'invalid_credentials', 'The e-mail address or password is not right');
    }
    await this.sessions.start(reply, { id: user.id, companyId: user.company_id, role: user.role });
    await this.users.markSignedIn(user.id);
    await this.audit.record({ companyId: user.company_id, userId: user.id, action: 'sign_in', ip });
    return this.me({
      id: user.id,
      companyId: user.company_id,
      role: user.role,
      email: body.email,
      name: '',
    });
  }

  /** Swaps a refresh token for a new pair; a reused token ends every session of its user. */
  async refresh(request: FastifyRequest, reply: FastifyReply): Promise<MeResponse> {
    const token = this.sessions.refreshTokenOf(request);
    if (!token) throw unauthorized('Your session has ended; sign in again');
    const result = await this.refreshTokens.consume(hashOpaqueToken(token));
    if (!result || 'reused' in result) {
      if (result) await this.refreshTokens.revokeAllForUser(result.userId);
      this.sessions.clear(reply);
      throw unauthorized('Your session has ended; sign in again');
    }
    const user = await this.users.findActiveById(result.userId);
    if (!user) {
      this.sessions.clear(reply);
      throw unauthorized('Your session has ended; sign in again');
    }
    await this.sessions.start(reply, { id: user.id, companyId: user.company_id, role: user.role });
    return this.me({
      id: user.id,
      companyId: user.company_id,
      role: user.role,
      email: user.email,
      name: user.name,
    });
  }

  async signOut(request: FastifyRequest, reply: FastifyReply): Promise<void> {
    const token = this.sessions.refreshTokenOf(request);
    if (token) await this.refreshTokens.revoke(hashOpaqueToken(token));
    this.sessions.clear(reply);
  }

  async me(session: SessionUser): Promise<MeResponse> {
    const user = await this.users.findActiveById(session.id);
    if (!user) throw unauthorized();
    const [companyName, sites] = await Promise.all([
      this.users.companyName(user.company_id),
      this.siteAccess.listVisible(session),
    ]);
    return {
      user: {
        id: user.id,
        email: user.email,
        name: user.name,
        role: user.role,
        unitSystem: user.unit_system,
        timeZone: user.time_zone,
      },
      company: { id: user.company_id, name: companyName },
      siteIds: sites.map((s) => s.id),
    };
  }

  // Invitations ------------------------------------------------------------------------

  async previewInvitation(token: string) {
    const invitation = await this.invitations.findByTokenHash(hashOpaqueToken(token));
    if (!invitation) throw new ApiError(404, 'not_found', 'This invitation link is not valid');
    assertLinkUsable(invitation, 'invitation');
    return {
      email: invitation.email,
      name: invitation.name,
      role: invitation.role,
      companyName: invitation.company_name,
      expiresAt: invitation.expires_at,
    };
  }

  /** Creates the account from an invitation (once) and signs the new person in. */
  async acceptInvitation(
    body: AcceptInvitationBody,
    request: FastifyRequest,
    reply: FastifyReply,
  ): Promise<MeResponse> {
    const tokenHash = hashOpaqueToken(body.token);
    const passwordHash = await this.hasher.hash(body.password);
    const created = await this.db.transaction().execute(async (trx) => {
      const invitation = await this.invitations.consume(trx, tokenHash);
      if (!invitation) return null;
      if (await this.emailTaken(trx, invitation.email)) {
        throw new ApiError(
          409,
          'email_in_use',
          'An account with this e-mail address already exists',
        );
      }
      const name = body.name ?? (invitation.name || invitation.email.split('@')[0]!);
      const userId = await this.users.create(trx, {
        companyId: invitation.company_id,
        email: invitation.email,
        name,
        role: invitation.role,
        passwordHash,
      });
      if (invitation.role === 'owner' && invitation.site_ids.length) {
        // Only sites still in the company (one may have been deleted since the invitation).
        const sites = await trx
          .selectFrom('sites')
          .select('id')
          .where('company_id', '=', invitation.company_id)
          .where('id', 'in', invitation.site_ids)
          .execute();
        await this.users.setLinkedSites(
          userId,
          sites.map((s) => s.id),
          trx,
        );
      }
      await this.audit.record(
        {
          companyId: invitation.company_id,
          userId,
          action: 'invitation_accepted',
          targetType: 'invitation',
          targetId: invitation.id,
          details: { role: invitation.role },
          ip: request.ip,
        },
        trx,
      );
      return { userId, companyId: invitation.company_id, role: invitation.role };
    });
    if (!created) {
      const invitation = await this.invitations.findByTokenHash(tokenHash);
      if (!invitation) throw new ApiError(404, 'not_found', 'This invitation link is not valid');
      assertLinkUsable(invitation, 'invitation');
      throw new ApiError(410, 'link_used', 'This invitation has already been used');
    }
    await this.sessions.start(reply, {
      id: created.userId,
      companyId: created.companyId,
      role: created.role,
    });
    const user = await this.users.findActiveById(created.userId);
    return this.me({
      id: created.userId,
      companyId: created.companyId,
      role: created.role,
      email: user!.email,
      name: user!.name,
    });
  }

  // Password reset ---------------------------------------------------------------------

  /** Always answers the same, so the form does not reveal which addresses have accounts. */
  async requestPasswordReset(email: string, ip: string): Promise<void> {
    const user = await this.users.findForSignIn(email);
    if (!user?.active) return;
    const token = newOpaqueToken();
    const reset = await this.resets.create(
      user.id,
      hashOpaqueToken(token),
      this.config.passwordResetTtlSeconds,
    );
    const link = `${this.config.publicUrl}/reset-password?token=${encodeURIComponent(token)}`;
    const { subject, text } = passwordResetMail({ link, expiresAt: reset.expires_at });
    await this.mail.enqueue({
      dedupeKey: `password_reset:${reset.id}`,
      to: email,
      subject,
      text,
      category: 'password_reset',
      userId: user.id,
    });
    this.mail.flush();
    await this.audit.record({
      companyId: user.company_id,
      userId: user.id,
      action: 'password_reset_requested',
      ip,
    });
  }

  async confirmPasswordReset(body: ConfirmResetBody, ip: string): Promise<void> {
    const tokenHash = hashOpaqueToken(body.token);
    const passwordHash = await this.hasher.hash(body.password);
    const done = await this.db.transaction().execute(async (trx) => {
      const reset = await this.resets.consume(trx, tokenHash);
      if (!reset) return null;
      await this.users.setPassword(reset.user_id, passwordHash, trx);
      await this.resets.expireOthers(trx, reset.user_id);
      await this.refreshTokens.revokeAllForUser(reset.user_id, trx);
      const user = await trx
        .selectFrom('users')
        .select('company_id')
        .where('id', '=', reset.user_id)
        .executeTakeFirstOrThrow();
      await this.audit.record(
        { companyId: user.company_id, userId: reset.user_id, action: 'password_reset', ip },
        trx,
      );
      return reset;
    });
    if (!done) {
      const reset = await this.resets.findByTokenHash(tokenHash);
      if (!reset) throw new ApiError(404, 'not_found', 'This reset link is not valid');
      assertLinkUsable({ ...reset, revoked_at: null }, 'reset link');
      throw new ApiError(410, 'link_used', 'This reset link has already been used');
    }
  }

  private async emailTaken(db: Database, email: string): Promise<boolean> {
    const row = await db
      .selectFrom('users')
      .select('id')
      .where((eb) => eb(eb.fn('lower', ['email']), '=', email.toLowerCase()))
      .executeTakeFirst();
    return row !== undefined;
  }
}

/** Explains why an e-mailed link cannot be used (410 Gone: it existed but is over). */
function assertLinkUsable(
  link: { used_at: Date | null; revoked_at: Date | null; expires_at: Date },
  what: string,
): void {
  if (link.used_at) throw new ApiError(410, 'link_used', `This ${what} has already been used`);
  if (link.revoked_at) throw new ApiError(410, 'link_revoked', `This ${what} was withdrawn`);
  if (link.expires_at.getTime() <= Date.now()) {
    throw new ApiError(410, 'link_expired', `This ${what} has expired; ask for a new one`);
  }
}
