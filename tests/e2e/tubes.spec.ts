// Tube library in the browser: a designer adds a type, uploads measured curves, fits a Koren model, accepts it and
// sees it on the type's page; the library table, a type page and the comparison in light and dark themes.
import path from 'node:path';
import { expect, test } from '@playwright/test';
import { shot, signIn } from './support';

const demoCsv = path.resolve(__dirname, '../../seeders/data/demo-12ax7-curves.csv');

test('the library table searches aliases and a type page shows curves, sourced ratings and models', async ({ page }) => {
  await signIn(page, 'technician');
  await page.goto('/tubes');
  const table = page.getByTestId('tube-table');
  await expect(table.getByRole('link', { name: '6L6GC' })).toBeVisible();
  await page.screenshot(shot('tubes-library-light'));
  await page.getByLabel('Filter rows').fill('ECC83');
  await expect(table.getByRole('link')).toHaveCount(1);
  await table.getByRole('link', { name: '12AX7' }).click();

  await expect(page.getByRole('heading', { level: 1, name: /12AX7/ })).toBeVisible();
  await expect(page.getByRole('note', { name: 'Safety caution' })).toBeVisible();
  await expect(page.getByTestId('plate-curves-chart').first()).toBeVisible();
  await expect(page.getByTestId('ratings')).toContainText('Wikipedia 12AX7 infobox citing Sylvania');
  await expect(page.getByTestId('models')).toContainText('Koren 1996');
  await expect(page.getByTestId('models')).toContainText('default');
  // reference sheet §4.3: Koren 12AX7 reads 21 % low at the 250 V / −2 V datasheet point
  await expect(page.getByTestId('typical-points')).toContainText('−21 %');
  // a technician reads but does not upload or fit
  await expect(page.getByRole('button', { name: /Fit Koren/ })).toHaveCount(0);
  await expect(page.getByRole('form', { name: 'Upload measured curves' })).toHaveCount(0);
  await page.screenshot(shot('tubes-type-light'));
  await page.getByRole('button', { name: 'Switch to dark theme' }).click();
  await expect(page.locator('html')).toHaveClass(/dark/);
  await page.screenshot(shot('tubes-type-dark'));
  await page.goto('/tubes');
  await page.screenshot(shot('tubes-library-dark'));
  await page.getByRole('button', { name: 'Switch to light theme' }).click();
});

test('a designer adds a type, uploads a CSV, runs a fit, accepts it and sees the new model', async ({ page }) => {
  const designation = `ZX-${Date.now().toString(36).toUpperCase()}`;
  await signIn(page, 'designer');
  await page.goto('/tubes/new');
  await page.getByLabel('Designation').fill(designation);
  await page.getByLabel('Family').selectOption('triode');
  await page.getByLabel('Plate voltage', { exact: true }).fill('300');
  await page.locator('#rating-plateVoltage-source').fill('entered by hand');
  await page.getByLabel('Plate dissipation').fill('1');
  // a value without a source is refused by the shared schema before anything is sent
  await page.getByRole('button', { name: 'Add to the library' }).click();
  await expect(page.getByText(/where this value comes from/)).toBeVisible();
  await page.locator('#rating-plateDissipation-source').fill('entered by hand');
  await page.getByRole('button', { name: 'Add to the library' }).click();

  await expect(page.getByRole('heading', { level: 1, name: designation })).toBeVisible();
  await expect(page.getByTestId('no-model')).toBeVisible();

  // a bad file first: the message names the line and column, nothing is stored
  await page.getByLabel('CSV file').setInputFiles({ name: 'bad.csv', mimeType: 'text/csv', buffer: Buffer.from('grid_voltage,plate_voltage,plate_curent\n0,100,1\n') });
  await page.getByRole('button', { name: 'Upload curve set' }).click();
  await expect(page.getByRole('form', { name: 'Upload measured curves' }).getByRole('alert')).toContainText('line 1, column "plate_curent"');
  await expect(page.getByTestId('curve-sets')).toHaveCount(0);

  await page.getByLabel('CSV file').setInputFiles(demoCsv);
  await page.getByLabel('Currents in').selectOption('mA');
  await page.getByLabel('Name (optional)').fill('Bench sample E2E');
  await page.getByRole('button', { name: 'Upload curve set' }).click();
  await expect(page.getByText('Stored 369 points.')).toBeVisible();
  const bench = page.getByTestId('fit-workbench');
  await expect(bench).toContainText('Bench sample E2E');

  await bench.getByRole('button', { name: 'Fit Koren triode model' }).click();
  await expect(bench.getByTestId('fit-summary')).toBeVisible();
  await expect(bench.getByTestId('rms-error')).toHaveText(/^\d+\.\d\d %$/);
  await expect(bench.getByTestId('fit-summary')).toContainText('proposed');
  await page.screenshot(shot('tubes-fit-light'));
  await page.getByRole('button', { name: 'Switch to dark theme' }).click();
  await page.screenshot(shot('tubes-fit-dark'));
  await page.getByRole('button', { name: 'Switch to light theme' }).click();

  await bench.getByLabel('Model name').fill('E2E bench fit');
  await bench.getByRole('button', { name: 'Accept as a model' }).click();
  await expect(bench.getByRole('status')).toContainText('Accepted as the model “E2E bench fit”, now the default');
  const models = page.getByTestId('models');
  await expect(models).toContainText('E2E bench fit');
  await expect(models).toContainText(/Source: fitted from curve set \d+/);
  await expect(page.getByTestId('plate-curves-chart').first()).toBeVisible();

  await page.reload();
  await expect(page.getByTestId('models')).toContainText('E2E bench fit');
  await expect(page.getByTestId('models')).toContainText('default');
});

test('compare overlays two or three types', async ({ page }) => {
  await signIn(page, 'reviewer');
  await page.goto('/tubes/compare');
  await page.getByLabel('Type 1').selectOption({ label: '12AX7' });
  await page.getByLabel('Type 2').selectOption({ label: '12AU7' });
  await page.getByLabel('Type 3').selectOption({ label: '12AT7' });
  const chart = page.getByTestId('compare-chart');
  await expect(chart).toBeVisible();
  await expect(chart.getByLabel('Legend')).toContainText('12AT7 (Koren 1996)');
  await expect(page).toHaveURL(/ids=\d+,\d+,\d+/);
  await page.screenshot(shot('tubes-compare-light'));
  await page.getByRole('button', { name: 'Transfer curves' }).click();
  await page.getByRole('button', { name: 'Switch to dark theme' }).click();
  await page.screenshot(shot('tubes-compare-dark'));
  await page.getByRole('button', { name: 'Switch to light theme' }).click();
});

test('retired types are hidden from the library list until the switch shows them', async ({ page, baseURL }) => {
  await signIn(page, 'admin');
  const designation = `RT${Date.now() % 100000}`;
  const headers = { origin: baseURL!, 'content-type': 'application/json' };
  const created = await page.request.post('/api/tubes', { headers, data: { designation, family: 'triode' } });
  expect(created.status()).toBe(201);
  const { tube } = await created.json();
  const retired = await page.request.patch(`/api/tubes/${tube.id}`, { headers, data: { retired: true } });
  expect(retired.status()).toBe(200);

  await page.goto('/tubes');
  const table = page.getByTestId('tube-table');
  await expect(table.getByRole('link', { name: '12AX7', exact: true })).toBeVisible();
  await expect(table.getByRole('link', { name: designation, exact: true })).toHaveCount(0);
  await page.getByTestId('show-retired').check();
  await expect(table.getByRole('link', { name: designation, exact: true })).toBeVisible();
  await expect(table.getByRole('row').filter({ hasText: designation })).toContainText('retired');
});
