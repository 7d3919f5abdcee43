import { createSecretKey } from 'node:crypto';
import { Module } from '@nestjs/common';
import { APP_GUARD } from '@nestjs/core';
import { JwtModule } from '@nestjs/jwt';
import { AccessGuard } from '../access/access.guard.js';
import { SiteAccessRepository } from '../access/site-access.repository.js';
import { AuditRepository } from '../audit/audit.repository.js';
import { API_CONFIG, type ApiConfig } from '../config/api-config.js';
import { InvitationsRepository } from '../users/invitations.repository.js';
import { UsersRepository } from '../users/users.repository.js';
import { AuthController } from './auth.controller.js';
import { AuthService } from './auth.service.js';
import { PasswordHasher } from './password-hasher.js';
import { PasswordResetsRepository } from './password-resets.repository.js';
import { RefreshTokensRepository } from './refresh-tokens.repository.js';
import { SessionService } from './session.service.js';
import { SignInAttemptsRepository } from './sign-in-attempts.repository.js';
import { SignInLimiter } from './sign-in-limiter.js';

/** Sign-in, sessions, invitations and resets; also installs the global access guard. */
@Module({
  imports: [
    JwtModule.registerAsync({
      inject: [API_CONFIG],
      useFactory: (config: ApiConfig) => ({
        // A KeyObject, not the string: given a string, jsonwebtoken first tries to read it as a
        // PEM public key, fails, then makes a secret key, on every call; that failed attempt
        // cost about 0.4 ms per authenticated request here, against 10 us with the KeyObject.
        secret: createSecretKey(Buffer.from(config.jwtSecret, 'utf8')),
        signOptions: { algorithm: 'HS256', issuer: 'wellkept' },
        verifyOptions: { algorithms: ['HS256'], issuer: 'wellkept' },
      }),
    }),
  ],
  controllers: [AuthController],
  providers: [
    AuthService,
    SessionService,
    PasswordHasher,
    SignInLimiter,
    SignInAttemptsRepository,
    RefreshTokensRepository,
    PasswordResetsRepository,
    InvitationsRepository,
    UsersRepository,
    SiteAccessRepository,
    AuditRepository,
    { provide: APP_GUARD, useClass: AccessGuard },
  ],
  exports: [
    SessionService,
    PasswordHasher,
    RefreshTokensRepository,
    UsersRepository,
    InvitationsRepository,
    SiteAccessRepository,
    AuditRepository,
  ],
})
export class AuthModule {}
