import { expect, request, type APIRequestContext, type Page } from '@playwright/test';

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

/** An API client signed in through next-auth's credentials flow (no browser), for specs that set up their own data. */
export async function apiAs(role: DemoRole | 'anonymous'): Promise<APIRequestContext> {
  const baseURL = `http://localhost:${process.env.E2E_PORT ?? 3100}`;
  const ctx = await request.newContext({ baseURL, maxRedirects: 0, extraHTTPHeaders: { origin: baseURL } });
  if (role === 'anonymous') return ctx;
  const { csrfToken } = (await (await ctx.get('/api/auth/csrf')).json()) as { csrfToken: string };
  const res = await ctx.post('/api/auth/callback/credentials', { form: { csrfToken, email: `${role}@anodyne.test`, password: DEMO_PASSWORD, json: 'true' } });
  expect(res.status(), `sign-in as ${role}`).toBeLessThan(400);
  expect((await ctx.get('/api/me')).status(), `session of ${role}`).toBe(200);
  return ctx;
}

/** The JSON body of a 2xx answer (fails the test with the answer otherwise). */
export async function okJson<T>(res: Awaited<ReturnType<APIRequestContext['get']>>): Promise<T> {
  expect(res.ok(), `${res.url()} → ${res.status()} ${await res.text()}`).toBe(true);
  return (await res.json()) as T;
}
