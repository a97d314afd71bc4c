import { expect, test, type Page } from '@playwright/test';
import { shot, signIn } from './support';

// The phase splitters in the stage editor: a designer picks the long-tailed pair and the split-load stage,
// starts from their usual values with a library tube, reads both outputs and the balance, and saves.

async function newProject(page: Page, name: string): Promise<number> {
  const res = await page.request.post('/api/projects', { data: { name } });
  expect(res.status()).toBe(201);
  return ((await res.json()) as { project: { id: number } }).project.id;
}

async function settled(page: Page) {
  await expect(page.getByTestId('analysis-state')).toHaveAttribute('data-state', 'current', { timeout: 20_000 });
}

async function chooseTube(page: Page, designation: string) {
  const select = page.getByLabel('Tube', { exact: true });
  const value = await select.locator('option', { hasText: new RegExp(`^${designation} `) }).first().getAttribute('value');
  expect(value, `${designation} is in the tube library`).toBeTruthy();
  await select.selectOption(value!);
}

const field = (page: Page, label: string) => page.getByLabel(label, { exact: true });

test('a designer analyses and saves a long-tailed pair and a split-load splitter', async ({ page }) => {
  await signIn(page, 'designer');
  const projectId = await newProject(page, `Splitters ${Date.now()}`);

  await page.goto(`/projects/${projectId}/stages/new`);
  await field(page, 'Name').fill('V2 phase inverter');
  await page.getByLabel('Topology').selectOption('long-tailed-pair');
  await chooseTube(page, '12AX7');
  await expect(field(page, 'Plate resistor, inverting')).toHaveValue('100k');
  await expect(field(page, 'Tail resistor')).toHaveValue('22k');
  await settled(page);
  const inverting = page.getByTestId('output-inverting');
  const nonInverting = page.getByTestId('output-non-inverting');
  await expect(inverting).toBeVisible();
  await expect(nonInverting).toBeVisible();
  // the minus may be typeset (U+2212)
  await expect(page.getByTestId('output-inverting-gain')).toHaveText(/^[−-]\d/);
  await expect(page.getByTestId('output-non-inverting-gain')).toHaveText(/^\d/);
  // a finite tail: the non-inverting side is a fraction of a dB low
  await expect(page.getByTestId('balance-ratio')).toHaveText(/^[−-]0\.\d\d dB$/);

  // trimming the non-inverting plate resistor up moves the balance toward 0 dB
  const ratio = async () => Number((await page.getByTestId('balance-ratio').textContent())!.replace(' dB', '').replace('−', '-'));
  const beforeText = (await page.getByTestId('balance-ratio').textContent())!;
  const before = await ratio();
  await field(page, 'Plate resistor, non-inverting').fill('104k');
  await expect(page.getByTestId('balance-ratio')).not.toHaveText(beforeText, { timeout: 15_000 });
  await settled(page);
  const after = await ratio();
  expect(Math.abs(after)).toBeLessThan(Math.abs(before));
  await page.screenshot(shot('splitter-long-tailed-pair'));
  await page.getByRole('button', { name: 'Save stage' }).click();
  await expect(page).toHaveURL(new RegExp(`/projects/${projectId}/stages/\\d+`), { timeout: 15_000 });

  await page.goto(`/projects/${projectId}/stages/new`);
  await field(page, 'Name').fill('V2 concertina');
  await page.getByLabel('Topology').selectOption('split-load');
  await chooseTube(page, '12AU7');
  await expect(field(page, 'Cathode load')).toHaveValue('22k');
  await settled(page);
  await expect(page.getByTestId('output-plate')).toBeVisible();
  await expect(page.getByTestId('output-cathode')).toBeVisible();
  await expect(page.getByTestId('headroom-explanation')).toContainText('peaks');
  await page.screenshot(shot('splitter-split-load'));
  await page.getByRole('button', { name: 'Save stage' }).click();
  await expect(page).toHaveURL(new RegExp(`/projects/${projectId}/stages/\\d+`), { timeout: 15_000 });
});
