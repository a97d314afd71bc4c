import { expect, test } from '@playwright/test';
import { apiAs, okJson, shot, signIn } from './support';

// Each test makes its own project through the API, so either runs alone.
test.describe('review and bench settings on the project page', () => {
  const name = `E2E settings ${Date.now()}`;

  test('a designer sets a 5 % plate-current tolerance and a watcher, and they survive a reload', async ({ page }) => {
    await signIn(page, 'designer');
    const created = await page.request.post('/api/projects', { data: { name, description: 'Settings card check' } });
    expect(created.status()).toBe(201);
    const projectId = (await created.json()).project.id as number;
    await page.goto(`/projects/${projectId}`);
    const card = page.getByTestId('review-settings');
    await expect(card).toBeVisible();
    await expect(card.getByTestId('tolerance-plateCurrent')).toContainText('default ±10 % (common practice)');

    // Messages under the field, from the route's own schema (0 < x ≤ 100 %).
    const ia = card.getByLabel('Plate current ±');
    await ia.fill('0');
    await ia.blur();
    await expect(card.getByTestId('tolerance-plateCurrent').getByRole('alert')).toHaveText('Plate current ±: must be above 0 %');
    await ia.fill('150');
    await ia.blur();
    await expect(card.getByTestId('tolerance-plateCurrent').getByRole('alert')).toHaveText('Plate current ±: must be at most 100 %');
    await ia.fill('five');
    await card.getByRole('button', { name: 'Save settings' }).click();
    await expect(card.getByTestId('tolerance-plateCurrent').getByRole('alert')).toHaveText('Plate current ±: must be a number');
    await ia.fill('5');
    await ia.blur();
    await expect(card.getByTestId('tolerance-plateCurrent').getByRole('alert')).toHaveCount(0);

    await card.getByLabel('Add a watcher').selectOption({ label: 'Ines Okafor (technician)' });
    await card.getByRole('button', { name: 'Add watcher' }).click();
    await expect(card.getByTestId('watcher-list')).toContainText('Ines Okafor');
    await expect(card).toContainText('unsaved changes');
    await card.getByRole('button', { name: 'Save settings' }).click();
    await expect(card.getByText('saved', { exact: true })).toBeVisible();

    await page.reload();
    await expect(card.getByLabel('Plate current ±')).toHaveValue('5');
    await expect(card.getByTestId('tolerance-plateCurrent')).toContainText('project value');
    await expect(card.getByTestId('tolerance-plateVoltage')).toContainText('default ±10 %');
    await expect(card.getByTestId('watcher-list')).toContainText('Ines Okafor');
    const stored = await (await page.request.get(`/api/projects/${projectId}`)).json();
    expect(stored.project.benchTolerances).toEqual({ plateCurrent: 0.05 });

    await page.screenshot(shot('project-settings-light'));
    await page.getByRole('button', { name: 'Switch to dark theme' }).click();
    await expect(page.locator('html')).toHaveClass(/dark/);
    await page.screenshot(shot('project-settings-dark'));
    await page.getByRole('button', { name: 'Switch to light theme' }).click();

    await card.getByLabel('Plate to ground ±').fill('7.5');

    // Someone else saves meanwhile: the typed value stays and the card offers to reload.
    const bumped = await page.request.patch(`/api/projects/${projectId}`, { data: { version: stored.project.version, description: 'Changed elsewhere' } });
    expect(bumped.status()).toBe(200);
    await card.getByRole('button', { name: 'Save settings' }).click();
    const conflict = card.getByRole('alert').filter({ hasText: 'Someone else changed this project' });
    await expect(conflict).toBeVisible();
    await expect(card.getByLabel('Plate to ground ±')).toHaveValue('7.5');
    await conflict.getByRole('button', { name: 'Reload their version' }).click();
    await expect(card.getByLabel('Plate to ground ±')).toHaveValue('');
    await expect(card.getByLabel('Plate current ±')).toHaveValue('5');
  });

  test('a technician sees the tolerances and watchers read-only', async ({ page }) => {
    // set up through the API as the designer: a 5 % plate-current tolerance and the technician as a watcher
    const designer = await apiAs('designer');
    const technician = await apiAs('technician');
    const { user } = await okJson<{ user: { id: number } }>(await technician.get('/api/me'));
    const { project } = await okJson<{ project: { id: number; version: number } }>(await designer.post('/api/projects', { data: { name: `${name} read-only` } }));
    await okJson(await designer.patch(`/api/projects/${project.id}`, { data: { version: project.version, benchTolerances: { plateCurrent: 0.05 }, watchers: [user.id] } }));
    await Promise.all([designer.dispose(), technician.dispose()]);

    await signIn(page, 'technician');
    await page.goto(`/projects/${project.id}`);
    const card = page.getByTestId('review-settings');
    await expect(card.getByTestId('tolerance-plateCurrent')).toContainText('±5 %');
    await expect(card.getByTestId('tolerance-plateVoltage')).toContainText('±10 % default');
    await expect(card.getByTestId('watcher-list')).toContainText('Ines Okafor');
    await expect(card.locator('input, select')).toHaveCount(0);
    await expect(card.getByRole('button')).toHaveCount(0);
    await expect(card).toContainText('Read only');
  });
});
