import { mkdirSync } from 'node:fs';
import { expect, test, type APIRequestContext, type Page } from '@playwright/test';
import { luhnCheckDigit } from '../shared/src/card/luhn';
import { DEMO_KEY, PASSWORD, postRiskyTransaction } from './support';

mkdirSync('artifacts/e2e', { recursive: true });

/** A Luhn-valid number under the 99 prefix (ISO/IEC 7812 major industry identifier 9: national use), never a real card. */
function testPan(seed: number): string {
  const body = `990099${String(seed).padStart(9, '0')}`;
  return body + luhnCheckDigit(body);
}

async function signIn(page: Page, email: string, heading: string) {
  await page.goto('/sign-in');
  await page.getByLabel('Email').fill(email);
  await page.getByLabel('Password').fill(PASSWORD);
  await page.getByRole('button', { name: 'Sign in' }).click();
  await expect(page.getByRole('heading', { level: 1, name: heading })).toBeVisible();
}

type TxnView = { status: string; alerted: boolean; caseId: number | null; score: { probability: number } | null };

/** Opens a case with the demo's card-testing pattern (see support.ts) on a card of our own; returns the case. */
async function newCase(request: APIRequestContext, seed: number): Promise<number> {
  const t = await postRiskyTransaction(request, testPan(seed));
  let view: TxnView | undefined;
  await expect
    .poll(
      async () => {
        const r = await request.get(`/api/v1/transactions/${t.id}`, { headers: { Authorization: `Bearer ${DEMO_KEY}` } });
        view = r.ok() ? ((await r.json()).transaction as TxnView) : undefined;
        return view?.status;
      },
      { timeout: 30_000 },
    )
    .toBe('scored');
  expect(view!.alerted, `the burst's last payment scored ${view!.score?.probability} and did not alert`).toBe(true);
  return view!.caseId!;
}

test('a supervisor reassigns three cases in bulk and the investigator’s queue shows them at once', async ({ browser, page }) => {
  const seedBase = Math.floor(Date.now() / 1000) % 100_000_000;
  const ids = [await newCase(page.request, seedBase), await newCase(page.request, seedBase + 1), await newCase(page.request, seedBase + 2)];

  // The investigator watches their own queue in a second browser.
  const investigatorContext = await browser.newContext();
  const inv = await investigatorContext.newPage();
  await signIn(inv, 'investigator@demo.test', 'Queue');
  const me = (await (await inv.request.get('/api/auth/me')).json()).user as { id: number; displayName: string };
  await inv.goto('/queue?view=mine');
  await expect(inv.getByRole('button', { name: /^Mine/ })).toHaveAttribute('aria-pressed', 'true');
  for (const id of ids) await expect(inv.locator(`tr[data-case-id="${id}"]`)).toHaveCount(0);

  await signIn(page, 'supervisor@demo.test', 'Board');
  const table = page.getByRole('table', { name: 'Open cases, soonest SLA deadline first' });
  await page.getByRole('combobox', { name: 'Show' }).selectOption('unassigned');
  for (const id of ids) await table.getByRole('checkbox', { name: `Select case ${id}` }).check();
  await expect(page.getByText('3 selected', { exact: false })).toBeVisible();
  await page.getByRole('button', { name: /^Reassign 3/ }).click();
  const dialog = page.getByRole('dialog', { name: 'Reassign 3 cases' });
  await dialog.getByRole('combobox', { name: 'Hand to' }).selectOption(String(me.id));
  await dialog.getByRole('textbox', { name: /Note/ }).fill('Covering the afternoon');
  await dialog.getByRole('button', { name: 'Reassign 3' }).click();
  await expect(page.getByText(`3 cases now with ${me.displayName}`)).toBeVisible();
  await page.screenshot({ path: 'artifacts/e2e/board-after-reassign.png', fullPage: true });

  // No reload: the socket's case-changed events bring them into "Mine".
  for (const id of ids) await expect(inv.locator(`tr[data-case-id="${id}"]`)).toBeVisible({ timeout: 15_000 });
  await inv.screenshot({ path: 'artifacts/e2e/queue-after-reassign.png', fullPage: true });
  for (const id of ids) {
    const c = (await (await inv.request.get(`/api/cases/${id}`)).json()).case as { assignee: { id: number } | null };
    expect(c.assignee?.id).toBe(me.id);
  }
  await investigatorContext.close();
});

test('the threshold curve, the audit chain check and the admin screen work against the real server', async ({ browser, page }) => {
  await signIn(page, 'supervisor@demo.test', 'Board');
  await page.goto('/board?tab=threshold');
  await expect(page.getByRole('heading', { name: 'Alert threshold from capacity' })).toBeVisible();
  // The demo seed set the first threshold from the team's capacity (DEMO_DAILY_CAPACITY, default 40).
  await expect(page.getByText(new RegExp(`for a capacity of ${process.env.DEMO_DAILY_CAPACITY ?? 40} cases a day`))).toBeVisible();
  await page.getByRole('spinbutton', { name: 'Cases a day' }).fill('40');
  await expect(page.getByRole('status', { name: 'Where this lands' })).toContainText(/At \d+\.\d\s%: about/);
  await expect(page.getByText(/Precision and recall from /)).toBeVisible();
  await page.screenshot({ path: 'artifacts/e2e/board-threshold.png', fullPage: true });

  await page.goto('/audit');
  await page.getByRole('button', { name: 'Verify chain' }).click();
  await expect(page.getByText(/Intact: all [\d,]+ rows match their hashes/)).toBeVisible();
  await expect(page.getByRole('table', { name: 'Audit entries, newest first' })).toContainText('auth.sign_in');
  await page.screenshot({ path: 'artifacts/e2e/audit.png', fullPage: true });

  const adminContext = await browser.newContext();
  const admin = await adminContext.newPage();
  await signIn(admin, 'admin@demo.test', 'Admin');
  await expect(admin.getByRole('table', { name: 'Staff accounts' })).toContainText('Ines Varga');
  await expect(admin.getByRole('table', { name: 'API keys' })).toContainText('Demo upstream');
  // The e2e stack runs no demo feed: the panel says it has not reported, and a pause request is taken.
  await expect(admin.getByRole('status', { name: 'Feed state' })).toContainText('The feed has not reported yet');
  const toggle = admin.getByRole('button', { name: /^(Pause|Resume) the feed$/ });
  const before = (await toggle.textContent())!;
  await toggle.click();
  await expect(toggle).not.toHaveText(before);
  await toggle.click();
  await expect(toggle).toHaveText(before);
  await admin.screenshot({ path: 'artifacts/e2e/admin.png', fullPage: true });
  await adminContext.close();
});
