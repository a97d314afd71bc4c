import { expect, test, type Page } from '@playwright/test';
import { shot, signIn } from './support';

// The stage editor end to end: a designer builds a common-cathode 12AX7 stage from nothing, watches the
// plots follow the cathode resistor, sees a bad value explained (last good result kept, marked stale),
// saves, reloads and finds the values; two saves on one version end in a 409 the editor recovers from.

async function newProject(page: Page, name: string): Promise<number> {
  const res = await page.request.post('/api/projects', { data: { name } });
  expect(res.status()).toBe(201);
  const body = (await res.json()) as { project: { id: number } };
  return body.project.id;
}

async function settled(page: Page) {
  await expect(page.getByTestId('analysis-state')).toHaveAttribute('data-state', 'current', { timeout: 15_000 });
}

async function chooseTube(page: Page, designation: string) {
  const select = page.getByLabel('Tube', { exact: true });
  const value = await select.locator('option', { hasText: new RegExp(`^${designation} `) }).first().getAttribute('value');
  expect(value, `${designation} is in the tube library`).toBeTruthy();
  await select.selectOption(value!);
}

const field = (page: Page, label: string) => page.getByLabel(label, { exact: true });

test('a designer builds a common-cathode stage, watches it follow the cathode resistor, saves and finds it again', async ({ page }) => {
  await signIn(page, 'designer');
  const projectId = await newProject(page, `Editor walk-through ${Date.now()}`);
  await page.goto(`/projects/${projectId}/stages/new`);
  await expect(page.getByRole('heading', { name: 'New stage' })).toBeVisible();
  await expect(page.getByRole('note', { name: 'Safety caution' })).toBeVisible();

  await field(page, 'Name').fill('V1a input');
  await page.getByLabel('Topology').selectOption('common-cathode');
  await chooseTube(page, '12AX7');
  // typed the way practitioners write values
  await field(page, 'B+ supply').fill('300');
  await field(page, 'Plate resistor').fill('100k');
  await field(page, 'Cathode resistor').fill('1k5');
  await field(page, 'Cathode bypass').fill('22u');
  await field(page, 'Grid leak').fill('1M');
  await field(page, 'Load (next grid leak)').fill('470k');
  await field(page, 'Coupling capacitor').fill('22n');
  await field(page, 'Drive amplitude').fill('0.5');
  await settled(page);

  const chart = page.getByTestId('plate-curves-chart');
  await expect(chart.locator('svg.recharts-surface').first()).toBeVisible();
  const readout = page.getByTestId('op-readout');
  const before = (await readout.textContent()) ?? '';
  const opBefore = await chart.getAttribute('data-op');
  expect(before).toMatch(/Ia \d/);

  // a larger cathode resistor biases the tube further negative: less plate current, higher plate voltage
  await field(page, 'Cathode resistor').fill('2k7');
  await expect(chart).not.toHaveAttribute('data-op', opBefore ?? '', { timeout: 10_000 });
  await settled(page);
  const after = (await readout.textContent()) ?? '';
  expect(after).not.toBe(before);
  const [vaBefore, iaBefore] = (opBefore ?? '0,0').split(',').map(Number);
  const [vaAfter, iaAfter] = ((await chart.getAttribute('data-op')) ?? '0,0').split(',').map(Number);
  // common practice: raising Rk lowers Ia and so raises Va along the same DC load line
  expect(iaAfter!).toBeLessThan(iaBefore!);
  expect(vaAfter!).toBeGreaterThan(vaBefore!);

  // a value that is not a number is explained under its field; the last good result stays, marked stale
  await field(page, 'Cathode resistor').fill('4x7');
  await expect(page.locator('#f-bias-cathodeResistor-error')).toContainText("'4x7' is not a number");
  await expect(page.getByTestId('analysis-state')).toHaveAttribute('data-state', 'invalid');
  await expect(chart).toHaveAttribute('data-stale', 'true');
  await expect(readout).toHaveText(after);
  await expect(page.getByRole('button', { name: 'Save stage' })).toBeEnabled();

  await field(page, 'Cathode resistor').fill('2k7');
  await settled(page);
  await expect(chart).toHaveAttribute('data-stale', 'false');
  // three columns on a wide display; scrolled to the top so the sticky header sits where it belongs
  await page.setViewportSize({ width: 1600, height: 1000 });
  await page.evaluate(() => window.scrollTo(0, 0));
  await page.screenshot(shot('stage-editor-light'));

  await page.getByRole('button', { name: 'Switch to dark theme' }).click();
  await expect(page.locator('html')).toHaveClass(/dark/);
  await page.evaluate(() => window.scrollTo(0, 0));
  await page.screenshot(shot('stage-editor-dark'));
  await page.getByRole('button', { name: 'Switch to light theme' }).click();
  await page.setViewportSize({ width: 1280, height: 720 });

  await page.getByRole('button', { name: 'Save stage' }).click();
  await expect(page).toHaveURL(new RegExp(`/projects/${projectId}/stages/\\d+$`));
  await page.reload();
  await expect(page.getByRole('heading', { name: 'V1a input' })).toBeVisible();
  await expect(field(page, 'Cathode resistor')).toHaveValue('2.7k');
  await expect(field(page, 'Plate resistor')).toHaveValue('100k');
  await expect(field(page, 'Cathode bypass')).toHaveValue('22u');
  await expect(field(page, 'Coupling capacitor')).toHaveValue('22n');
  await expect(page.getByLabel('Tube', { exact: true }).locator('option:checked')).toHaveText(/^12AX7 /);
  await settled(page);
  await expect(readout).toHaveText(after);
});

test('a stale save gets a 409: the typed value stays, "Reload their version" and "Keep mine" both recover', async ({ page }) => {
  await signIn(page, 'designer');
  const projectId = await newProject(page, `Editor conflict ${Date.now()}`);
  await page.goto(`/projects/${projectId}/stages/new`);
  await chooseTube(page, '12AX7');
  await field(page, 'Name').fill('Contested stage');
  await settled(page);
  await page.getByRole('button', { name: 'Save stage' }).click();
  await expect(page).toHaveURL(/\/stages\/\d+$/);
  const stageId = Number(page.url().split('/').pop());
  await expect(page.getByTestId('stage-version')).toHaveText('version 1');

  // someone else saves version 2 behind our back
  const other = await page.request.patch(`/api/stages/${stageId}`, { data: { version: 1, inputs: { plateResistor: 220_000 } } });
  expect(other.status()).toBe(200);

  await field(page, 'Plate resistor').fill('150k');
  await page.getByRole('button', { name: 'Save', exact: true }).click();
  const banner = page.getByTestId('conflict');
  await expect(banner).toContainText('Someone else saved this stage (version 2)');
  await expect(field(page, 'Plate resistor')).toHaveValue('150k');

  await banner.getByRole('button', { name: 'Reload their version' }).click();
  await expect(field(page, 'Plate resistor')).toHaveValue('220k');
  await expect(page.getByTestId('stage-version')).toHaveText('version 2');

  // and again, this time keeping ours
  const third = await page.request.patch(`/api/stages/${stageId}`, { data: { version: 2, name: 'Renamed elsewhere' } });
  expect(third.status()).toBe(200);
  await field(page, 'Plate resistor').fill('150k');
  await page.getByRole('button', { name: 'Save', exact: true }).click();
  await expect(banner).toContainText('version 3');
  await banner.getByRole('button', { name: 'Keep mine' }).click();
  await expect(page.getByText('Saved as version 4.')).toBeVisible();
  const stored = (await (await page.request.get(`/api/stages/${stageId}`)).json()) as { stage: { version: number; inputs: { plateResistor: number } } };
  expect(stored.stage.version).toBe(4);
  expect(stored.stage.inputs.plateResistor).toBe(150_000);
});

test('a technician can study a stage but not change it', async ({ page }) => {
  await signIn(page, 'designer');
  const projectId = await newProject(page, `Editor read-only ${Date.now()}`);
  await page.goto(`/projects/${projectId}/stages/new`);
  await chooseTube(page, '12AX7');
  await settled(page);
  await page.getByRole('button', { name: 'Save stage' }).click();
  await expect(page).toHaveURL(/\/stages\/\d+$/);
  const url = page.url();
  await page.getByRole('button', { name: 'Sign out' }).click();
  await expect(page).toHaveURL(/sign-in/);

  await signIn(page, 'technician');
  await page.goto(url);
  await expect(page.getByText('Read only', { exact: true })).toBeVisible();
  await expect(field(page, 'Plate resistor')).toBeDisabled();
  await expect(page.getByRole('button', { name: 'Save', exact: true })).toHaveCount(0);
  await expect(page.getByTestId('ratings')).toBeVisible();
});
