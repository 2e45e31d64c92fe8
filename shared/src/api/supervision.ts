import { z } from 'zod';
import { PRIORITIES, type CaseSummary, type Disposition, type FraudType, type Money, type PersonRef } from './cases';

/**
 * The supervisor's API shared by server and client: the team board, bulk
 * reassignment, routing rules, the alert threshold set from capacity, the SLA
 * policy, the four-eyes limit and the approvals list. Times are ISO 8601 UTC.
 */

// ---------------------------------------------------------------- board

export interface BoardPerson extends PersonRef {
  role: 'investigator' | 'supervisor';
  status: 'active' | 'invited' | 'deactivated';
  /** Open cases held (any open status). */
  open: number;
  /** Of those, in status `claimed`. */
  claimed: number;
  /** Cases this person held that closed since the start of today (UTC). */
  closedToday: number;
  /** Median of claim → close over today's closed cases, in minutes; null when none closed today. */
  medianHandlingMinutes: number | null;
  /** Open cases held whose SLA deadline has passed. */
  slaBreaches: number;
}

export interface QueueAgeBucket {
  label: string;
  fromMinutes: number;
  /** null: open-ended. */
  toMinutes: number | null;
  count: number;
  /** Of `count`, how many are past their SLA deadline. */
  breached: number;
}

export interface AlertVolumeHour {
  /** Start of the hour (UTC). */
  hour: string;
  alerts: number;
  casesOpened: number;
}

export interface BoardResponse {
  people: BoardPerson[];
  unassigned: { open: number; slaBreaches: number };
  totals: { open: number; slaBreaches: number; awaitingApproval: number };
  queueAge: QueueAgeBucket[];
  /** The last 24 hours, oldest first. */
  alertVolume: AlertVolumeHour[];
  /** The team's daily case capacity (set with the threshold), spread evenly over 24 hours for the hourly chart. */
  capacity: { dailyCases: number | null; perHour: number | null };
  dayStart: string;
  serverTime: string;
}

export const reassignSchema = z.object({
  caseIds: z
    .array(z.number().int().positive())
    .min(1, 'Pick at least one case')
    .max(200, 'At most 200 cases at once')
    .refine((ids) => new Set(ids).size === ids.length, 'A case is listed twice'),
  assigneeId: z.number().int().positive(),
  note: z.string().trim().max(500).optional(),
});
export type ReassignInput = z.input<typeof reassignSchema>;
export interface ReassignResponse {
  cases: CaseSummary[];
  assignee: PersonRef;
}

// ---------------------------------------------------------------- routing

export const ROUTING_STRATEGIES = ['round_robin', 'least_loaded'] as const;
export type RoutingStrategy = (typeof ROUTING_STRATEGIES)[number];
export const ROUTING_STRATEGY_LABELS: Record<RoutingStrategy, string> = {
  round_robin: 'Round-robin (take turns)',
  least_loaded: 'Least loaded (fewest open cases)',
};

export const groupInputSchema = z.object({
  name: z.string().trim().min(2).max(60),
  strategy: z.enum(ROUTING_STRATEGIES),
  memberIds: z.array(z.number().int().positive()).max(200),
});
export type GroupInput = z.input<typeof groupInputSchema>;

export interface InvestigatorGroup {
  id: number;
  name: string;
  strategy: RoutingStrategy;
  members: (PersonRef & { active: boolean })[];
}

export const CHANNELS = ['pos', 'ecommerce', 'atm', 'moto', 'contactless'] as const;

/** One routing rule: every condition given must hold (empty lists and a null amount match anything). */
export const routingRuleInputSchema = z
  .object({
    name: z.string().trim().min(2).max(60),
    /** Amount at risk strictly above this, in the case's major units (currencies are not converted). */
    minAmount: z.number().min(0).max(1e12).nullable().default(null),
    mccs: z.array(z.string().regex(/^\d{4}$/, 'A merchant category code has 4 digits')).max(50).default([]),
    countries: z.array(z.string().regex(/^[A-Z]{2}$/, 'A country is 2 capital letters (ISO 3166-1 alpha-2)')).max(50).default([]),
    channels: z.array(z.enum(CHANNELS)).max(5).default([]),
    groupId: z.number().int().positive(),
    enabled: z.boolean().default(true),
  })
  .refine((r) => r.minAmount !== null || r.mccs.length + r.countries.length + r.channels.length > 0, {
    message: 'Give at least one condition',
    path: ['minAmount'],
  });
export type RoutingRuleInput = z.input<typeof routingRuleInputSchema>;
export type RoutingRuleConditions = z.output<typeof routingRuleInputSchema>;
export const routingRulesSchema = z.object({ rules: z.array(routingRuleInputSchema).max(100) });

export interface RoutingRule extends RoutingRuleConditions {
  id: number;
  position: number;
}

export interface RoutingResponse {
  groups: InvestigatorGroup[];
  rules: RoutingRule[];
  /** Who can be a member of a group (active investigators and supervisors). */
  people: (PersonRef & { role: 'investigator' | 'supervisor' })[];
}

export const routingPreviewSchema = z.object({ rules: z.array(routingRuleInputSchema).max(100).optional() });
export interface RoutingPreview {
  /** The UTC day looked at (yesterday). */
  day: string;
  total: number;
  perRule: { position: number; name: string; count: number }[];
  unmatched: number;
}

/** The case facts a rule looks at. */
export interface RoutableCase {
  amountAtRiskMinor: number;
  currencyExponent: number;
  mcc: string;
  merchantCountry: string;
  channel: string;
}

export function ruleMatches(rule: RoutingRuleConditions, c: RoutableCase): boolean {
  if (rule.minAmount !== null && !(c.amountAtRiskMinor / 10 ** c.currencyExponent > rule.minAmount)) return false;
  if (rule.mccs.length > 0 && !rule.mccs.includes(c.mcc)) return false;
  if (rule.countries.length > 0 && !rule.countries.includes(c.merchantCountry)) return false;
  if (rule.channels.length > 0 && !(rule.channels as string[]).includes(c.channel)) return false;
  return true;
}

/** The first enabled rule (in order) that matches, or -1. */
export function firstMatchingRule(rules: RoutingRuleConditions[], c: RoutableCase): number {
  return rules.findIndex((r) => r.enabled && ruleMatches(r, c));
}

// ---------------------------------------------------------------- settings

export interface SlaPolicy {
  slaMinutes: Record<(typeof PRIORITIES)[number], number>;
  priorityBands: { urgent: number; high: number };
}

export interface SupervisionSettingsResponse {
  threshold: number;
  reviewBand: number;
  declineBand: number;
  sla: SlaPolicy;
  dailyCapacity: number | null;
  /** Dispositions of cases with more at risk than this (major units) wait for a second person. null: off. */
  approvalLimit: number | null;
  updatedAt: string | null;
}

export const thresholdInputSchema = z.object({
  threshold: z.number().min(0.001, 'Above 0').max(0.999, 'Below 1'),
  dailyCapacity: z.number().int().min(1).max(1_000_000).nullable(),
});
export type ThresholdInput = z.input<typeof thresholdInputSchema>;

const minutes = z.number().int().min(1, 'At least 1 minute').max(30 * 24 * 60, 'At most 30 days');
export const slaPolicySchema = z
  .object({
    slaMinutes: z.object({ urgent: minutes, high: minutes, standard: minutes }),
    priorityBands: z.object({ urgent: z.number().min(0).max(1), high: z.number().min(0).max(1) }),
  })
  .superRefine((v, ctx) => {
    if (v.priorityBands.high >= v.priorityBands.urgent) {
      ctx.addIssue({ code: 'custom', path: ['priorityBands', 'high'], message: 'The high band starts below the urgent band' });
    }
    if (!(v.slaMinutes.urgent <= v.slaMinutes.high && v.slaMinutes.high <= v.slaMinutes.standard)) {
      ctx.addIssue({ code: 'custom', path: ['slaMinutes', 'high'], message: 'More urgent bands get the same or less time' });
    }
  });
export type SlaPolicyInput = z.input<typeof slaPolicySchema>;

export const approvalLimitSchema = z.object({ approvalLimit: z.number().min(0).max(1e12).nullable() });

export const thresholdCurveQuerySchema = z.object({ days: z.coerce.number().int().min(1).max(90).default(14) });

export type PrecisionSource = 'holdout_histogram' | 'labelled_scores' | 'none';

export interface ThresholdPoint {
  threshold: number;
  /** Scored transactions at or above the threshold per day of recent traffic. */
  alertsPerDay: number;
  /** Card-days whose highest score is at or above the threshold, per day: roughly the cases a day would open. */
  casesPerDay: number;
  precision: number | null;
  recall: number | null;
}

export interface ThresholdCurve {
  points: ThresholdPoint[];
  current: number;
  traffic: { days: number; from: string; to: string; scored: number };
  precisionSource: PrecisionSource;
  /** What the precision/recall came from, in words, for the screen. */
  precisionNote: string;
  champion: { id: number; label: string } | null;
}

/**
 * The lowest threshold on the curve whose expected cases per day fit the
 * capacity (fewer alerts as the threshold rises, so the lowest that fits
 * catches the most). null when even the highest point does not fit.
 */
export function thresholdForCapacity(points: ThresholdPoint[], dailyCapacity: number): ThresholdPoint | null {
  const sorted = [...points].sort((a, b) => a.threshold - b.threshold);
  return sorted.find((p) => p.casesPerDay <= dailyCapacity) ?? null;
}

/** The curve point nearest a threshold. */
export function pointAt(points: ThresholdPoint[], threshold: number): ThresholdPoint | null {
  let best: ThresholdPoint | null = null;
  for (const p of points) if (!best || Math.abs(p.threshold - threshold) < Math.abs(best.threshold - threshold)) best = p;
  return best;
}

// ---------------------------------------------------------------- approvals

export const APPROVAL_STATUSES = ['pending', 'approved', 'rejected'] as const;
export type ApprovalStatus = (typeof APPROVAL_STATUSES)[number];

export interface CaseApproval {
  id: number;
  caseId: number;
  case: CaseSummary;
  proposedBy: PersonRef;
  disposition: Disposition;
  fraudType: FraudType | null;
  reason: string;
  amountConfirmed: Money | null;
  amountRecovered: Money | null;
  status: ApprovalStatus;
  createdAt: string;
  decidedBy: PersonRef | null;
  decidedAt: string | null;
  note: string | null;
}

export const approvalListQuerySchema = z.object({ status: z.enum(APPROVAL_STATUSES).default('pending') });
export const approveSchema = z.object({ note: z.string().trim().max(1000).optional() });
export const rejectSchema = z.object({ note: z.string().trim().min(5, 'Say what needs another look').max(1000) });

