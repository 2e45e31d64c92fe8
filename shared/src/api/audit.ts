import { z } from 'zod';

/** The audit log viewer: filters, one page of rows, chain verification. */

export const AUDIT_OUTCOMES = ['success', 'failure', 'denied'] as const;

const isoDate = z
  .string()
  .trim()
  .refine((s) => !Number.isNaN(Date.parse(s)), 'Give a date and time (ISO 8601)');

export const auditQuerySchema = z.object({
  /** A person's user id (actor). */
  actorId: z.coerce.number().int().positive().optional(),
  /** An action, or a family of them ending in a dot: `case.` */
  action: z
    .string()
    .trim()
    .max(64)
    .regex(/^[a-z0-9_.]+$/, 'Letters, digits, dots and underscores')
    .optional()
    .or(z.literal('').transform(() => undefined)),
  targetType: z.string().trim().max(32).regex(/^[a-z_]+$/).optional().or(z.literal('').transform(() => undefined)),
  targetId: z.string().trim().max(64).optional().or(z.literal('').transform(() => undefined)),
  outcome: z.enum(AUDIT_OUTCOMES).optional(),
  from: isoDate.optional().or(z.literal('').transform(() => undefined)),
  to: isoDate.optional().or(z.literal('').transform(() => undefined)),
  page: z.coerce.number().int().min(1).max(1_000_000).default(1),
  pageSize: z.coerce.number().int().min(1).max(200).default(50),
});
export type AuditQuery = z.input<typeof auditQuerySchema>;

export interface AuditItem {
  id: number;
  occurredAt: string;
  actorType: 'user' | 'api_key' | 'system' | 'anonymous';
  actorId: string | null;
  actorLabel: string | null;
  action: string;
  targetType: string | null;
  targetId: string | null;
  outcome: (typeof AUDIT_OUTCOMES)[number];
  ip: string | null;
  details: Record<string, unknown> | null;
}

export interface AuditPage {
  items: AuditItem[];
  total: number;
  page: number;
  pageSize: number;
}

export interface AuditFacets {
  actions: string[];
  people: { id: number; label: string }[];
  targetTypes: string[];
}

export interface AuditVerification {
  ok: boolean;
  checked: number;
  firstBadId?: number;
  reason?: string;
  verifiedAt: string;
}

/** Rows one CSV export holds at most; narrow the filters for more. */
export const AUDIT_EXPORT_MAX_ROWS = 50_000;
