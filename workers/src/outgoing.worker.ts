import { UnrecoverableError, Worker, type Job } from 'bullmq';
import { QueryTypes } from 'sequelize';
import type { Config } from '../../server/src/config/index';
import type { Database } from '../../server/src/db/database';
import { signWebhook } from '../../server/src/outgoing/outgoing-events';
import { QUEUES, outgoingJobSchema, type OutgoingJob } from '@shared/jobs/queues';
import { workerOptions } from './lib/worker-options';

const TIMEOUT_MS = 5_000;

/**
 * Delivers outbox rows to the upstream system as signed webhooks
 * (`X-Edgecase-Signature: HMAC-SHA-256 of "<timestamp>.<body>"`). Non-2xx and
 * network errors retry with backoff; without a configured endpoint a row is
 * marked undeliverable (kept, visible, not lost).
 */
export function createOutgoingWorker(c: Config, db: Database): Worker<OutgoingJob> {
  return new Worker<OutgoingJob, { status: string }>(
    QUEUES.outgoing,
    async (job: Job<OutgoingJob>) => {
      const parsed = outgoingJobSchema.safeParse(job.data);
      if (!parsed.success) throw new UnrecoverableError('invalid outgoing job');
      const [row] = await db.sequelize.query<{ id: number; type: string; payload: string; status: string }>(
        'SELECT id, type, payload, status FROM outgoing_events WHERE id = ?',
        { replacements: [parsed.data.eventId], type: QueryTypes.SELECT },
      );
      if (!row) throw new UnrecoverableError(`outgoing event ${parsed.data.eventId} does not exist`);
      if (row.status === 'delivered') return { status: 'delivered' };
      if (!c.UPSTREAM_WEBHOOK_URL) {
        await db.sequelize.query("UPDATE outgoing_events SET status = 'undeliverable', last_error = 'no upstream endpoint configured' WHERE id = ?", {
          replacements: [row.id],
          type: QueryTypes.UPDATE,
        });
        return { status: 'undeliverable' };
      }
      const body = JSON.stringify({ id: Number(row.id), type: row.type, data: JSON.parse(row.payload) });
      const timestamp = String(Math.floor(Date.now() / 1000));
      try {
        const res = await fetch(c.UPSTREAM_WEBHOOK_URL, {
          method: 'POST',
          headers: {
            'content-type': 'application/json',
            'x-edgecase-event': row.type,
            'x-edgecase-timestamp': timestamp,
            'x-edgecase-signature': signWebhook(c.UPSTREAM_WEBHOOK_SECRET, timestamp, body),
          },
          body,
          signal: AbortSignal.timeout(TIMEOUT_MS),
        });
        if (!res.ok) throw new Error(`upstream answered ${res.status}`);
        await db.sequelize.query("UPDATE outgoing_events SET status = 'delivered', attempts = attempts + 1, delivered_at = UTC_TIMESTAMP(3), last_error = NULL WHERE id = ?", {
          replacements: [row.id],
          type: QueryTypes.UPDATE,
        });
        return { status: 'delivered' };
      } catch (err) {
        await db.sequelize.query("UPDATE outgoing_events SET attempts = attempts + 1, last_error = ?, status = 'failed' WHERE id = ?", {
          replacements: [String((err as Error).message).slice(0, 500), row.id],
          type: QueryTypes.UPDATE,
        });
        throw err;
      }
    },
    workerOptions(c, 'outgoing', 2),
  );
}
