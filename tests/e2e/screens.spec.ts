// The remaining working screens, each checked for its main content and photographed in both themes
// (reports/screenshots/screen-*.png). Runs after the review loop, so a decided revision and its mail exist.
import { expect, test, type Page } from '@playwright/test';
import { shot, signIn } from './support';

async function bothThemes(page: Page, name: string) {
  await page.screenshot(shot(`screen-${name}-light`));
  await page.getByRole('button', { name: 'Switch to dark theme' }).click();
  await expect(page.locator('html')).toHaveClass(/dark/);
  await page.screenshot(shot(`screen-${name}-dark`));
  await page.getByRole('button', { name: 'Switch to light theme' }).click();
}

test('bench page for the technician', async ({ page }) => {
  await signIn(page, 'technician');
  await page.getByRole('link', { name: 'Bench', exact: true }).click();
  await expect(page.getByRole('heading', { level: 1 })).toBeVisible();
  await expect(page.getByRole('note', { name: 'Safety caution' })).toBeVisible();
  await bothThemes(page, 'bench');
});

test('reviews list and a decided revision for the reviewer', async ({ page }) => {
  await signIn(page, 'reviewer');
  await page.getByRole('link', { name: 'Reviews', exact: true }).click();
  await expect(page.getByRole('heading', { level: 1 })).toBeVisible();
  await bothThemes(page, 'reviews');
  const link = page.locator('a[href^="/reviews/"]').first();
  await link.click();
  await expect(page.getByTestId('content-hash')).toHaveText(/^[0-9a-f]{64}$/);
  await bothThemes(page, 'revision');
});

test('outbox and audit log for the admin', async ({ page }) => {
  await signIn(page, 'admin');
  await page.getByRole('link', { name: 'Outbox', exact: true }).click();
  const outbox = page.getByTestId('outbox-table');
  await expect(outbox).toContainText('Approved:');
  await expect(outbox.locator('[data-status="sent"]').first()).toBeVisible();
  await expect(page.getByTestId('sink-messages')).toContainText('.pdf');
  await bothThemes(page, 'outbox');
  await page.getByRole('link', { name: 'Audit log', exact: true }).click();
  const audit = page.getByTestId('audit-table');
  await expect(audit).toContainText('revision.approve');
  await page.getByLabel('Action starts with').fill('bench-check');
  await page.getByRole('button', { name: 'Filter' }).click();
  await expect(audit.locator('tbody tr').first()).toContainText('bench-check');
  await expect(audit).not.toContainText('revision.approve');
  await bothThemes(page, 'audit');
});
