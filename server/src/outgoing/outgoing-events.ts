import { createHmac } from 'node:crypto';
import { Queue } from 'bullmq';
import { QueryTypes, type Transaction } from 'sequelize';
import type { Config } from '../config/index';
import type { Database } from '../db/database';
import { createRedis } from '../lib/redis';
import { QUEUES, type OutgoingJob } from '@shared/jobs/queues';

/**
 * Events for the upstream system (a card blocked or unblocked), written to an
 * outbox table in the same database transaction as the change itself, then
 * delivered by a worker as signed webhooks. A crash between the two loses
 * nothing: undelivered rows are picked up again.
 */
export class OutgoingEvents {
  private readonly queue: Queue<OutgoingJob>;

  constructor(
    private readonly db: Database,
    c: Config,
  ) {
    this.queue = new Queue<OutgoingJob>(QUEUES.outgoing, {
      connection: createRedis(c, { forBullmq: true, failFast: true, name: 'web-outgoing-producer' }),
      prefix: c.REDIS_PREFIX,
      defaultJobOptions: { attempts: 12, backoff: { type: 'exponential', delay: 2_000 }, removeOnComplete: { count: 1_000 }, removeOnFail: { count: 5_000 } },
    });
  }

  async record(t: Transaction, type: string, payload: Record<string, unknown>): Promise<number> {
    const [id] = (await this.db.sequelize.query("INSERT INTO outgoing_events (type, payload, status, attempts, created_at) VALUES (?, ?, 'pending', 0, UTC_TIMESTAMP(3))", {
      replacements: [type, JSON.stringify(payload)],
      type: QueryTypes.INSERT,
      transaction: t,
    })) as unknown as [number];
    return Number(id);
  }

  async dispatch(eventId: number): Promise<void> {
    await this.queue.add('deliver', { eventId }, { jobId: `event-${eventId}` });
  }

  close() {
    return this.queue.close();
  }
}

/** The signature header receivers check: HMAC-SHA-256 (RFC 2104) of `<timestamp>.<body>` with the shared secret. */
export function signWebhook(secret: string, timestamp: string, body: string): string {
  return createHmac('sha256', secret).update(`${timestamp}.${body}`).digest('hex');
}
