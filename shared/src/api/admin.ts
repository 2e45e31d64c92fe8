import { z } from 'zod';
import { ROLES, type Role } from '../auth/roles';

/** Staff accounts, invitations and upstream API keys (the Admin screen). */

export interface AdminUser {
  id: number;
  email: string;
  displayName: string;
  role: Role;
  status: 'active' | 'invited' | 'deactivated';
  /** Set while a sign-in lock-out is in force. */
  lockedUntil: string | null;
  failedLoginCount: number;
  lastLoginAt: string | null;
  createdAt: string;
  /** The newest unused invitation's expiry, for invited accounts. */
  inviteExpiresAt: string | null;
}

export const inviteSchema = z.object({
  email: z.string().trim().toLowerCase().email('Enter an e-mail address').max(254),
  displayName: z.string().trim().min(2, 'At least 2 characters').max(120),
  role: z.enum(ROLES),
});
export type InviteInput = z.input<typeof inviteSchema>;

export const roleChangeSchema = z.object({ role: z.enum(ROLES) });

/** How long an invitation link works. */
export const INVITE_TTL_HOURS = 72;

/**
 * Password rule for a new account: at least 12 characters (OWASP ASVS 4.0.3
 * V2.1.1), at most 128 (V2.1.2); no composition rules (V2.1.9, NIST SP
 * 800-63B 5.1.1.2).
 */
export const NEW_PASSWORD_MIN = 12;
export const NEW_PASSWORD_MAX = 128;
export const acceptInviteSchema = z.object({
  token: z.string().trim().min(20).max(200),
  password: z.string().min(NEW_PASSWORD_MIN, `At least ${NEW_PASSWORD_MIN} characters`).max(NEW_PASSWORD_MAX, `At most ${NEW_PASSWORD_MAX} characters`),
});
export type AcceptInviteInput = z.input<typeof acceptInviteSchema>;
export const inviteLookupSchema = z.object({ token: z.string().trim().min(20).max(200) });
export interface InviteLookup {
  email: string;
  displayName: string;
  role: Role;
  expiresAt: string;
}

export const API_KEY_SCOPE_LIST = ['transactions:write', 'transactions:read', 'decisions:write'] as const;
export const API_KEY_SCOPE_LABELS: Record<(typeof API_KEY_SCOPE_LIST)[number], string> = {
  'transactions:write': 'Send transactions',
  'transactions:read': 'Read transaction results',
  'decisions:write': 'Ask for a synchronous decision',
};

export interface AdminApiKey {
  id: number;
  name: string;
  /** The first characters, to tell keys apart; the key itself is never shown again. */
  keyPrefix: string;
  scopes: string[];
  createdAt: string;
  lastUsedAt: string | null;
  revokedAt: string | null;
}

export const apiKeyCreateSchema = z.object({
  name: z.string().trim().min(3, 'At least 3 characters').max(80),
  scopes: z.array(z.enum(API_KEY_SCOPE_LIST)).min(1, 'Pick at least one scope'),
});
export type ApiKeyCreateInput = z.input<typeof apiKeyCreateSchema>;
export interface ApiKeyCreated {
  key: string;
  apiKey: AdminApiKey;
}

// ---------------------------------------------------------------- demo feed

/** The demo feed's highest pace in transactions per second (the simulator's own limit). */
export const DEMO_FEED_MAX_RATE = 1000;
export const DEMO_FEED_MIN_RATE = 0.1;

/** PUT /api/demo/feed: pause or resume, change the pace, or both. */
export const demoFeedControlSchema = z
  .object({ paused: z.boolean().optional(), rate: z.number().min(DEMO_FEED_MIN_RATE).max(DEMO_FEED_MAX_RATE).optional() })
  .strict()
  .refine((v) => v.paused !== undefined || v.rate !== undefined, { message: 'Send paused, rate or both.' });
export type DemoFeedControl = z.infer<typeof demoFeedControlSchema>;

/** The demo feed (local demo only): what an admin asked for and what the feed last reported. */
export interface DemoFeedState {
  /** Set by an admin; null where nobody asked (the feed's start settings hold). */
  requested: { paused: boolean | null; rate: number | null };
  /** The feed's last report (it reports every few seconds while it runs); null before its first. */
  reported: { paused: boolean; rate: number; at: string } | null;
  /** Since the feed process started. */
  totals: { sent: number; accepted: number; duplicates: number; rejected: number; retries: number };
  /** The feed's last failure (a refused or retried batch) and when it happened; it stays after the feed recovers. */
  lastError: { message: string; at: string | null } | null;
}
