import type { Database } from './database';
import type { Config } from '../config/index';
import { hashPassword } from '../auth/password';
import { createUser, findUserByEmail } from '../auth/user-repository';
import { appendAudit } from '../audit/audit-repository';
import { DEMO_ACCOUNTS, DEMO_API_KEY } from '../demo/demo-accounts';
import { createApiKey, findApiKeyByHash, hashApiKey } from '../api-keys/api-key-repository';

/**
 * Seeds the invented demo issuer's staff (and, as later parts land, its
 * cardholders, merchants and history). Idempotent: what exists is kept.
 * Refuses to run in production mode.
 */
export async function seedDemo(db: Database, c: Config): Promise<{ created: string[] }> {
  if (c.EDGECASE_MODE === 'production') throw new Error('The demo seed does not run in production mode.');
  const created: string[] = [];
  const hash = await hashPassword(c.DEMO_PASSWORD);
  for (const account of DEMO_ACCOUNTS) {
    if (await findUserByEmail(db, account.email)) continue;
    await createUser(db, { ...account, passwordHash: hash });
    created.push(account.email);
  }
  if (!(await findApiKeyByHash(db, hashApiKey(DEMO_API_KEY)))) {
    await createApiKey(db, { name: 'Demo upstream (local only)', scopes: ['transactions:write', 'transactions:read', 'decisions:write'], plainKey: DEMO_API_KEY });
    created.push('demo API key');
  }
  if (created.length > 0) {
    await appendAudit(db, {
      actorType: 'system',
      actorLabel: 'demo seed',
      action: 'demo.seed',
      outcome: 'success',
      details: { createdAccounts: created },
    });
  }
  return { created };
}
