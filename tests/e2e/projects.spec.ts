import { expect, test } from '@playwright/test';
import { shot, signIn } from './support';

const PREAMP = 'Crunch preamp (two 12AX7 stages + cathode follower)';

test('chain view of the demo preamp in both themes', async ({ page }) => {
  await signIn(page, 'designer');
  await page.goto('/projects');
  await expect(page.getByTestId('projects-table')).toBeVisible();
  await page.getByRole('link', { name: PREAMP }).click();
  await expect(page.getByTestId('project-name')).toContainText(PREAMP);
  await expect(page.getByRole('note', { name: 'Safety caution' })).toBeVisible();
  await expect(page.getByTestId('stages-table').locator('tbody tr')).toHaveCount(3);

  const chain = page.getByTestId('chain-view');
  await expect(chain.getByTestId('chain-stage')).toHaveCount(3);
  await expect(chain.getByTestId('first-clip')).toContainText(/from .*V rms at the input/);
  await expect(chain.getByTestId('supply-nodes').locator('tbody tr')).toHaveCount(3);
  await expect(chain.getByTestId('heater-totals')).toContainText('6.3 V heater winding');
  await page.screenshot(shot('projects-chain-light'));

  // a lower chain input: the first stages stay within their headroom
  await page.getByLabel('Chain input').fill('5m');
  // the chain is solved end to end: the first grid sees the 5 mV input less the source and grid-leak divider
  await expect(chain.getByTestId('chain-stage').first()).toContainText(/At its grid\s*(4\.\d+|5) mV rms/);
  await page.getByLabel('Chain input').fill('loud');
  await expect(page.getByRole('alert').filter({ hasText: 'not a number' })).toBeVisible();
  await page.getByLabel('Chain input').fill('100m');

  await page.getByRole('button', { name: 'Switch to dark theme' }).click();
  await expect(page.locator('html')).toHaveClass(/dark/);
  await expect(chain.getByTestId('chain-stage')).toHaveCount(3);
  await page.screenshot(shot('projects-chain-dark'));
  await page.getByRole('button', { name: 'Switch to light theme' }).click();
});

test('a technician reads projects but gets no edit controls', async ({ page }) => {
  await signIn(page, 'technician');
  await page.goto('/projects');
  await expect(page.getByRole('heading', { name: 'New project' })).toHaveCount(0);
  await page.getByRole('link', { name: PREAMP }).click();
  await expect(page.getByTestId('chain-view')).toBeVisible();
  await expect(page.getByRole('link', { name: 'Add stage' })).toHaveCount(0);
  await expect(page.getByRole('button', { name: 'Save supply' })).toHaveCount(0);
  await expect(page.getByRole('button', { name: 'Design report (PDF)' })).toBeVisible();
});

test('a designer creates a project and gets field messages for a bad supply value', async ({ page }) => {
  await signIn(page, 'designer');
  await page.goto('/projects');
  const name = `E2E project ${Date.now()}`;
  await page.getByLabel('Name').fill(name);
  await page.getByRole('button', { name: 'Create project' }).click();
  await expect(page.getByTestId('project-name')).toContainText(name);
  await page.getByLabel('Raw B+').fill('3OO');
  await page.getByRole('button', { name: 'Save supply' }).click();
  await expect(page.getByText("'3OO' is not a number")).toBeVisible();
  await page.getByLabel('Raw B+').fill('300');
  await page.getByRole('button', { name: 'Add node' }).click();
  await page.locator('#node-0-name').fill('Reservoir');
  await page.locator('#node-0-r').fill('0');
  await page.getByRole('button', { name: 'Save supply' }).click();
  await expect(page.getByTestId('supply-editor')).toContainText('saved');
  await expect(page.getByTestId('supply-nodes')).toContainText('300 V');
});
