// Plot views follow the usual tabs pattern (one tab stop, arrow keys move the selection); read-only fields do not
// look like fields that take typing.
import { expect, test } from '@playwright/test';
import { signIn } from './support';

async function firstDemoStage(page: import('@playwright/test').Page) {
  await page.goto('/projects');
  await page.locator('a[href^="/projects/"]').first().click();
  const stageLink = page.locator('a[href*="/stages/"]').filter({ hasNotText: /add/i }).first();
  await stageLink.click();
  await expect(page).toHaveURL(/\/stages\/\d+$/);
  await expect(page.getByRole('tablist', { name: 'Other views' })).toBeVisible();
}

test('arrow keys move between the plot views like tabs', async ({ page }) => {
  await signIn(page, 'designer');
  await firstDemoStage(page);
  const tabs = page.getByRole('tablist', { name: 'Other views' });
  const transfer = tabs.getByRole('tab', { name: 'Transfer' });
  await expect(transfer).toHaveAttribute('aria-selected', 'true');
  await expect(tabs.getByRole('tab', { name: 'Waveform' })).toHaveAttribute('tabindex', '-1');
  await transfer.focus();
  await page.keyboard.press('ArrowRight');
  const waveform = tabs.getByRole('tab', { name: 'Waveform' });
  await expect(waveform).toHaveAttribute('aria-selected', 'true');
  await expect(waveform).toBeFocused();
  await page.keyboard.press('End');
  await expect(tabs.getByRole('tab', { name: 'Response' })).toBeFocused();
  await page.keyboard.press('ArrowRight'); // wraps round to the first
  await expect(transfer).toHaveAttribute('aria-selected', 'true');
  await expect(page.getByRole('tabpanel')).toHaveAttribute('aria-labelledby', /tab-transfer$/);
});

test('a technician sees read-only fields drawn as read-only', async ({ page }) => {
  await signIn(page, 'technician');
  await firstDemoStage(page);
  const input = page.getByTestId('stage-inputs').locator('input').first();
  await expect(input).toBeDisabled();
  expect(await input.evaluate((el) => getComputedStyle(el).borderStyle)).toBe('dashed');
  expect(await input.evaluate((el) => getComputedStyle(el).backgroundColor)).toBe('rgba(0, 0, 0, 0)');
});
