import { UnrecoverableError, Worker, type Job } from 'bullmq';
import nodemailer, { type Transporter } from 'nodemailer';
import type { Config } from '../../server/src/config/index';
import { QUEUES, mailJobSchema, type MailJob } from '@shared/jobs/queues';
import { logger } from '../../server/src/lib/logger';
import { workerOptions } from './lib/worker-options';

export interface MailResult {
  messageId: string;
  accepted: string[];
}

/**
 * Sends queued e-mail over SMTP (the local catcher in the demo). A payload
 * that fails validation fails at once; SMTP errors retry with backoff.
 */
export function createMailWorker(c: Config, transport?: Transporter): Worker<MailJob, MailResult> {
  const transporter =
    transport ??
    nodemailer.createTransport({
      host: c.SMTP_HOST,
      port: c.SMTP_PORT,
      secure: false,
      ignoreTLS: c.EDGECASE_MODE !== 'production',
      pool: true,
      maxConnections: 2,
    });
  return new Worker<MailJob, MailResult>(
    QUEUES.mail,
    async (job: Job<MailJob>) => {
      const parsed = mailJobSchema.safeParse(job.data);
      if (!parsed.success) throw new UnrecoverableError(`invalid mail job: ${parsed.error.issues[0]?.message ?? 'bad payload'}`);
      const m = parsed.data;
      const info = await transporter.sendMail({ from: c.MAIL_FROM, to: m.to, subject: m.subject, text: m.text, html: m.html });
      logger().info({ jobId: job.id, purpose: m.purpose, recipients: m.to.length }, 'mail sent');
      return { messageId: String(info.messageId), accepted: (info.accepted ?? []).map(String) };
    },
    workerOptions(c, 'mail', 2),
  );
}
