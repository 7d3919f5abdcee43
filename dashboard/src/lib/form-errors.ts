import { ApiError } from './api-client';

/**
 * What to show for a failed form submission: messages per field (the API names them) and a
 * form-wide sentence for the rest.
 */
export function formErrors(error: unknown): { fields: Record<string, string>; message?: string } {
  if (!error) return { fields: {} };
  if (error instanceof ApiError) {
    const fields: Record<string, string> = {};
    for (const f of error.fields) fields[f.path] ??= f.message;
    return { fields, message: error.fields.length ? undefined : error.message };
  }
  return { fields: {}, message: error instanceof Error ? error.message : 'Something went wrong' };
}

/** A light shape check; the API has the last word. */
export function looksLikeEmail(value: string): boolean {
  return /^[^\s@]+@[^\s@]+\.[^\s@]+$/.test(value.trim());
}

/** The API's password rule, said the same way. */
export function passwordProblem(password: string): string | undefined {
  if (password.length < 10) return 'must be at least 10 characters';
  if (password.length > 200) return 'must be at most 200 characters';
  return undefined;
}
