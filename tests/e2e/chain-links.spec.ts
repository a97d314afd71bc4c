import { expect, test } from '@playwright/test';
import { signIn } from './support';

const SE = 'Single-ended 300B output with 12AU7 driver';

test('a designer changes a coupling capacitor in the Links card, sees it saved, then goes back to the default order', async ({ page }) => {
  await signIn(page, 'designer');
  await page.goto('/projects');
  await page.getByRole('link', { name: SE }).click();
  const links = page.getByTestId('chain-links-editor');
  await expect(links).toBeVisible();
  await expect(links.getByTestId('chain-link-row')).toHaveCount(1);
  const cap = links.getByLabel('Link 1 coupling capacitor');
  await expect(cap).toHaveValue('100n');

  // a value that is not a number is named and nothing is sent
  await cap.fill('lots');
  await links.getByRole('button', { name: 'Save links' }).click();
  await expect(links.getByText("'lots' is not a number", { exact: false })).toBeVisible();

  await cap.fill('47n');
  await links.getByRole('button', { name: 'Save links' }).click();
  await expect(links.getByText('Links saved.')).toBeVisible();
  await expect(links.getByText('stored links')).toBeVisible();

  // stored: a fresh page shows it
  await page.reload();
  await expect(page.getByTestId('chain-links-editor').getByLabel('Link 1 coupling capacitor')).toHaveValue('47n');

  await page.getByTestId('chain-links-editor').getByRole('button', { name: 'Use the default order' }).click();
  await expect(page.getByTestId('chain-links-editor').getByText('default order', { exact: true })).toBeVisible();
  await expect(page.getByTestId('chain-links-editor').getByLabel('Link 1 coupling capacitor')).toHaveValue('100n');
});

test('a technician reads the links without edit controls', async ({ page }) => {
  await signIn(page, 'technician');
  await page.goto('/projects');
  await page.getByRole('link', { name: SE }).click();
  const links = page.getByTestId('chain-links-editor');
  await expect(links).toBeVisible();
  await expect(links.getByRole('button', { name: 'Save links' })).toHaveCount(0);
  await expect(links.getByLabel('Link 1 coupling capacitor')).toBeDisabled();
});
