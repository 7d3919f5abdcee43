import { Body, Controller, Delete, Get, Param, Patch, Post, Req } from '@nestjs/common';
import { ApiTags } from '@nestjs/swagger';
import type { FastifyRequest } from 'fastify';
import { z } from 'zod';
import { Allow, CurrentUser } from '../access/access.decorators.js';
import type { SessionUser } from '../access/session-user.js';
import { Endpoint } from '../common/endpoint.decorator.js';
import {
  invitationParams,
  type InvitationParams,
  invitationSchema,
  type InviteBody,
  inviteBody,
  type UpdateUserBody,
  updateUserBody,
  userParams,
  type UserParams,
  userSchema,
} from './dto/users.dto.js';
import { UsersService } from './users.service.js';

@ApiTags('users')
@Controller()
export class UsersController {
  constructor(private readonly users: UsersService) {}

  @Get('users')
  @Allow('admin')
  @Endpoint({ summary: "The company's people", response: z.array(userSchema) })
  list(@CurrentUser() admin: SessionUser) {
    return this.users.list(admin);
  }

  @Patch('users/:userId')
  @Allow('admin')
  @Endpoint({
    summary: "Change a person's role, name or (owners) linked sites",
    params: userParams,
    body: updateUserBody,
    response: userSchema,
  })
  update(
    @CurrentUser() admin: SessionUser,
    @Param() params: UserParams,
    @Body() body: UpdateUserBody,
    @Req() request: FastifyRequest,
  ) {
    return this.users.update(admin, params.userId, body, request.ip);
  }

  @Post('users/:userId/deactivate')
  @Allow('admin')
  @Endpoint({
    summary: 'Deactivate an account (ends its sessions)',
    params: userParams,
    status: 204,
  })
  async deactivate(
    @CurrentUser() admin: SessionUser,
    @Param() params: UserParams,
    @Req() request: FastifyRequest,
  ) {
    await this.users.deactivate(admin, params.userId, request.ip);
  }

  @Get('invitations')
  @Allow('admin')
  @Endpoint({
    summary: 'Invitations sent by the company, newest first',
    response: z.array(invitationSchema),
  })
  invitations(@CurrentUser() admin: SessionUser) {
    return this.users.listInvitations(admin);
  }

  @Post('invitations')
  @Allow('admin')
  @Endpoint({
    summary: 'Invite a technician, owner or admin by e-mail (owners are linked to sites)',
    body: inviteBody,
    response: invitationSchema,
    status: 201,
  })
  invite(
    @CurrentUser() admin: SessionUser,
    @Body() body: InviteBody,
    @Req() request: FastifyRequest,
  ) {
    return this.users.invite(admin, body, request.ip);
  }

  @Delete('invitations/:invitationId')
  @Allow('admin')
  @Endpoint({ summary: 'Withdraw a pending invitation', params: invitationParams, status: 204 })
  async revoke(@CurrentUser() admin: SessionUser, @Param() params: InvitationParams) {
    await this.users.revokeInvitation(admin, params.invitationId);
  }
}
