import { z } from 'zod';

/** BullMQ queue names. One file per queue under workers/src. */
export const QUEUES = {
  mail: 'mail',
  maintenance: 'maintenance',
  scoring: 'scoring',
  outgoing: 'outgoing',
  training: 'training',
  drift: 'drift',
} as const;
export type QueueName = (typeof QUEUES)[keyof typeof QUEUES];

/**
 * An e-mail to send. Job payloads never carry card numbers: at most a case id
 * the worker can look things up by.
 */
export const mailJobSchema = z.object({
  to: z.array(z.string().email()).min(1).max(20),
  subject: z.string().min(1).max(200),
  text: z.string().min(1).max(50_000),
  html: z.string().max(200_000).optional(),
  /** What the mail is for, e.g. `invite`, `cardholder-contact`, `reassignment`, `drift-alert`. */
  purpose: z.string().min(1).max(40),
  /** Optional record the mail belongs to, for the audit trail. */
  related: z.object({ type: z.string().max(32), id: z.string().max(64) }).optional(),
});
export type MailJob = z.infer<typeof mailJobSchema>;

export const maintenanceJobSchema = z.object({
  task: z.enum(['purge-expired-sessions', 'requeue-unscored']),
});
export type MaintenanceJob = z.infer<typeof maintenanceJobSchema>;

/** Transactions to score, by their internal ids (never card data). */
export const scoringJobSchema = z.object({
  transactionIds: z.array(z.number().int().positive()).min(1).max(1000),
  /** The ingest batch that accepted them (also the job id, so a batch is queued once). */
  batch: z.string().min(1).max(64),
});
export type ScoringJob = z.infer<typeof scoringJobSchema>;

/** Deliver one outbox row to the upstream system. */
export const outgoingJobSchema = z.object({ eventId: z.number().int().positive() });
export type OutgoingJob = z.infer<typeof outgoingJobSchema>;

/**
 * A training run: a manual run by the id of its stored row (window and
 * parameters live there), or the nightly schedule firing (the worker records
 * the run with the schedule's parameters as they are then).
 */
export const trainingJobSchema = z.union([
  z.object({ runId: z.number().int().positive() }).strict(),
  z.object({ trigger: z.literal('schedule') }).strict(),
]);
export type TrainingJob = z.infer<typeof trainingJobSchema>;

/** The daily drift report of the champion (PSI of the score and every feature against its training baseline). */
export const driftJobSchema = z.object({ task: z.literal('drift-report'), requestedBy: z.number().int().positive().optional() }).strict();
export type DriftJob = z.infer<typeof driftJobSchema>;
