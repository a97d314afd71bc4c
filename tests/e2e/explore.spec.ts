import { expect, test } from '@playwright/test';
import { apiAs, okJson, shot, signIn } from './support';

// The Explore area of a stage: the three tools are there, a bad trial count is explained by the form, a run is
// queued with its progress shown and can be cancelled; a reviewer sees the runs but cannot start one.

async function demoStage(): Promise<{ projectId: number; stageId: number }> {
  const api = await apiAs('designer');
  const { projects } = await okJson<{ projects: { id: number }[] }>(await api.get('/api/projects'));
  for (const p of projects) {
    const { project } = await okJson<{ project: { stages: { id: number; topology: string; analysis: unknown }[] } }>(await api.get(`/api/projects/${p.id}`));
    const st = project.stages.find((s) => s.analysis && s.topology === 'common-cathode');
    if (st) return { projectId: p.id, stageId: st.id };
  }
  throw new Error('no analysable common-cathode demo stage');
}

test('a designer queues and cancels a tolerance run and finds the tube swap and part search', async ({ page }) => {
  const { projectId, stageId } = await demoStage();
  await signIn(page, 'designer');
  await page.goto(`/projects/${projectId}/stages/${stageId}`);
  await page.getByTestId('explore-link').click();
  await expect(page).toHaveURL(new RegExp(`/projects/${projectId}/stages/${stageId}/explore$`));
  await expect(page.getByRole('heading', { name: /^Explore: / })).toBeVisible();
  await expect(page.getByRole('note', { name: 'Safety caution' })).toBeVisible();

  const trials = page.getByLabel('Trials (builds)');
  await trials.fill('5');
  await page.getByRole('button', { name: 'Start tolerance run' }).click();
  await expect(page.getByText('must be at least 100')).toBeVisible();

  await trials.fill('150000');
  await page.getByRole('button', { name: 'Start tolerance run' }).click();
  const status = page.getByTestId('run-status');
  await expect(status).toHaveAttribute('data-status', /queued|running|completed/);
  const cancel = page.getByRole('button', { name: 'Cancel' });
  if (await cancel.isVisible()) {
    await cancel.click();
    await expect(status).toHaveAttribute('data-status', 'cancelled', { timeout: 15_000 });
  }
  await page.screenshot(shot('explore-tolerance'));

  await page.getByRole('tab', { name: 'Tube swap' }).click();
  await expect(page.getByRole('button', { name: 'Compare tubes' })).toBeVisible();
  await page.getByRole('tab', { name: 'Part search' }).click();
  await expect(page.getByRole('button', { name: 'Start part search' })).toBeVisible();
  await expect(page.getByLabel('Plate resistor is free')).toBeChecked();
});

test('a reviewer reads the Explore area without the run buttons', async ({ page }) => {
  const { projectId, stageId } = await demoStage();
  await signIn(page, 'reviewer');
  await page.goto(`/projects/${projectId}/stages/${stageId}/explore`);
  await expect(page.getByText('Designers start runs; here are the runs made so far.')).toBeVisible();
  await expect(page.getByRole('button', { name: 'Start tolerance run' })).toHaveCount(0);
  await page.goto(`/projects/${projectId}/explore`);
  await expect(page.getByRole('heading', { name: 'Explore: signal chain' })).toBeVisible();
});
