import { z } from 'zod';

/**
 * The case API shared by the server (validation) and the client (forms and
 * types). Money travels as integer minor units with the currency and its
 * ISO 4217 exponent; times as ISO 8601 UTC strings.
 */

export const CASE_STATUSES = ['new', 'claimed', 'waiting_cardholder', 'escalated', 'awaiting_approval', 'closed'] as const;
export type CaseStatus = (typeof CASE_STATUSES)[number];
export const OPEN_STATUSES: CaseStatus[] = ['new', 'claimed', 'waiting_cardholder', 'escalated', 'awaiting_approval'];

export const CASE_STATUS_LABELS: Record<CaseStatus, string> = {
  new: 'New',
  claimed: 'Claimed',
  waiting_cardholder: 'Waiting on cardholder',
  escalated: 'Escalated',
  awaiting_approval: 'Awaiting approval',
  closed: 'Closed',
};

export const PRIORITIES = ['urgent', 'high', 'standard'] as const;
export type Priority = (typeof PRIORITIES)[number];

export interface Money {
  minor: number;
  currency: string;
  exponent: number;
}

export interface PersonRef {
  id: number;
  displayName: string;
}

export interface CaseSummary {
  id: number;
  status: CaseStatus;
  priority: Priority;
  assignee: PersonRef | null;
  /** The team routing gave the case to; null: the shared queue every investigator sees. */
  team: { id: number; name: string } | null;
  card: { bin: string; last4: string; status: 'active' | 'blocked' };
  /** Highest calibrated probability among the case's alerts. */
  probability: number;
  /** Highest normalised margin F / sum|alpha| in [-1, 1]. */
  normalizedMargin: number;
  amountAtRisk: Money;
  alertCount: number;
  firstAlertAt: string;
  lastAlertAt: string;
  slaDueAt: string;
  mcc: string;
  mccLabel: string | null;
  merchantCountry: string;
  channel: string;
  updatedAt: string;
  version: number;
}

export const QUEUE_SORT_KEYS = ['probability', 'amount', 'age', 'slaDue', 'lastAlert', 'status', 'priority', 'id'] as const;
export type QueueSortKey = (typeof QUEUE_SORT_KEYS)[number];

/** A list in a query string: `a,b` or repeated keys. */
const csv = <T extends z.ZodType>(item: T) =>
  z.preprocess(
    (v) => (Array.isArray(v) ? v : typeof v === 'string' ? v.split(',') : v),
    z.array(z.preprocess((s) => (typeof s === 'string' ? s.trim() : s), item)),
  );

/** GET /api/cases query string. */
export const queueQuerySchema = z.object({
  view: z.enum(['all', 'mine', 'unassigned']).default('all'),
  status: csv(z.enum(CASE_STATUSES)).optional(),
  priority: csv(z.enum(PRIORITIES)).optional(),
  mcc: csv(z.string().regex(/^\d{4}$/)).optional(),
  country: csv(z.string().regex(/^[A-Z]{2}$/)).optional(),
  channel: csv(z.enum(['pos', 'ecommerce', 'atm', 'moto', 'contactless'])).optional(),
  assignee: z.coerce.number().int().positive().optional(),
  minProbability: z.coerce.number().min(0).max(1).optional(),
  maxProbability: z.coerce.number().min(0).max(1).optional(),
  /** Minimum amount at risk in major units. */
  minAmount: z.coerce.number().min(0).optional(),
  /** Only cases whose SLA is due within this many minutes (negative: already breached). */
  dueWithinMinutes: z.coerce.number().int().min(-100_000).max(100_000).optional(),
  /** Case id, BIN or last four digits. */
  q: z.string().trim().max(20).optional(),
  sort: z.enum(QUEUE_SORT_KEYS).default('priority'),
  order: z.enum(['asc', 'desc']).default('desc'),
  page: z.coerce.number().int().min(1).max(100_000).default(1),
  pageSize: z.coerce.number().int().min(1).max(200).default(50),
});
export type QueueQuery = z.input<typeof queueQuerySchema>;

export interface QueueResponse {
  items: CaseSummary[];
  total: number;
  page: number;
  pageSize: number;
  /** Server clock, so SLA countdowns do not depend on the browser's clock. */
  serverTime: string;
}

/** A saved queue view of one person: filters, sort and visible columns. */
export const savedViewSchema = z.object({
  name: z.string().trim().min(1).max(60),
  query: queueQuerySchema.partial().omit({ page: true }),
  columns: z.array(z.string().max(40)).max(40).optional(),
});
export type SavedView = z.infer<typeof savedViewSchema>;
export const savedViewsSchema = z.object({ views: z.array(savedViewSchema).max(30), columns: z.array(z.string().max(40)).max(40).optional() });
export type SavedViews = z.infer<typeof savedViewsSchema>;

export interface Reason {
  feature: string;
  value: number | string | null;
  contribution: number;
  /** e.g. "amount 1,240.00 > 610.00: +0.38" */
  text: string;
}

export interface AlertDetail {
  alertId: number;
  transactionId: number;
  externalId: string;
  occurredAt: string;
  amount: Money;
  merchant: { id: string; name: string; mcc: string; mccLabel: string | null; country: string };
  channel: string;
  cardPresent: boolean;
  deviceId: string | null;
  ip: string | null;
  location: { lat: number; lon: number } | null;
  probability: number;
  normalizedMargin: number;
  margin: number;
  reasons: Reason[];
  /** The model's input row, for the what-if panel. */
  features: Record<string, number | string | null>;
  model: { id: number; label: string };
}

export interface ActivityItem {
  transactionId: number;
  externalId: string;
  occurredAt: string;
  amount: Money;
  merchantName: string;
  mcc: string;
  country: string;
  channel: string;
  cardPresent: boolean;
  probability: number | null;
  distanceKm: number | null;
  speedKmh: number | null;
  /** Alerted, and part of this case. */
  inThisCase: boolean;
  alerted: boolean;
}

export interface RelatedCase {
  id: number;
  status: CaseStatus;
  probability: number;
  /** What links it: the same card, device id or IP address. */
  via: ('card' | 'device' | 'ip')[];
  card: { bin: string; last4: string };
}

export interface CaseNote {
  id: number;
  author: PersonRef;
  text: string;
  createdAt: string;
}

export interface CaseEvidence {
  id: number;
  fileName: string;
  contentType: string;
  size: number;
  uploadedBy: PersonRef;
  createdAt: string;
}

export interface CaseMessage {
  id: number;
  to: string;
  subject: string;
  text: string;
  sentBy: PersonRef;
  createdAt: string;
  status: 'queued' | 'sent' | 'failed';
}

export interface CaseTimelineEntry {
  at: string;
  actor: string | null;
  action: string;
  outcome: string;
  details: Record<string, unknown> | null;
}

export interface CaseDetail {
  case: CaseSummary & {
    disposition: Disposition | null;
    closedAt: string | null;
    cardholder: { ref: string; name: string | null; email: string | null };
  };
  /** approve / review / decline band of the highest alert, from the alerting settings. */
  recommendedAction: 'approve' | 'review' | 'decline';
  alerts: AlertDetail[];
  activity: ActivityItem[];
  related: RelatedCase[];
  notes: CaseNote[];
  evidence: CaseEvidence[];
  messages: CaseMessage[];
  timeline: CaseTimelineEntry[];
  serverTime: string;
}

export const DISPOSITIONS = ['confirmed_fraud', 'legitimate', 'inconclusive'] as const;
export type Disposition = (typeof DISPOSITIONS)[number];
export const DISPOSITION_LABELS: Record<Disposition, string> = {
  confirmed_fraud: 'Confirmed fraud',
  legitimate: 'Legitimate',
  inconclusive: 'Inconclusive',
};

export const FRAUD_TYPES = ['card_not_present', 'counterfeit', 'lost_stolen', 'account_takeover', 'first_party'] as const;
export type FraudType = (typeof FRAUD_TYPES)[number];
export const FRAUD_TYPE_LABELS: Record<FraudType, string> = {
  card_not_present: 'Card not present',
  counterfeit: 'Counterfeit',
  lost_stolen: 'Lost or stolen',
  account_takeover: 'Account takeover',
  first_party: 'First-party',
};

/** Amount field of the form: a decimal string in major units, or empty. */
const optionalAmount = z
  .string()
  .trim()
  .regex(/^(\d{1,12})(\.\d{1,3})?$/, 'Enter an amount like 120.50')
  .optional()
  .or(z.literal('').transform(() => undefined));

/** POST /api/cases/:id/disposition — the same schema drives the form and the server. */
export const dispositionSchema = z
  .object({
    disposition: z.enum(DISPOSITIONS),
    fraudType: z.enum(FRAUD_TYPES).optional(),
    reason: z.string().trim().min(5, 'Say why, in a few words at least').max(2000),
    amountConfirmed: optionalAmount,
    amountRecovered: optionalAmount,
    /** The version of the case the investigator saw, to refuse a stale decision. */
    version: z.number().int().min(0),
  })
  .superRefine((v, ctx) => {
    if (v.disposition === 'confirmed_fraud' && !v.fraudType) {
      ctx.addIssue({ code: 'custom', path: ['fraudType'], message: 'Choose the fraud type' });
    }
    if (v.disposition !== 'confirmed_fraud' && v.fraudType) {
      ctx.addIssue({ code: 'custom', path: ['fraudType'], message: 'Only confirmed fraud has a fraud type' });
    }
  });
export type DispositionInput = z.input<typeof dispositionSchema>;

export const noteSchema = z.object({ text: z.string().trim().min(1).max(5000) });
export const contactSchema = z.object({
  subject: z.string().trim().min(3).max(150),
  message: z.string().trim().min(10).max(5000),
});
export const cardActionSchema = z.object({ action: z.enum(['block', 'unblock']), reason: z.string().trim().min(5).max(500) });
export const escalateSchema = z.object({ reason: z.string().trim().min(5).max(1000) });
export const statusChangeSchema = z.object({ status: z.enum(['claimed', 'waiting_cardholder']) });

/** Evidence uploads: what is accepted (checked by content, not only by name). */
export const EVIDENCE_TYPES = ['image/png', 'image/jpeg', 'application/pdf', 'text/csv'] as const;
export const EVIDENCE_MAX_BYTES = 10 * 1024 * 1024;

/** POST /api/cases/:id/claim conflict body. */
export interface ClaimConflict {
  error: { code: 'already_claimed'; message: string; claimedBy: PersonRef | null };
}

/** The caution shown near every decision that can hurt someone. */
export const SCORE_CAUTION =
  "The score is evidence, not a verdict. Decisions to block a card or report a customer stay with trained staff under your institution's policy and local law.";

/** Socket events the queue listens to (payloads are small; the client refetches through the API). */
export interface QueueAlertEvent {
  type: 'case.alerted';
  caseId: number;
  created: boolean;
  transactionId: number;
  externalId: string;
  probability: number;
  status: string;
  assigneeId: number | null;
  teamId: number | null;
  at: string;
}
export interface QueueCaseChangedEvent {
  type: 'case.changed';
  caseId: number;
  status: string;
  assigneeId: number | null;
  previousAssigneeId?: number | null;
  teamId: number | null;
  at: string;
}
