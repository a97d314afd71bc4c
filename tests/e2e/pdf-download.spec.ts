// The design report downloads with visible progress while the server renders it.
import { expect, test } from '@playwright/test';
import { signIn } from './support';

test('the design report shows progress while it renders and then downloads a PDF', async ({ page }) => {
  await signIn(page, 'designer');
  await page.goto('/projects');
  await page.locator('a[href^="/projects/"]').first().click();
  const button = page.getByRole('button', { name: 'Design report (PDF)' });
  await expect(button).toBeVisible();
  // hold the answer back a little so the progress state can be seen
  await page.route('**/api/projects/*/report', async (route) => {
    const res = await route.fetch();
    await new Promise((r) => setTimeout(r, 400));
    await route.fulfill({ response: res });
  });
  const download = page.waitForEvent('download');
  await button.click();
  await expect(page.getByTestId('pdf-download')).toHaveText(/Rendering the PDF/);
  const file = await download;
  expect(file.suggestedFilename()).toMatch(/^anodyne-.*-report\.pdf$/);
  await expect(page.getByTestId('pdf-download')).toHaveText('Design report (PDF)');
});
