import type { z } from 'zod';
import { AppError, type FieldIssue } from './app-error';

/** Converts zod issues into the API's field list (`path` joined with dots). */
export function fieldIssues(error: z.ZodError): FieldIssue[] {
  return error.issues.map((i) => ({
    path: i.path.length > 0 ? i.path.map(String).join('.') : '(root)',
    message: i.message,
  }));
}

/** Parses `value` with `schema` or throws a 400 AppError naming every bad field. */
export function parseOrThrow<S extends z.ZodType>(schema: S, value: unknown, what = 'request body'): z.infer<S> {
  const result = schema.safeParse(value);
  if (!result.success) {
    throw AppError.badRequest(`The ${what} is not valid.`, fieldIssues(result.error));
  }
  return result.data;
}
