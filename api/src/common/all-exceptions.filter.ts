import {
  type ArgumentsHost,
  Catch,
  type ExceptionFilter,
  HttpException,
  Logger,
} from '@nestjs/common';
import type { FastifyReply, FastifyRequest } from 'fastify';
import { z } from 'zod';
import { ApiError, type ErrorBody, type FieldProblem } from './api-error.js';
import { fieldProblems } from './zod-validation.pipe.js';

const CODE_BY_STATUS: Record<number, string> = {
  400: 'bad_request',
  401: 'unauthorized',
  403: 'forbidden',
  404: 'not_found',
  405: 'method_not_allowed',
  406: 'not_acceptable',
  409: 'conflict',
  413: 'payload_too_large',
  415: 'unsupported_media_type',
  422: 'unprocessable',
  429: 'too_many_requests',
};

/** PostgreSQL error codes a caller can cause with valid-looking input. */
const PG_ERRORS: Record<string, [number, string, string]> = {
  '23505': [
    409,
    'conflict',
    'This conflicts with an existing record (a name or key already in use)',
  ],
  '23503': [409, 'conflict', 'This refers to a record that does not exist or is still in use'],
  '23514': [400, 'constraint_failed', 'A value is outside what this record allows'],
  '22P02': [400, 'bad_request', 'A value has the wrong format'],
  '22007': [400, 'bad_request', 'A date or time has the wrong format'],
  '22008': [400, 'bad_request', 'A date or time is out of range'],
  // Text PostgreSQL cannot hold: the NUL character, or one outside the database's encoding.
  '22021': [400, 'bad_request', 'A text contains a character that cannot be stored (such as NUL)'],
  '22P05': [400, 'bad_request', 'A text contains a character that cannot be stored (such as NUL)'],
  '22001': [400, 'bad_request', 'A text is longer than this field allows'],
  '22003': [400, 'bad_request', 'A number is out of range'],
  '54000': [400, 'bad_request', 'A value is too large to store'],
};

/** Errors of the multipart parser (busboy) for a body that breaks off or is garbled. */
const MALFORMED_MULTIPART =
  /^(Unexpected end of (form|multipart data)|Malformed part header|Multipart: Boundary not found|Part terminated early)/;

/** Connection-level failures (database down or restarting): a 503 the client may retry. */
const UNAVAILABLE = new Set([
  'ECONNREFUSED',
  'ECONNRESET',
  '57P01',
  '57P02',
  '57P03',
  '08000',
  '08001',
  '08003',
  '08006',
]);

/**
 * Turns every error into one JSON shape, `{ error: { status, code, message, fields? } }`.
 * Errors meant for the caller keep their message; anything unexpected is logged here and
 * answered with a generic 500 that leaks nothing about the inside.
 */
@Catch()
export class AllExceptionsFilter implements ExceptionFilter {
  private readonly logger = new Logger('errors');

  catch(exception: unknown, host: ArgumentsHost): void {
    const ctx = host.switchToHttp();
    const reply = ctx.getResponse<FastifyReply>();
    const request = ctx.getRequest<FastifyRequest>();
    const body = this.toBody(exception, request);
    if (reply.sent || reply.raw.headersSent) {
      // A streamed answer (CSV, events) failed half-way: nothing more can be said to the client.
      reply.raw.destroy();
      return;
    }
    void reply.status(body.error.status).header('cache-control', 'no-store').send(body);
  }

  toBody(exception: unknown, request?: FastifyRequest): ErrorBody {
    if (exception instanceof ApiError) {
      return this.body(exception.getStatus(), exception.code, exception.message, exception.fields);
    }
    if (exception instanceof z.ZodError) {
      return this.body(
        400,
        'validation_failed',
        'The request is not valid',
        fieldProblems(exception),
      );
    }
    if (exception instanceof HttpException) {
      const status = exception.getStatus();
      const message =
        status === 404 && request
          ? `There is no ${request.method} ${request.url.split('?')[0]}`
          : exception.message;
      return this.body(status, CODE_BY_STATUS[status] ?? 'error', message);
    }
    const err = exception as { code?: unknown; statusCode?: unknown; message?: unknown };
    if (typeof err?.code === 'string' && PG_ERRORS[err.code]) {
      const [status, code, message] = PG_ERRORS[err.code]!;
      return this.body(status, code, message);
    }
    if (typeof err?.code === 'string' && UNAVAILABLE.has(err.code)) {
      this.logger.warn(`database unavailable: ${String(err.code)}`);
      return this.body(
        503,
        'unavailable',
        'The service cannot reach its database right now; try again shortly',
      );
    }
    if (typeof err?.message === 'string' && MALFORMED_MULTIPART.test(err.message)) {
      return this.body(
        400,
        'bad_request',
        'The multipart/form-data body is malformed or cut short',
      );
    }
    // Fastify's own errors (body too large, bad JSON, multipart limits) carry a 4xx statusCode.
    if (typeof err?.statusCode === 'number' && err.statusCode >= 400 && err.statusCode < 500) {
      const status = err.statusCode;
      return this.body(status, CODE_BY_STATUS[status] ?? 'bad_request', fastifyMessage(err));
    }
    this.logger.error(
      exception instanceof Error ? (exception.stack ?? exception.message) : exception,
    );
    return this.body(500, 'internal_error', 'Something went wrong on our side; try again shortly');
  }

  private body(status: number, code: string, message: string, fields?: FieldProblem[]): ErrorBody {
    return { error: { status, code, message, ...(fields?.length ? { fields } : {}) } };
  }
}

function fastifyMessage(err: { code?: unknown; message?: unknown }): string {
  switch (err.code) {
    case 'FST_ERR_CTP_BODY_TOO_LARGE':
      return 'The request body is too large';
    case 'FST_ERR_CTP_INVALID_MEDIA_TYPE':
      return 'This content type is not accepted here';
    case 'FST_ERR_CTP_EMPTY_JSON_BODY':
      return 'The JSON body is empty';
    case 'FST_ERR_CTP_INVALID_JSON_BODY':
      return 'The body is not valid JSON';
    default:
      return typeof err.message === 'string' ? err.message : 'The request is not valid';
  }
}
