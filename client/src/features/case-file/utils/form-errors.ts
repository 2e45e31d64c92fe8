import type { z } from 'zod';
import { isApiError } from '@/lib/api-client';

/**
 * Plain-language messages for the shared schemas' generic checks; messages a
 * schema states itself (e.g. "Say why, in a few words at least") win.
 */
export const plainErrors: z.core.$ZodErrorMap = (issue) => {
  if (issue.code === 'too_small' && issue.origin === 'string') {
    return Number(issue.minimum) <= 1 ? 'This cannot be empty.' : `Write at least ${issue.minimum} characters.`;
  }
  if (issue.code === 'too_big' && issue.origin === 'string') return `At most ${issue.maximum} characters.`;
  if (issue.code === 'invalid_value' || issue.code === 'invalid_type') return 'Choose one.';
  return undefined;
};

/** What to say when the server refuses a form. */
export function serverProblem(error: unknown): string {
  if (!isApiError(error)) return error instanceof Error ? error.message : 'Something went wrong. Try again.';
  if (error.code === 'network_error') return error.message;
  if (error.status >= 500) return 'The server could not do this just now. Try again in a moment.';
  const fields = error.fields?.map((f) => f.message).join(' ');
  return fields ? `${error.message} ${fields}` : error.message;
}
