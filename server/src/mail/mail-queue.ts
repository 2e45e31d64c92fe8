import { Queue } from 'bullmq';
import type { Config } from '../config/index';
import { createRedis } from '../lib/redis';
import { QUEUES, mailJobSchema, type MailJob } from '@shared/jobs/queues';

/** The producer side of the mail queue: validates the message and hands it to the mail worker. */
export class MailQueue {
  private readonly queue: Queue<MailJob>;

  constructor(c: Config) {
    this.queue = new Queue<MailJob>(QUEUES.mail, {
      connection: createRedis(c, { forBullmq: true, failFast: true, name: 'web-mail-producer' }),
      prefix: c.REDIS_PREFIX,
      defaultJobOptions: {
        attempts: 5,
        backoff: { type: 'exponential', delay: 1_000 },
        removeOnComplete: { count: 1_000 },
        removeOnFail: { count: 5_000 },
      },
    });
  }

  async send(mail: MailJob): Promise<string> {
    const data = mailJobSchema.parse(mail);
    const job = await this.queue.add(data.purpose, data);
    return job.id ?? '';
  }

  close(): Promise<void> {
    return this.queue.close();
  }
}
