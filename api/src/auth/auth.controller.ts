import { Body, Controller, Get, Param, Post, Req, Res } from '@nestjs/common';
import { ApiTags } from '@nestjs/swagger';
import type { FastifyReply, FastifyRequest } from 'fastify';
import { z } from 'zod';
import { ANY_ROLE, Allow, CurrentUser, Public } from '../access/access.decorators.js';
import type { SessionUser } from '../access/session-user.js';
import { Endpoint } from '../common/endpoint.decorator.js';
import { AuthService } from './auth.service.js';
import {
  type AcceptInvitationBody,
  acceptInvitationBody,
  type ConfirmResetBody,
  confirmResetBody,
  invitationPreview,
  meResponse,
  type RequestResetBody,
  requestResetBody,
  type SignInBody,
  signInBody,
  tokenParams,
} from './dto/auth.dto.js';

@ApiTags('auth')
@Controller('auth')
export class AuthController {
  constructor(private readonly auth: AuthService) {}

  @Post('sign-in')
  @Public()
  @Endpoint({
    summary: 'Sign in with e-mail and password',
    description:
      'Sets the session cookies (wk_session, wk_refresh). Repeated failures are paused per account and per address (429).',
    body: signInBody,
    response: meResponse,
  })
  signIn(
    @Body() body: SignInBody,
    @Req() request: FastifyRequest,
    @Res({ passthrough: true }) reply: FastifyReply,
  ) {
    return this.auth.signIn(body, request, reply);
  }

  @Post('refresh')
  @Public()
  @Endpoint({
    summary: 'Renew the session from the refresh cookie (rotated on every use)',
    response: meResponse,
  })
  refresh(@Req() request: FastifyRequest, @Res({ passthrough: true }) reply: FastifyReply) {
    return this.auth.refresh(request, reply);
  }

  @Post('sign-out')
  @Public()
  @Endpoint({ summary: 'End the session and clear its cookies', status: 204 })
  async signOut(@Req() request: FastifyRequest, @Res({ passthrough: true }) reply: FastifyReply) {
    await this.auth.signOut(request, reply);
  }

  @Get('me')
  @Allow(...ANY_ROLE)
  @Endpoint({
    summary: 'Who am I: user, role, company, units, time zone, sites',
    response: meResponse,
  })
  me(@CurrentUser() user: SessionUser) {
    return this.auth.me(user);
  }

  @Get('invitations/:token')
  @Public()
  @Endpoint({
    summary: 'Look at an invitation before accepting it (404 unknown, 410 used/expired)',
    params: tokenParams,
    response: invitationPreview,
  })
  previewInvitation(@Param() params: z.infer<typeof tokenParams>) {
    return this.auth.previewInvitation(params.token);
  }

  @Post('invitations/accept')
  @Public()
  @Endpoint({
    summary: 'Accept an invitation: set a password, create the account and sign in',
    body: acceptInvitationBody,
    response: meResponse,
  })
  acceptInvitation(
    @Body() body: AcceptInvitationBody,
    @Req() request: FastifyRequest,
    @Res({ passthrough: true }) reply: FastifyReply,
  ) {
    return this.auth.acceptInvitation(body, request, reply);
  }

  @Post('password-reset')
  @Public()
  @Endpoint({
    summary: 'E-mail a password reset link (answers 202 whether or not the address has an account)',
    body: requestResetBody,
    status: 202,
  })
  async requestReset(@Body() body: RequestResetBody, @Req() request: FastifyRequest) {
    await this.auth.requestPasswordReset(body.email, request.ip);
    return { accepted: true };
  }

  @Post('password-reset/confirm')
  @Public()
  @Endpoint({
    summary: 'Set a new password from a reset link (ends every session of the account)',
    body: confirmResetBody,
    status: 204,
  })
  async confirmReset(@Body() body: ConfirmResetBody, @Req() request: FastifyRequest) {
    await this.auth.confirmPasswordReset(body, request.ip);
  }
}
