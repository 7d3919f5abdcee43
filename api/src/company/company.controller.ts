import { Body, Controller, Get, Patch, Query, Req } from '@nestjs/common';
import { ApiTags } from '@nestjs/swagger';
import type { Database } from '@wellkept/db';
import type { FastifyRequest } from 'fastify';
import { z } from 'zod';
import { ANY_ROLE, Allow, CurrentUser } from '../access/access.decorators.js';
import type { SessionUser } from '../access/session-user.js';
import { AuditRepository } from '../audit/audit.repository.js';
import { Endpoint } from '../common/endpoint.decorator.js';
import { InjectDb } from '../database/database.module.js';

const companySchema = z.object({ id: z.string(), name: z.string() });
const updateCompanyBody = z.object({
  name: z.string().trim().min(1, 'must not be empty').max(200, 'must be at most 200 characters'),
});
const auditQuery = z.object({
  before: z.coerce.number().int().positive().optional(),
  limit: z.coerce.number().int().min(1).max(500).default(100),
});
const auditEntry = z.object({
  id: z.number(),
  at: z.date(),
  action: z.string(),
  targetType: z.string().nullable(),
  targetId: z.string().nullable(),
  details: z.record(z.string(), z.unknown()),
  ip: z.string().nullable(),
  userId: z.string().nullable(),
  userName: z.string().nullable(),
});

/** The tenant itself: its name and its audit log. Small enough to need no service. */
@ApiTags('company')
@Controller()
export class CompanyController {
  constructor(
    @InjectDb() private readonly db: Database,
    private readonly audit: AuditRepository,
  ) {}

  @Get('company')
  @Allow(...ANY_ROLE)
  @Endpoint({ summary: "The caller's company", response: companySchema })
  get(@CurrentUser() user: SessionUser) {
    return this.db
      .selectFrom('companies')
      .select(['id', 'name'])
      .where('id', '=', user.companyId)
      .executeTakeFirstOrThrow();
  }

  @Patch('company')
  @Allow('admin')
  @Endpoint({ summary: 'Rename the company', body: updateCompanyBody, response: companySchema })
  async update(
    @CurrentUser() user: SessionUser,
    @Body() body: z.infer<typeof updateCompanyBody>,
    @Req() request: FastifyRequest,
  ) {
    return this.db.transaction().execute(async (trx) => {
      const row = await trx
        .updateTable('companies')
        .set({ name: body.name })
        .where('id', '=', user.companyId)
        .returning(['id', 'name'])
        .executeTakeFirstOrThrow();
      await this.audit.record(
        {
          companyId: user.companyId,
          userId: user.id,
          action: 'company_renamed',
          details: { name: body.name },
          ip: request.ip,
        },
        trx,
      );
      return row;
    });
  }

  @Get('audit-log')
  @Allow('admin')
  @Endpoint({
    summary: 'Sign-ins, role changes and configuration changes, newest first (page with `before`)',
    query: auditQuery,
    response: z.array(auditEntry),
  })
  async auditLog(@CurrentUser() user: SessionUser, @Query() query: z.infer<typeof auditQuery>) {
    const rows = await this.audit.list(user.companyId, query);
    return rows.map((r) => ({
      id: r.id,
      at: r.at,
      action: r.action,
      targetType: r.target_type,
      targetId: r.target_id,
      details: r.details,
      ip: r.ip,
      userId: r.user_id,
      userName: r.user_name,
    }));
  }
}
