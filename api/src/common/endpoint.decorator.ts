import { applyDecorators, HttpCode, UsePipes } from '@nestjs/common';
import {
  ApiBody,
  ApiConsumes,
  ApiOperation,
  ApiParam,
  ApiProduces,
  ApiQuery,
  ApiResponse,
} from '@nestjs/swagger';
import { z } from 'zod';
import { type InputSchemas, ZodValidationPipe } from './zod-validation.pipe.js';

type JsonSchema = Record<string, unknown>;

/** OpenAPI 3.0 JSON schema of a zod schema (as the input side sees it). */
export function openApiSchema(schema: z.ZodType, io: 'input' | 'output' = 'input'): JsonSchema {
  const json = z.toJSONSchema(schema, { target: 'openapi-3.0', io, unrepresentable: 'any' });
  delete (json as JsonSchema).$schema;
  return json as JsonSchema;
}

export interface EndpointOptions extends InputSchemas {
  summary: string;
  description?: string;
  /** Shape of a successful answer (documented, not enforced). */
  response?: z.ZodType;
  /** Success status when not 200 (201 for creations, 204 for no content). */
  status?: number;
  /** The body is multipart/form-data (uploads). */
  multipart?: boolean;
  /** Media type of a non-JSON answer (CSV, event stream). */
  produces?: string;
}

/**
 * Declares a route's inputs and answer once: the same zod schemas validate the request (through
 * `ZodValidationPipe`) and describe it in the OpenAPI document served at /api/docs.
 */
export function Endpoint(options: EndpointOptions): MethodDecorator {
  const decorators: (MethodDecorator | ClassDecorator)[] = [
    ApiOperation({ summary: options.summary, description: options.description }),
    UsePipes(new ZodValidationPipe(options)),
  ];
  // Nest answers POST with 201 by default; the status is always explicit here instead.
  const status = options.status ?? 200;
  decorators.push(HttpCode(status));
  if (options.body) decorators.push(ApiBody({ schema: openApiSchema(options.body) }));
  if (options.multipart) decorators.push(ApiConsumes('multipart/form-data'));
  if (options.produces) decorators.push(ApiProduces(options.produces));
  for (const [name, prop, required] of objectProperties(options.query)) {
    decorators.push(ApiQuery({ name, required, schema: prop }));
  }
  for (const [name, prop] of objectProperties(options.params)) {
    decorators.push(ApiParam({ name, required: true, schema: prop }));
  }
  decorators.push(
    ApiResponse({
      status,
      description: status === 204 ? 'Done (no content)' : 'Success',
      ...(options.response ? { schema: openApiSchema(options.response, 'output') } : {}),
    }),
  );
  return applyDecorators(...decorators) as MethodDecorator;
}

function objectProperties(schema: z.ZodType | undefined): [string, JsonSchema, boolean][] {
  if (!schema) return [];
  const json = openApiSchema(schema) as {
    properties?: Record<string, JsonSchema>;
    required?: string[];
  };
  return Object.entries(json.properties ?? {}).map(([name, prop]) => [
    name,
    prop,
    json.required?.includes(name) ?? false,
  ]);
}
