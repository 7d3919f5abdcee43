import type { LoggerService } from '@nestjs/common';
import { pino, type Logger } from 'pino';

/** Injection token for the service's pino logger. */
export const LOGGER = Symbol('LOGGER');

/**
 * Structured JSON logs. Secrets never reach a log line: nothing here logs CONNECT packets or
 * passwords, and the redaction below is a second fence for any object that carries one.
 */
export function createLogger(level: string): Logger {
  return pino({
    name: 'ingest',
    level,
    redact: {
      paths: [
        'password',
        'secret',
        '*.password',
        '*.secret',
        'packet.password',
        'headers.authorization',
      ],
      censor: '[redacted]',
    },
  });
}

/** Routes Nest's own messages (module loading, listeners) through the same pino logger. */
export class PinoNestLogger implements LoggerService {
  constructor(private readonly logger: Logger) {}

  log(message: unknown, context?: string): void {
    this.logger.info({ context }, String(message));
  }
  error(message: unknown, trace?: string, context?: string): void {
    this.logger.error({ context, trace }, String(message));
  }
  warn(message: unknown, context?: string): void {
    this.logger.warn({ context }, String(message));
  }
  debug(message: unknown, context?: string): void {
    this.logger.debug({ context }, String(message));
  }
  verbose(message: unknown, context?: string): void {
    this.logger.trace({ context }, String(message));
  }
}
