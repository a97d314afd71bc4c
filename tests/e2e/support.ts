import { expect, type Page } from '@playwright/test';

export const DEMO_PASSWORD = process.env.DEMO_PASSWORD ?? 'anodyne-demo';
export type DemoRole = 'admin' | 'designer' | 'technician' | 'reviewer';

export async function signIn(page: Page, who: DemoRole | { email: string; password: string }) {
  const email = typeof who === 'string' ? `${who}@anodyne.test` : who.email;
  const password = typeof who === 'string' ? DEMO_PASSWORD : who.password;
  await page.goto('/sign-in');
  await page.getByLabel('E-mail').fill(email);
  await page.getByLabel('Password').fill(password);
  await page.getByRole('button', { name: 'Sign in' }).click();
  await expect(page.getByTestId('user-name')).toBeVisible();
}

export async function signOut(page: Page) {
  await page.getByRole('button', { name: 'Sign out' }).click();
  await expect(page).toHaveURL(/sign-in/);
}

export function shot(name: string) {
  return { path: `reports/screenshots/${name}.png`, fullPage: true } as const;
}
