import { z } from 'zod';
import { ROLES } from '../auth/roles';

/** POST /api/auth/login body. */
export const loginRequestSchema = z.object({
  email: z.string().trim().toLowerCase().email().max(254),
  password: z.string().min(1).max(1024),
});
export type LoginRequest = z.infer<typeof loginRequestSchema>;

/** The signed-in staff member, as GET /api/auth/me and POST /api/auth/login return it. */
export const sessionUserSchema = z.object({
  id: z.number().int(),
  email: z.string(),
  displayName: z.string(),
  role: z.enum(ROLES),
});
export type SessionUser = z.infer<typeof sessionUserSchema>;

export const meResponseSchema = z.object({ user: sessionUserSchema });
export type MeResponse = z.infer<typeof meResponseSchema>;

/** GET /api/auth/csrf: the synchronizer token, sent back as the X-CSRF-Token header. */
export const csrfResponseSchema = z.object({ csrfToken: z.string().min(16) });
export type CsrfResponse = z.infer<typeof csrfResponseSchema>;

export const CSRF_HEADER = 'x-csrf-token';

/** Every error the API returns has this shape. */
export const apiErrorSchema = z.object({
  error: z.object({
    code: z.string(),
    message: z.string(),
    fields: z.array(z.object({ path: z.string(), message: z.string() })).optional(),
    retryAfterSeconds: z.number().optional(),
  }),
});
export type ApiError = z.infer<typeof apiErrorSchema>;

/** GET /api/health */
export const healthResponseSchema = z.object({
  status: z.enum(['ok', 'degraded']),
  checks: z.record(z.string(), z.object({ ok: z.boolean(), latencyMs: z.number(), error: z.string().optional() })),
  version: z.string(),
});
export type HealthResponse = z.infer<typeof healthResponseSchema>;
