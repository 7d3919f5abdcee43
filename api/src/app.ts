import 'reflect-metadata';
import cookie from '@fastify/cookie';
import helmet from '@fastify/helmet';
import multipart from '@fastify/multipart';
import { type LogLevel } from '@nestjs/common';
import { NestFactory } from '@nestjs/core';
import { FastifyAdapter, type NestFastifyApplication } from '@nestjs/platform-fastify';
import { DocumentBuilder, SwaggerModule } from '@nestjs/swagger';
import { AppModule } from './app.module.js';
import { AllExceptionsFilter } from './common/all-exceptions.filter.js';
import { crossSiteGuard } from './common/cross-site-guard.js';
import { type ApiConfig, readApiConfig } from './config/api-config.js';

/** Content types of data answers (see the content-security-policy hook below). */
const DATA_TYPES = /^(application\/json|text\/csv|text\/event-stream|text\/plain)/;

export interface CreateAppOptions {
  /** Settings to use instead of (or over) the environment's. */
  config?: Partial<ApiConfig>;
  /** Nest log levels (tests pass ['error']). */
  logLevels?: LogLevel[];
  /** Called for every route Fastify registers (the authorization-matrix test lists them). */
  onRoute?: (route: { method: string; url: string }) => void;
}

/**
 * Builds the API (Nest on Fastify) without listening: `main.ts` listens, tests use
 * `app.inject()` or listen on port 0. Everything is under /api; the OpenAPI page is /api/docs.
 */
export async function createApp(options: CreateAppOptions = {}): Promise<NestFastifyApplication> {
  const config: ApiConfig = { ...readApiConfig(), ...options.config };
  const adapter = new FastifyAdapter({
    // Uploads have their own limit (multipart); JSON bodies stay small.
    bodyLimit: 1024 * 1024,
    trustProxy: false,
  });
  const app = await NestFactory.create<NestFastifyApplication>(
    AppModule.register(config),
    adapter,
    {
      logger: options.logLevels ?? ['log', 'warn', 'error'],
      bufferLogs: false,
    },
  );
  if (options.onRoute) {
    const onRoute = options.onRoute;
    app
      .getHttpAdapter()
      .getInstance()
      .addHook('onRoute', (route) => {
        for (const method of [route.method].flat()) onRoute({ method, url: route.url });
      });
  }
  // Server-side time of every answer (up to its headers), for browsers' dev tools and the bench.
  app
    .getHttpAdapter()
    .getInstance()
    .addHook('onSend', async (_request, reply, payload) => {
      void reply.header('server-timing', `app;dur=${reply.elapsedTime.toFixed(2)}`);
      return payload;
    });
  // Changes must come from the dashboard, not from a page on another site (CSRF).
  app.getHttpAdapter().getInstance().addHook('onRequest', crossSiteGuard(config.publicUrl));
  app.setGlobalPrefix('api');
  app.useGlobalFilters(new AllExceptionsFilter());
  app.enableShutdownHooks();
  // The API reads JSON (and multipart for files). A form-encoded body is what a page on another
  // site can send without the browser asking first, so it is refused rather than parsed.
  app.useBodyParser('application/x-www-form-urlencoded', {}, (_request, _body, done) => {
    done(
      Object.assign(new Error('form-encoded bodies are not accepted'), {
        statusCode: 415,
        code: 'FST_ERR_CTP_INVALID_MEDIA_TYPE',
      }),
      undefined,
    );
  });
  await app.register(cookie);
  await app.register(helmet, {
    // The OpenAPI page loads its own inline script and styles.
    contentSecurityPolicy: false,
  });
  // Data answers (JSON, CSV, event streams) are never pages: a browser tricked into rendering
  // one may run nothing and frame nothing. (The OpenAPI page and downloaded photos and PDFs,
  // which a browser shows with its own viewer, are left alone.)
  app
    .getHttpAdapter()
    .getInstance()
    .addHook('onSend', async (_request, reply, payload) => {
      const type = String(reply.getHeader('content-type') ?? '');
      if (DATA_TYPES.test(type) && !reply.hasHeader('content-security-policy')) {
        void reply.header('content-security-policy', "default-src 'none'; frame-ancestors 'none'");
      }
      return payload;
    });
  await app.register(multipart, {
    // Keep the client's full file name so a name with folders or ".." is refused, not trimmed.
    preservePath: true,
    limits: { fileSize: config.uploads.maxBytes, files: 1, fields: 20, fieldSize: 64 * 1024 },
  });
  const document = SwaggerModule.createDocument(
    app,
    new DocumentBuilder()
      .setTitle('Wellkept API')
      .setDescription(
        'Sign-in, sites and equipment, telemetry series, alerts, service visits and CSV for Wellkept. ' +
          'Sessions are cookies (wk_session, wk_refresh); errors are { error: { status, code, message, fields? } }.',
      )
      .setVersion('0.1.0')
      .addCookieAuth('wk_session')
      .build(),
  );
  SwaggerModule.setup('api/docs', app, document, { jsonDocumentUrl: 'api/docs/openapi.json' });
  return app;
}
