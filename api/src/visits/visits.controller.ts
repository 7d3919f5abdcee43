import { Body, Controller, Delete, Get, Param, Patch, Post, Query, Req, Res } from '@nestjs/common';
import { ApiTags } from '@nestjs/swagger';
import type { FastifyReply, FastifyRequest } from 'fastify';
import { z } from 'zod';
import {
  ANY_ROLE,
  CurrentSite,
  CurrentUser,
  SiteAccess,
  STAFF,
} from '../access/access.decorators.js';
import type { SessionUser, VisibleSite } from '../access/session-user.js';
import { Endpoint } from '../common/endpoint.decorator.js';
import { siteParams } from '../common/schemas.js';
import {
  attachmentParams,
  attachmentSchema,
  type CreateVisitBody,
  createVisitBody,
  type UpdateVisitBody,
  updateVisitBody,
  visitParams,
  visitSchema,
  visitsQuery,
} from './dto/visits.dto.js';
import { VisitsService } from './visits.service.js';

type VisitParams = z.infer<typeof visitParams>;
type AttachmentParams = z.infer<typeof attachmentParams>;

@ApiTags('service visits')
@Controller('sites/:siteId')
export class VisitsController {
  constructor(private readonly visits: VisitsService) {}

  @Get('visits')
  @SiteAccess(ANY_ROLE)
  @Endpoint({
    summary: 'Service visits, newest first, with their attachments',
    params: siteParams,
    query: visitsQuery,
    response: z.array(visitSchema),
  })
  list(@CurrentSite() site: VisibleSite, @Query() query: z.infer<typeof visitsQuery>) {
    return this.visits.list(site, query.limit);
  }

  @Post('visits')
  @SiteAccess(STAFF)
  @Endpoint({
    summary: 'Record a service visit',
    params: siteParams,
    body: createVisitBody,
    response: visitSchema,
    status: 201,
  })
  create(
    @CurrentUser() user: SessionUser,
    @CurrentSite() site: VisibleSite,
    @Body() body: CreateVisitBody,
  ) {
    return this.visits.create(user, site, body);
  }

  @Get('visits/:visitId')
  @SiteAccess(ANY_ROLE)
  @Endpoint({ summary: 'One service visit', params: visitParams, response: visitSchema })
  get(@CurrentSite() site: VisibleSite, @Param() params: VisitParams) {
    return this.visits.get(site, params.visitId);
  }

  @Patch('visits/:visitId')
  @SiteAccess(STAFF)
  @Endpoint({
    summary: 'Change a service visit',
    params: visitParams,
    body: updateVisitBody,
    response: visitSchema,
  })
  update(
    @CurrentUser() user: SessionUser,
    @CurrentSite() site: VisibleSite,
    @Param() params: VisitParams,
    @Body() body: UpdateVisitBody,
  ) {
    return this.visits.update(user, site, params.visitId, body);
  }

  @Delete('visits/:visitId')
  @SiteAccess(STAFF)
  @Endpoint({ summary: 'Delete a service visit and its files', params: visitParams, status: 204 })
  async delete(@CurrentSite() site: VisibleSite, @Param() params: VisitParams) {
    await this.visits.delete(site, params.visitId);
  }

  @Post('visits/:visitId/attachments')
  @SiteAccess(STAFF)
  @Endpoint({
    summary: 'Attach a photo (JPEG, PNG, WebP) or PDF to a visit: multipart field "file"',
    description:
      'The type is read from the content, not the name; images get a thumbnail. Size limit: UPLOAD_MAX_BYTES (15 MB by default).',
    params: visitParams,
    multipart: true,
    response: attachmentSchema,
    status: 201,
  })
  async attach(
    @CurrentUser() user: SessionUser,
    @CurrentSite() site: VisibleSite,
    @Param() params: VisitParams,
    @Req() request: FastifyRequest,
  ) {
    if (!request.isMultipart()) {
      return this.visits.attach(user, site, params.visitId, undefined);
    }
    return this.visits.attach(user, site, params.visitId, await request.file());
  }

  @Get('attachments/:attachmentId')
  @SiteAccess(ANY_ROLE)
  @Endpoint({
    summary: 'Download an attachment',
    params: attachmentParams,
    produces: 'application/octet-stream',
  })
  async download(
    @CurrentSite() site: VisibleSite,
    @Param() params: AttachmentParams,
    @Res() reply: FastifyReply,
  ) {
    const file = await this.visits.file(site, params.attachmentId, false);
    return sendFile(reply, file, 'attachment');
  }

  @Get('attachments/:attachmentId/thumbnail')
  @SiteAccess(ANY_ROLE)
  @Endpoint({
    summary: "An image attachment's thumbnail (WebP, 320 px)",
    params: attachmentParams,
    produces: 'image/webp',
  })
  async thumbnail(
    @CurrentSite() site: VisibleSite,
    @Param() params: AttachmentParams,
    @Res() reply: FastifyReply,
  ) {
    const file = await this.visits.file(site, params.attachmentId, true);
    return sendFile(reply, file, 'inline');
  }

  @Delete('attachments/:attachmentId')
  @SiteAccess(STAFF)
  @Endpoint({ summary: 'Delete an attachment', params: attachmentParams, status: 204 })
  async deleteAttachment(@CurrentSite() site: VisibleSite, @Param() params: AttachmentParams) {
    await this.visits.deleteAttachment(site, params.attachmentId);
  }
}

function sendFile(
  reply: FastifyReply,
  file: { stream: NodeJS.ReadableStream; contentType: string; fileName: string },
  disposition: 'attachment' | 'inline',
) {
  const ascii = file.fileName.replace(/[^\x20-\x7e]|["\\]/g, '_');
  return reply
    .header('content-type', file.contentType)
    .header(
      'content-disposition',
      `${disposition}; filename="${ascii}"; filename*=UTF-8''${encodeURIComponent(file.fileName)}`,
    )
    .header('cache-control', 'private, max-age=3600')
    .send(file.stream);
}
