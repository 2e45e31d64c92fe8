import { mkdirSync } from 'node:fs';
import { expect, test } from '@playwright/test';

const PASSWORD = 'demo-password';
const HOMES = [
  { email: 'investigator@demo.test', role: 'investigator', path: '/queue', heading: 'Queue' },
  { email: 'supervisor@demo.test', role: 'supervisor', path: '/board', heading: 'Board' },
  { email: 'scientist@demo.test', role: 'data_scientist', path: '/models', heading: 'Models' },
  { email: 'admin@demo.test', role: 'admin', path: '/admin', heading: 'Admin' },
] as const;

mkdirSync('artifacts/e2e', { recursive: true });

for (const who of HOMES) {
  test(`${who.role} signs in through the page and lands on their home`, async ({ page }) => {
    await page.goto('/');
    await expect(page).toHaveURL(/\/sign-in/);
    await page.getByLabel('Email').fill(who.email);
    await page.getByLabel('Password').fill(PASSWORD);
    await page.getByRole('button', { name: 'Sign in' }).click();
    await expect(page).toHaveURL(new RegExp(`${who.path}$`));
    await expect(page.getByRole('heading', { level: 1, name: who.heading })).toBeVisible();
    await page.screenshot({ path: `artifacts/e2e/home-${who.role}.png`, fullPage: true });
  });
}

test('a wrong password is refused on the page and no session is made', async ({ page }) => {
  await page.goto('/sign-in');
  await page.getByLabel('Email').fill('investigator@demo.test');
  await page.getByLabel('Password').fill('not-the-password');
  await page.getByRole('button', { name: 'Sign in' }).click();
  await expect(page.getByRole('alert')).toContainText(/not right/i);
  await expect(page).toHaveURL(/\/sign-in/);
  const me = await page.request.get('/api/auth/me');
  expect(me.status()).toBe(401);
});

test('signing out returns to the sign-in page and the session is gone', async ({ page }) => {
  await page.goto('/sign-in');
  await page.getByLabel('Email').fill('supervisor@demo.test');
  await page.getByLabel('Password').fill(PASSWORD);
  await page.getByRole('button', { name: 'Sign in' }).click();
  await expect(page.getByRole('heading', { level: 1, name: 'Board' })).toBeVisible();
  await page.getByRole('button', { name: /sign out/i }).click();
  await expect(page).toHaveURL(/\/sign-in/);
  const me = await page.request.get('/api/auth/me');
  expect(me.status()).toBe(401);
  await page.goto('/board');
  await expect(page).toHaveURL(/\/sign-in/);
});
