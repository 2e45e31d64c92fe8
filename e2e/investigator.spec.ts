import { mkdirSync } from 'node:fs';
import { expect, test } from '@playwright/test';
import mariadb from 'mariadb';
import { postRiskyTransaction, signIn } from './support';

mkdirSync('artifacts/e2e', { recursive: true });

test('an investigator works a live alert from the queue to a confirmed-fraud disposition', async ({ page, request }) => {
  test.setTimeout(120_000);
  await signIn(page, 'investigator@demo.test');
  await expect(page.getByRole('heading', { level: 1, name: 'Queue' })).toBeVisible();

  // A new alert arrives live while the queue is open.
  const t = await postRiskyTransaction(request);
  const row = page.getByRole('row').filter({ hasText: t.last4 });
  await expect(row).toBeVisible({ timeout: 30_000 });
  await page.screenshot({ path: 'artifacts/e2e/queue.png', fullPage: true });

  // Keyboard: search for the card (/), move onto it (j), claim it (c), open it (o).
  await page.keyboard.press('/');
  await expect(page.getByLabel('Search')).toBeFocused();
  await page.keyboard.type(t.last4);
  await expect(page.getByRole('row').filter({ hasText: /\d{6}/ })).toHaveCount(1, { timeout: 10_000 });
  await page.getByLabel('Search').blur();
  await page.keyboard.press('j');
  await expect(page.getByText(/Cursor on case \d+/)).toBeVisible();
  await page.keyboard.press('c');
  await expect(page.getByText(/You hold case \d+ now/)).toBeVisible({ timeout: 10_000 });
  await page.keyboard.press('o');
  await expect(page).toHaveURL(/\/cases\/\d+/);
  const caseId = Number(/\/cases\/(\d+)/.exec(page.url())![1]);

  // Reasons in raw units and the caution beside the decision.
  await expect(page.getByText(/amount .*[><]/i).first()).toBeVisible();
  await expect(page.getByText(/The score is evidence, not a verdict/).first()).toBeVisible();

  // What-if: a small amount lowers the probability computed in the browser.
  const inputs = page.getByRole('form', { name: 'What-if inputs' });
  await expect(inputs).toBeVisible({ timeout: 20_000 });
  const scored = await page.getByLabel('Scored probability').textContent();
  const amount = inputs.getByRole('textbox').first();
  await amount.fill('3.50');
  await expect(page.getByLabel('What-if probability')).not.toHaveText(scored ?? '');

  // Evidence upload (a PNG by its signature bytes).
  const png = Buffer.concat([Buffer.from('89504e470d0a1a0a0000000d49484452000000010000000108060000001f15c489', 'hex'), Buffer.alloc(64)]);
  await page.locator('input[type="file"]').setInputFiles({ name: 'receipt.png', mimeType: 'image/png', buffer: png });
  await expect(page.getByRole('list', { name: 'Evidence files' }).or(page.getByLabel('Evidence files'))).toContainText('receipt.png', { timeout: 20_000 });

  // E-mail to the cardholder, through the mail queue to the local catcher.
  await page.getByLabel('Subject', { exact: true }).fill('About a recent payment');
  await page.getByLabel('Message', { exact: true }).fill('Did you make a payment of 4,890.00 today? Please reply.');
  await page.getByRole('button', { name: 'Send to cardholder' }).click();
  await expect(page.getByLabel('Messages')).toContainText('About a recent payment', { timeout: 20_000 });

  await page.screenshot({ path: 'artifacts/e2e/case-file.png', fullPage: true });

  // Disposition: confirmed fraud, card not present.
  await page.getByRole('radio', { name: /Confirmed fraud/ }).check();
  await page.getByRole('radio', { name: /Card not present/ }).check();
  await page.getByLabel('Reason').last().fill('Cardholder did not recognise the payment');
  await page.getByRole('button', { name: /save|close case|record/i }).last().click();
  await expect(page).not.toHaveURL(new RegExp(`/cases/${caseId}$`), { timeout: 20_000 });

  // The label and the audit trail, read back through the API as a supervisor would see them.
  const file = await page.request.get(`/api/cases/${caseId}`);
  const body = await file.json();
  expect(body.case.status).toBe('closed');
  expect(body.case.disposition).toBe('confirmed_fraud');
  const actions = body.timeline.map((e: { action: string }) => e.action);
  for (const a of ['case.claim', 'case.evidence', 'case.contact', 'case.disposition']) expect(actions).toContain(a);
  // The training label, read from the database the e2e server uses (same DB_* settings).
  const db = await mariadb.createConnection({
    host: process.env.DB_HOST ?? '127.0.0.1',
    port: Number(process.env.DB_PORT ?? 3317),
    user: process.env.DB_USER ?? 'edgecase',
    password: process.env.DB_PASSWORD ?? 'edgecase',
    database: process.env.DB_NAME ?? 'edgecase_e2e',
  });
  try {
    // One label per alerted transaction of the case (how many of the burst alert depends on the seeded threshold).
    const labels = await db.query(
      'SELECT l.label, l.fraud_type, l.source FROM labels l JOIN alerts a ON a.transaction_id = l.transaction_id WHERE a.case_id = ?',
      [caseId],
    );
    const [{ n }] = await db.query('SELECT COUNT(*) AS n FROM alerts WHERE case_id = ?', [caseId]);
    expect(Number(n)).toBeGreaterThanOrEqual(1);
    expect(labels.map((r: Record<string, unknown>) => ({ ...r }))).toEqual(
      Array.from({ length: Number(n) }, () => ({ label: 'fraud', fraud_type: 'card_not_present', source: 'disposition' })),
    );
  } finally {
    await db.end();
  }
  const mail = await page.request.get('/api/demo/mail');
  const messages = (await mail.json()).messages as { subject: string }[];
  expect(messages.some((m) => m.subject === 'About a recent payment')).toBe(true);
});

test('two investigators claiming the same case at once: exactly one wins', async ({ browser, request }) => {
  const t = await postRiskyTransaction(request);
  const a = await browser.newContext();
  const b = await browser.newContext();
  const pa = await a.newPage();
  const pb = await b.newPage();
  await signIn(pa, 'investigator@demo.test');
  await signIn(pb, 'supervisor@demo.test');
  let caseId: number | null = null;
  await expect
    .poll(async () => {
      const r = await request.get(`/api/v1/transactions/${t.id}`, { headers: { Authorization: 'Bearer edgecase-demo-key' } });
      caseId = (await r.json()).transaction?.caseId ?? null;
      return caseId;
    }, { timeout: 30_000 })
    .not.toBeNull();
  const claim = async (p: typeof pa) => {
    const token = (await (await p.request.get('/api/auth/csrf')).json()).csrfToken as string;
    return p.request.post(`/api/cases/${caseId}/claim`, { headers: { 'X-CSRF-Token': token } });
  };
  const [ra, rb] = await Promise.all([claim(pa), claim(pb)]);
  expect([ra.status(), rb.status()].sort()).toEqual([200, 409]);
  const loser = ra.status() === 409 ? ra : rb;
  expect((await loser.json()).error.code).toBe('already_claimed');
  await a.close();
  await b.close();
});
