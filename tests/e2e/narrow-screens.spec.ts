// At 390 px (a phone) no page scrolls sideways: wide tables scroll inside their own box.
import { expect, test, type Page } from '@playwright/test';
import { signIn, type DemoRole } from './support';

test.use({ viewport: { width: 390, height: 844 } });

async function firstHref(page: Page, list: string, selector: string) {
  await page.goto(list);
  const a = page.locator(selector).first();
  return (await a.count()) ? a.getAttribute('href') : null;
}

async function expectNoSidewaysScroll(page: Page, path: string) {
  await page.goto(path);
  await page.waitForLoadState('networkidle');
  const width = await page.evaluate(() => document.documentElement.scrollWidth);
  expect(width, `${path} is ${width} px wide at 390 px`).toBeLessThanOrEqual(390);
}

const SCREENS: Record<DemoRole, string[]> = {
  designer: ['/', '/projects', '/tubes', '/tubes/compare', '/reviews'],
  technician: ['/', '/bench', '/projects'],
  reviewer: ['/', '/reviews'],
  admin: ['/', '/admin/users', '/admin/outbox', '/admin/audit', '/tubes'],
};

for (const [role, paths] of Object.entries(SCREENS) as [DemoRole, string[]][]) {
  test(`no sideways scroll at 390 px for the ${role}`, async ({ page }) => {
    await signIn(page, role);
    const extra: string[] = [];
    if (role === 'designer') {
      const project = await firstHref(page, '/projects', 'a[href^="/projects/"]');
      if (project) {
        extra.push(project, `${project}/stages/new`);
        const stage = await firstHref(page, project, 'a[href*="/stages/"]:not([href$="/new"])');
        if (stage) extra.push(stage);
      }
      const tube = await firstHref(page, '/tubes', 'a[href^="/tubes/"]:not([href$="/compare"]):not([href$="/new"])');
      if (tube) extra.push(tube);
    }
    for (const path of [...paths, ...extra]) await expectNoSidewaysScroll(page, path);
  });
}
