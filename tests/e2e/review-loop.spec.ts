// The whole review loop: a technician records a failing bench check, the designer changes the stage and submits,
// the reviewer approves, and the summary with its PDF arrives in the SMTP sink.
// The designer's stage edit goes through the stage API from the page (page.request), so this spec does not depend on
// the stage editor's markup; the bench, project (Submit for review) and review screens are driven through the UI.
import { expect, test, type APIRequestContext } from '@playwright/test';
import { signIn, signOut } from './support';

const SINK = process.env.MAIL_SINK_URL ?? 'http://127.0.0.1:2580';
const PROJECT = `Review loop ${Date.now()}`;

async function json<T>(res: Awaited<ReturnType<APIRequestContext['get']>>): Promise<T> {
  expect(res.ok(), `${res.url()} → ${res.status()} ${await res.text()}`).toBe(true);
  return (await res.json()) as T;
}

test('bench check → change → submit → approve → summary mail with PDF', async ({ page }) => {
  // Setup as the designer: a project with one 12AX7 common-cathode stage (B+ 330 V, Ra 100 kΩ, Rk 1.5 kΩ).
  await signIn(page, 'designer');
  const { tubes } = await json<{ tubes: { id: number; designation: string }[] }>(await page.request.get('/api/tubes/options'));
  const tubeId = tubes.find((t) => t.designation === '12AX7')!.id;
  const { project } = await json<{ project: { id: number } }>(await page.request.post('/api/projects', { data: { name: PROJECT } }));
  const { stage } = await json<{ stage: { id: number; version: number; analysis: { operatingPoint: { plateVoltage: number; cathodeVoltage: number } } } }>(
    await page.request.post(`/api/projects/${project.id}/stages`, {
      data: { name: 'V1 input', topology: 'common-cathode', tubeId, supply: 330, plateResistor: 100000, gridResistor: 1000000, bias: { kind: 'cathode', cathodeResistor: 1500, cathodeBypass: 0.000022 } },
    }),
  );
  const op = stage.analysis.operatingPoint;
  await signOut(page);

  // The technician records a hot bias: the cathode reads 45 % above the design → plate current far above design → fail.
  await signIn(page, 'technician');
  await page.goto(`/bench?stage=${stage.id}`);
  await expect(page.getByTestId('bench-expected')).toBeVisible();
  await expect(page.getByRole('note', { name: 'Safety caution' })).toBeVisible();
  await page.getByLabel('Supply (B+)').fill('330');
  await page.getByLabel('Plate to ground').fill((op.plateVoltage - 45).toFixed(1));
  await page.getByLabel('Cathode to ground').fill((op.cathodeVoltage * 1.45).toFixed(3));
  await page.getByLabel('Tube serial or batch').fill('LOOP-01');
  await page.getByRole('button', { name: 'Record bench check' }).click();
  const result = page.getByTestId('bench-result');
  await expect(result.locator('[data-status="fail"]').first()).toBeVisible();
  await expect(result.getByTestId('bench-advice')).toContainText('Plate current');
  await expect(result.getByTestId('bench-advice')).toContainText('above design');
  await page.getByLabel('Failing only').check();
  await expect(page.getByTestId('bench-history').locator('details[data-verdict="fail"]')).toHaveCount(1);
  await signOut(page);

  // The designer raises the cathode resistor (through the stage API) and submits the project for review.
  await signIn(page, 'designer');
  const edited = await page.request.patch(`/api/stages/${stage.id}`, { data: { version: stage.version, inputs: { bias: { kind: 'cathode', cathodeResistor: 2200, cathodeBypass: 0.000022 } } } });
  await json(edited);
  await page.goto(`/projects/${project.id}`);
  await page.getByTestId('submit-for-review').click();
  await page.getByLabel('Note to the reviewers (optional)').fill('Cathode resistor raised after the bench check.');
  await page.getByRole('button', { name: 'Submit revision' }).click();
  await expect(page).toHaveURL(/\/reviews\/\d+$/);
  const revision = { id: Number(page.url().split('/').pop()), number: 1 };
  await expect(page.getByTestId('decision-blocked')).toContainText('Only reviewers');
  await expect(page.getByRole('button', { name: 'Approve' })).toBeDisabled();
  await signOut(page);

  // The reviewer finds it on the reviews page, reads the frozen content and approves.
  await signIn(page, 'reviewer');
  await page.goto('/reviews');
  await page.getByTestId('open-revisions').getByRole('link', { name: PROJECT }).click();
  await expect(page).toHaveURL(new RegExp(`/reviews/${revision.id}$`));
  await expect(page.getByTestId('content-hash')).toHaveText(/^[0-9a-f]{64}$/);
  await expect(page.getByTestId('hash-check')).toContainText('matches');
  await expect(page.getByTestId('frozen-results')).toContainText('V1 input');
  await page.getByLabel(/Comment/).fill('Bias point now sits where the bench check said it should.');
  await page.getByRole('button', { name: 'Approve' }).click();
  await expect(page.getByTestId('decision')).toContainText('Approved by');

  // The summary reaches the SMTP sink, with the revision's PDF attached.
  const subject = `Approved: ${PROJECT}, revision ${revision.number}`;
  await expect
    .poll(
      async () => {
        const res = await fetch(`${SINK}/messages?full=1`);
        const body = (await res.json()) as { messages: { subject: string; to: string[]; attachments: { filename: string; contentType: string; contentBase64?: string }[] }[] };
        const m = body.messages.find((x) => x.subject === subject);
        if (!m) return 'not yet';
        const pdf = m.attachments.find((a) => a.filename.endsWith('.pdf'));
        const magic = pdf?.contentBase64 ? Buffer.from(pdf.contentBase64, 'base64').subarray(0, 5).toString() : '';
        return `${m.to.includes('designer@anodyne.test')} ${pdf?.contentType} ${magic}`;
      },
      { timeout: 30_000, intervals: [500] },
    )
    .toBe('true application/pdf %PDF-');
});
