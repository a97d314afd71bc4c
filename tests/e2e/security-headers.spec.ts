// The production build runs under its Content-Security-Policy with no violation: every screen a role opens loads,
// hydrates (a client-side interaction works) and logs no CSP error to the console.
import { expect, test, type Page } from '@playwright/test';
import { signIn, signOut } from './support';

function watchCsp(page: Page) {
  const violations: string[] = [];
  page.on('console', (msg) => {
    if (/Content Security Policy|Content-Security-Policy|violates the following/i.test(msg.text())) violations.push(msg.text());
  });
  page.on('pageerror', (err) => violations.push(`pageerror: ${err.message}`));
  return violations;
}

test('pages load under the CSP with no console violation', async ({ page }) => {
  const violations = watchCsp(page);
  const signInRes = await page.goto('/sign-in');
  const csp = signInRes!.headers()['content-security-policy'] ?? '';
  expect(csp).toMatch(/script-src 'self' 'nonce-/);
  expect(csp).toMatch(/frame-ancestors 'none'/);
  expect(signInRes!.headers()['x-content-type-options']).toBe('nosniff');
  await signIn(page, 'admin');
  for (const path of ['/', '/projects', '/projects/1', '/projects/1/stages/new', '/tubes', '/tubes/1', '/tubes/compare?ids=1,2', '/bench', '/reviews', '/admin/users', '/admin/outbox', '/admin/audit']) {
    const res = await page.goto(path);
    expect(res?.status(), path).toBeLessThan(400);
    await page.waitForLoadState('networkidle');
  }
  // hydration works: a client-side navigation through the main menu
  await page.goto('/projects');
  await page.getByRole('navigation', { name: 'Main' }).getByRole('link', { name: 'Tube library', exact: true }).click();
  await expect(page).toHaveURL(/\/tubes/);
  await signOut(page);
  expect(violations).toEqual([]);
});
