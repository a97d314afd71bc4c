import { expect, test } from '@playwright/test';
import { shot, signIn } from './support';

const SE = 'Single-ended 300B output with 12AU7 driver';

test('the demo amplifier’s supply circuit: nodes at idle and full drive, waveforms, ratings and cautions', async ({ page }) => {
  await signIn(page, 'designer');
  await page.goto('/projects');
  await page.getByRole('link', { name: SE }).click();
  const editor = page.getByTestId('supply-circuit-editor');
  await expect(editor).toBeVisible();
  // choke input on a 5U4GB: two nodes, each with its solved voltages
  await expect(editor.getByTestId('supply-circuit-nodes').locator('tbody tr')).toHaveCount(2, { timeout: 30_000 });
  await expect(editor.getByTestId('supply-node-0')).toContainText('Output plate');
  await expect(editor.getByTestId('supply-node-0')).toContainText(/idle \d+(\.\d+)? V/);
  await expect(editor.getByTestId('supply-waveform-chart')).toBeVisible();
  await expect(editor.getByTestId('supply-ratings')).toContainText('Rectifier peak inverse voltage');
  await expect(editor.getByTestId('supply-cautions')).toContainText('bleeder');
  await expect(editor.getByTestId('supply-cautions')).toContainText('5U4GB heater');
  await expect(page.getByRole('note', { name: 'Safety caution' })).toBeVisible();
  await editor.getByRole('button', { name: 'idle' }).click();
  await expect(editor.getByRole('button', { name: 'idle' })).toHaveAttribute('aria-pressed', 'true');
  await editor.screenshot(shot('supply-circuit'));

  // a bad value is named under its field, and nothing is saved
  await editor.locator('#sc-s1-c').fill('lots');
  await editor.getByRole('button', { name: 'Save supply' }).click();
  await expect(editor.getByText("'lots' is not a number")).toBeVisible();
});

test('a technician reads the supply circuit without edit controls', async ({ page }) => {
  await signIn(page, 'technician');
  await page.goto('/projects');
  await page.getByRole('link', { name: SE }).click();
  const editor = page.getByTestId('supply-circuit-editor');
  await expect(editor.getByTestId('supply-circuit-nodes')).toBeVisible({ timeout: 30_000 });
  await expect(editor.getByRole('button', { name: 'Save supply' })).toHaveCount(0);
  await expect(editor.getByRole('button', { name: '+ Choke' })).toHaveCount(0);
});
