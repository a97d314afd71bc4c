// Record pages answer with the HTTP status a browser, a crawler or a monitor expects: an unknown id is a 404
// (not the not-found screen sent with 200), and no page is wider than a phone's screen.
import { expect, test } from '@playwright/test';
import { signIn } from './support';

test('unknown record ids answer 404 with the not-found screen', async ({ page }) => {
  await signIn(page, 'admin');
  for (const path of ['/projects/99999', '/projects/99999/stages/1', '/tubes/99999', '/reviews/99999', '/projects/abc']) {
    const res = await page.goto(path);
    expect(res?.status(), path).toBe(404);
    await expect(page.getByRole('heading', { name: 'Nothing at this address' })).toBeVisible();
  }
});

test('a known project answers 200', async ({ page }) => {
  await signIn(page, 'designer');
  await page.goto('/projects');
  const href = await page.locator('a[href^="/projects/"]').first().getAttribute('href');
  expect(href).toMatch(/^\/projects\/\d+$/);
  const res = await page.goto(href!);
  expect(res?.status()).toBe(200);
});

test('addresses the fuzz found answering 500: malformed escapes and repeated parameters', async ({ page }) => {
  await signIn(page, 'designer');
  for (const path of ['/projects/%ED%A0%80', '/tubes/%ED%A0%80', '/api/projects/%ED%A0%80']) {
    const res = await page.request.get(path);
    expect(res.status(), path).toBe(400);
  }
  const compare = await page.goto('/tubes/compare?ids=1,2&ids=3');
  expect(compare?.status()).toBe(200);
  await expect(page.getByRole('heading', { name: 'Compare tube types' })).toBeVisible();
});
