import { type ArgumentMetadata, Injectable, type PipeTransform } from '@nestjs/common';
import type { z } from 'zod';
import { ApiError, type FieldProblem } from './api-error.js';

/** The schemas of one route's inputs, by where they come from. */
export interface InputSchemas {
  body?: z.ZodType;
  query?: z.ZodType;
  params?: z.ZodType;
}

const LOCATION: Record<string, keyof InputSchemas | undefined> = {
  body: 'body',
  query: 'query',
  param: 'params',
};

/** Turns zod issues into the error body's field list. */
export function fieldProblems(error: z.ZodError): FieldProblem[] {
  return error.issues.map((issue) => ({
    path: issue.path.length ? issue.path.map(String).join('.') : '(root)',
    message: issue.message,
  }));
}

/**
 * Validates a route's body, query and path parameters with zod (the project's one validation
 * library) and hands the handler the parsed, typed values. Applied per route by `@Endpoint`,
 * so the schema that documents a route in OpenAPI is the one that checks it.
 */
@Injectable()
export class ZodValidationPipe implements PipeTransform {
  constructor(private readonly schemas: InputSchemas) {}

  transform(value: unknown, metadata: ArgumentMetadata): unknown {
    const location = LOCATION[metadata.type];
    if (!location || metadata.data) return value;
    const schema = this.schemas[location];
    if (!schema) return value;
    const parsed = schema.safeParse(value ?? (location === 'body' ? undefined : {}));
    if (parsed.success) return parsed.data;
    const what = location === 'params' ? 'path' : location;
    throw new ApiError(
      400,
      'validation_failed',
      `The request ${what} is not valid: ${parsed.error.issues
        .slice(0, 3)
        .map((i) => (i.path.length ? `${i.path.join('.')}: ${i.message}` : i.message))
        .join('; ')}`,
      fieldProblems(parsed.error),
    );
  }
}
