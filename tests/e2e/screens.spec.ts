// The remaining working screens, each checked for its main content and photographed in both themes
// (reports/screenshots/screen-*.png). The spec makes its own decided revision, bench check and decision mail
// through the API first, so it does not depend on what other specs leave behind.
import { expect, test, type Page } from '@playwright/test';
import { apiAs, okJson, shot, signIn } from './support';

const PROJECT = `Screens check ${Date.now()}`;

test.beforeAll(async () => {
  test.setTimeout(90_000);
  const designer = await apiAs('designer');
  const { tubes } = await okJson<{ tubes: { id: number; designation: string }[] }>(await designer.get('/api/tubes/options'));
  const tubeId = tubes.find((t) => t.designation === '12AX7')!.id;
  const { project } = await okJson<{ project: { id: number } }>(await designer.post('/api/projects', { data: { name: PROJECT } }));
  const { stage } = await okJson<{ stage: { id: number } }>(
    await designer.post(`/api/projects/${project.id}/stages`, {
      data: { name: 'V1', topology: 'common-cathode', tubeId, supply: 330, plateResistor: 100000, gridResistor: 1000000, bias: { kind: 'cathode', cathodeResistor: 1500, cathodeBypass: 0.000022 } },
    }),
  );
  const technician = await apiAs('technician');
  await okJson(await technician.post(`/api/stages/${stage.id}/bench-checks`, { data: { supplyVoltage: 330, plateVoltage: 221, cathodeVoltage: 1.6, tubeSerial: 'SCR-01' } }));
  const { revision } = await okJson<{ revision: { id: number } }>(await designer.post(`/api/projects/${project.id}/revisions`, { data: { note: 'For the screens check.' } }));
  const reviewer = await apiAs('reviewer');
  await okJson(await reviewer.post(`/api/revisions/${revision.id}/decision`, { data: { decision: 'approve', comment: 'Fine.' } }));
  // the decision mail is delivered by the outbox; wait until it is sent
  const admin = await apiAs('admin');
  await expect
    .poll(async () => {
      const { mails } = await okJson<{ mails: { subject: string; status: string }[] }>(await admin.get('/api/admin/outbox'));
      return mails.find((m) => m.subject.includes(PROJECT))?.status ?? 'missing';
    }, { timeout: 45_000, intervals: [500] })
    .toBe('sent');
  await Promise.all([designer, technician, reviewer, admin].map((c) => c.dispose()));
});

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
