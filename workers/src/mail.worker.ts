import { UnrecoverableError, Worker, type Job } from 'bullmq';
import nodemailer, { type Transporter } from 'nodemailer';
import { QueryTypes } from 'sequelize';
import type { Config } from '../../server/src/config/index';
import type { Database } from '../../server/src/db/database';
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
export function createMailWorker(c: Config, db: Database | null, transport?: Transporter): Worker<MailJob, MailResult> {
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
      // A message kept on a case shows its delivery status there.
      const messageId = m.related?.type === 'case_message' ? Number(m.related.id) : null;
      const mark = (status: 'sent' | 'failed') =>
        db && messageId
          ? db.sequelize.query('UPDATE case_messages SET status = ?, updated_at = UTC_TIMESTAMP(3) WHERE id = ?', { replacements: [status, messageId], type: QueryTypes.UPDATE })
          : Promise.resolve();
      let info;
      try {
        info = await transporter.sendMail({ from: c.MAIL_FROM, to: m.to, subject: m.subject, text: m.text, html: m.html });
      } catch (err) {
        if (job.attemptsMade + 1 >= (job.opts.attempts ?? 1)) await mark('failed');
        throw err;
      }
      await mark('sent');
      logger().info({ jobId: job.id, purpose: m.purpose, recipients: m.to.length }, 'mail sent');
      return { messageId: String(info.messageId), accepted: (info.accepted ?? []).map(String) };
    },
    workerOptions(c, 'mail', 2),
  );
}
