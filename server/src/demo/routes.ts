import { PUBLIC, needs, type RouteSpec } from '../access/route-table';
import type { Config } from '../config/index';
import { AppError } from '../lib/app-error';
import { DEMO_ACCOUNTS } from './demo-accounts';
import { listCapturedMail, readCapturedMail } from './mailbox';

/** Demo-only helpers: the sign-in hint and the captured-mail viewer. Absent in production. */
export function demoRoutes(c: Config): RouteSpec[] {
  const demo = c.EDGECASE_MODE !== 'production';
  return [
    {
      method: 'get',
      path: '/demo/info',
      access: PUBLIC,
      summary: 'Demo accounts shown on the sign-in page (demo and test modes only)',
      handler: (_req, res) => {
        if (!demo) throw AppError.notFound();
        res.json({ demo: true, accounts: DEMO_ACCOUNTS.map(({ email, role }) => ({ email, role })), password: c.DEMO_PASSWORD });
      },
    },
    {
      method: 'get',
      path: '/demo/mail',
      access: needs('mail:read-demo'),
      summary: 'Mail captured by the local SMTP catcher',
      handler: async (_req, res) => {
        if (!demo || !c.MAIL_CATCHER_DIR) throw AppError.notFound('No demo mailbox here.');
        res.json({ messages: await listCapturedMail(c.MAIL_CATCHER_DIR) });
      },
    },
    {
      method: 'get',
      path: '/demo/mail/:id',
      access: needs('mail:read-demo'),
      summary: 'One captured mail',
      handler: async (req, res) => {
        if (!demo || !c.MAIL_CATCHER_DIR) throw AppError.notFound('No demo mailbox here.');
        const mail = await readCapturedMail(c.MAIL_CATCHER_DIR, String(req.params.id));
        if (!mail) throw AppError.notFound('No such message.');
        res.json({ message: mail });
      },
    },
  ];
}
