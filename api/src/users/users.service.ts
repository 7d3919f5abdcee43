import { Inject, Injectable } from '@nestjs/common';
import type { Database } from '@wellkept/db';
import type { SessionUser } from '../access/session-user.js';
import { AuditRepository } from '../audit/audit.repository.js';
import { hashOpaqueToken, newOpaqueToken } from '../auth/opaque-tokens.js';
import { RefreshTokensRepository } from '../auth/refresh-tokens.repository.js';
import { ApiError, badRequest, conflict, notFound } from '../common/api-error.js';
import { API_CONFIG, type ApiConfig } from '../config/api-config.js';
import { InjectDb } from '../database/database.module.js';
import { MailService } from '../mail/mail.service.js';
import { invitationMail } from '../mail/templates.js';
import type { InvitationDto, InviteBody, UpdateUserBody, UserDto } from './dto/users.dto.js';
import { InvitationsRepository } from './invitations.repository.js';
import { UsersRepository } from './users.repository.js';

@Injectable()
export class UsersService {
  constructor(
    @Inject(API_CONFIG) private readonly config: ApiConfig,
    @InjectDb() private readonly db: Database,
    private readonly users: UsersRepository,
    private readonly invitations: InvitationsRepository,
    private readonly refreshTokens: RefreshTokensRepository,
    private readonly audit: AuditRepository,
    private readonly mail: MailService,
  ) {}

  async list(admin: SessionUser): Promise<UserDto[]> {
    const rows = await this.users.listInCompany(admin.companyId);
    return rows.map((u) => ({
      id: u.id,
      email: u.email,
      name: u.name,
      role: u.role,
      active: u.active,
      lastSignInAt: u.last_sign_in_at,
      createdAt: u.created_at,
      siteIds: u.site_ids,
    }));
  }

  async update(
    admin: SessionUser,
    userId: string,
    body: UpdateUserBody,
    ip: string,
  ): Promise<UserDto> {
    const user = await this.users.findInCompany(admin.companyId, userId);
    if (!user) throw notFound('User');
    const role = body.role ?? user.role;
    if (body.siteIds && role !== 'owner') {
      throw badRequest('validation_failed', 'Only owners are linked to sites', [
        { path: 'siteIds', message: 'only owners are linked to sites' },
      ]);
    }
    if (user.id === admin.id && body.role && body.role !== 'admin') {
      throw conflict('last_admin', 'You cannot change your own role; ask another admin');
    }
    const siteIds = body.siteIds
      ? await this.companySites(admin.companyId, body.siteIds)
      : undefined;
    await this.db.transaction().execute(async (trx) => {
      await this.users.update(admin.companyId, userId, { role: body.role, name: body.name }, trx);
      if (siteIds) await this.users.setLinkedSites(userId, siteIds, trx);
      if (body.role && body.role !== 'owner') await this.users.setLinkedSites(userId, [], trx);
      if (body.role && body.role !== user.role) {
        await this.audit.record(
          {
            companyId: admin.companyId,
            userId: admin.id,
            action: 'role_changed',
            targetType: 'user',
            targetId: userId,
            details: { from: user.role, to: body.role },
            ip,
          },
          trx,
        );
      }
      if (siteIds) {
        await this.audit.record(
          {
            companyId: admin.companyId,
            userId: admin.id,
            action: 'owner_sites_changed',
            targetType: 'user',
            targetId: userId,
            details: { siteIds },
            ip,
          },
          trx,
        );
      }
    });
    return (await this.list(admin)).find((u) => u.id === userId)!;
  }

  async deactivate(admin: SessionUser, userId: string, ip: string): Promise<void> {
    if (userId === admin.id) throw conflict('self', 'You cannot deactivate your own account');
    const user = await this.users.findInCompany(admin.companyId, userId);
    if (!user) throw notFound('User');
    await this.db.transaction().execute(async (trx) => {
      await this.users.update(admin.companyId, userId, { active: false }, trx);
      await this.refreshTokens.revokeAllForUser(userId, trx);
      await this.audit.record(
        {
          companyId: admin.companyId,
          userId: admin.id,
          action: 'user_deactivated',
          targetType: 'user',
          targetId: userId,
          ip,
        },
        trx,
      );
    });
  }

  async listInvitations(admin: SessionUser): Promise<InvitationDto[]> {
    const rows = await this.invitations.listInCompany(admin.companyId);
    return rows.map(toInvitationDto);
  }

  /** Records the invitation, e-mails the link (through the outbox) and returns it. */
  async invite(admin: SessionUser, body: InviteBody, ip: string): Promise<InvitationDto> {
    if (await this.users.emailInUse(body.email)) {
      throw new ApiError(
        409,
        'email_in_use',
        'An account with this e-mail address already exists',
        [{ path: 'email', message: 'already has an account' }],
      );
    }
    const siteIds = await this.companySites(admin.companyId, body.siteIds);
    const token = newOpaqueToken();
    const companyName = await this.users.companyName(admin.companyId);
    const invitation = await this.db.transaction().execute(async (trx) => {
      const row = await this.invitations.create({
        companyId: admin.companyId,
        email: body.email,
        name: body.name,
        role: body.role,
        siteIds,
        tokenHash: hashOpaqueToken(token),
        invitedBy: admin.id,
        ttlSeconds: this.config.invitationTtlSeconds,
      });
      const link = `${this.config.publicUrl}/accept-invitation?token=${encodeURIComponent(token)}`;
      const { subject, text } = invitationMail({
        companyName,
        inviterName: admin.name,
        role: body.role,
        link,
        expiresAt: row.expires_at,
      });
      await this.mail.enqueue(
        {
          dedupeKey: `invitation:${row.id}`,
          to: body.email,
          subject,
          text,
          category: 'invitation',
        },
        trx,
      );
      await this.audit.record(
        {
          companyId: admin.companyId,
          userId: admin.id,
          action: 'user_invited',
          targetType: 'invitation',
          targetId: row.id,
          details: { email: body.email, role: body.role },
          ip,
        },
        trx,
      );
      return row;
    });
    this.mail.flush();
    return toInvitationDto(invitation);
  }

  async revokeInvitation(admin: SessionUser, invitationId: string): Promise<void> {
    const done = await this.invitations.revoke(admin.companyId, invitationId);
    if (!done) throw notFound('Pending invitation');
  }

  /** The ids, checked to be sites of the company; an unknown one is a 404 (never a hint). */
  private async companySites(companyId: string, ids: string[]): Promise<string[]> {
    const unique = [...new Set(ids)];
    if (!unique.length) return [];
    const rows = await this.db
      .selectFrom('sites')
      .select('id')
      .where('company_id', '=', companyId)
      .where('id', 'in', unique)
      .execute();
    if (rows.length !== unique.length) throw notFound('Site');
    return unique;
  }
}

function toInvitationDto(row: {
  id: string;
  email: string;
  name: string;
  role: 'admin' | 'technician' | 'owner';
  site_ids: string[];
  expires_at: Date;
  used_at: Date | null;
  revoked_at: Date | null;
  created_at: Date;
}): InvitationDto {
  const status = row.used_at
    ? 'used'
    : row.revoked_at
      ? 'revoked'
      : row.expires_at.getTime() <= Date.now()
        ? 'expired'
        : 'pending';
  return {
    id: row.id,
    email: row.email,
    name: row.name,
    role: row.role,
    siteIds: row.site_ids,
    status,
    expiresAt: row.expires_at,
    createdAt: row.created_at,
  };
}
