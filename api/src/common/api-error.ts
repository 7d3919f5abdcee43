import { HttpException } from '@nestjs/common';

/** One field's problem, as the error body lists it. */
export interface FieldProblem {
  path: string;
  message: string;
}

/** The one JSON shape every error leaves the API in. */
export interface ErrorBody {
  error: { status: number; code: string; message: string; fields?: FieldProblem[] };
}

/**
 * An error meant for the caller: a status, a stable machine code and a sentence a person can
 * read. Services throw these; the global filter turns them into `ErrorBody`.
 */
export class ApiError extends HttpException {
  constructor(
    status: number,
    readonly code: string,
    message: string,
    readonly fields?: FieldProblem[],
  ) {
    super(message, status);
  }
}

/** 404 for anything missing or belonging to someone the caller may not see (never 403). */
export function notFound(what: string): ApiError {
  return new ApiError(404, 'not_found', `${what} was not found`);
}

export function badRequest(code: string, message: string, fields?: FieldProblem[]): ApiError {
  return new ApiError(400, code, message, fields);
}

export function conflict(code: string, message: string): ApiError {
  return new ApiError(409, code, message);
}

export function forbidden(message = 'Your role does not allow this'): ApiError {
  return new ApiError(403, 'forbidden', message);
}

export function unauthorized(message = 'Sign in to continue'): ApiError {
  return new ApiError(401, 'unauthorized', message);
}
