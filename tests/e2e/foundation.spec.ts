import { expect, test } from '@playwright/test';
import { shot, signIn, signOut, type DemoRole } from './support';

const NAV: Record<DemoRole, { sees: string[]; hidden: string[]; heading: RegExp }> = {
  admin: { sees: ['Projects', 'Tube library', 'Bench', 'Reviews', 'Users', 'Outbox', 'Audit log'], hidden: [], heading: /Workshop administration/ },
  designer: { sees: ['Projects', 'Tube library', 'Reviews'], hidden: ['Bench', 'Users', 'Outbox', 'Audit log'], heading: /Your design work/ },
  technician: { sees: ['Projects', 'Tube library', 'Bench'], hidden: ['Reviews', 'Users', 'Outbox', 'Audit log'], heading: /At the bench/ },
  reviewer: { sees: ['Projects', 'Tube library', 'Reviews'], hidden: ['Bench', 'Users', 'Outbox', 'Audit log'], heading: /Reviews/ },
};

for (const role of Object.keys(NAV) as DemoRole[]) {
  test(`${role} signs in through the form and sees their own navigation and home page`, async ({ page }) => {
    await signIn(page, role);
    const nav = page.getByRole('navigation', { name: 'Main' });
    for (const label of NAV[role].sees) await expect(nav.getByRole('link', { name: label, exact: true })).toBeVisible();
    for (const label of NAV[role].hidden) await expect(nav.getByRole('link', { name: label, exact: true })).toHaveCount(0);
    await expect(page.getByRole('heading', { level: 1 })).toHaveText(NAV[role].heading);
    await expect(page.getByRole('note', { name: 'Safety caution' })).toContainText('Lethal voltages');
    await expect(page.getByTestId('user-role')).toHaveText(role);
    await page.screenshot(shot(`home-${role}`));
    await signOut(page);
  });
}

test('a wrong password is refused on the form with a message', async ({ page }) => {
  await page.goto('/sign-in');
  await page.getByLabel('E-mail').fill('reviewer@anodyne.test');
  await page.getByLabel('Password').fill('wrong password');
  await page.getByRole('button', { name: 'Sign in' }).click();
  await expect(page.locator('form').getByRole('alert')).toContainText(/do not match/);
  await page.screenshot(shot('sign-in-refused'));
});

test('a signed-out visitor is sent to sign-in, and a role without access gets the 403 screen', async ({ page }) => {
  await page.goto('/admin/users');
  await expect(page).toHaveURL(/sign-in/);
  await signIn(page, 'technician');
  await page.goto('/admin/users');
  await expect(page.getByRole('heading', { name: /does not open this screen/ })).toBeVisible();
});

test('admin users page: sortable, filterable, and the dark theme is readable', async ({ page }) => {
  await signIn(page, 'admin');
  await page.getByRole('link', { name: 'Users', exact: true }).click();
  const table = page.getByTestId('users-table');
  await expect(table).toContainText('designer@anodyne.test');
  await page.getByLabel('Filter rows').fill('technician');
  await expect(table.locator('tbody tr')).toHaveCount(1);
  await page.getByLabel('Filter rows').fill('');
  await page.getByRole('button', { name: /E-mail/ }).click();
  await expect(table.locator('tbody tr').first()).toContainText('admin@anodyne.test');
  await page.getByRole('button', { name: /Switch to dark theme/ }).click();
  await expect(page.locator('html')).toHaveClass(/dark/);
  await page.screenshot(shot('admin-users-dark'));
  await page.getByRole('button', { name: /Switch to light theme/ }).click();
  await page.screenshot(shot('admin-users-light'));
});
