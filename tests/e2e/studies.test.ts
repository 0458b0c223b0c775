/**
 * Studies in the built app: an engineer opens the seeded demo study (chart and
 * table), then creates a small study through the form, sees the progress bar,
 * then the log–log chart and the numbers table; a viewer sees no New study.
 * The page's numbers are checked against the stored result read over the API
 * (the result itself is checked against the closed-form CRB in the unit tests).
 * Screenshots land in test-results/studies-*.png.
 */
import { describe, expect, it } from 'vitest';
import { DEMO_PASSWORD } from '@/lib/demo/seed';
import { DEMO_STUDY_NAME } from '@/lib/demo/studies';
import { browserForFile, shot, signIn } from './browser';

const { baseUrl, open } = browserForFile();

describe('studies', () => {
  it('engineer: demo study, then a new study with progress, chart and table', async () => {
    const { context, page } = await open();
    await signIn(page, 'engineer@steerwise.test', DEMO_PASSWORD);
    await page.goto(`${baseUrl}/studies`);
    await page.getByRole('link', { name: DEMO_STUDY_NAME }).click();
    await page.getByRole('img', { name: /RMSE and square root/ }).waitFor();
    expect(await page.getByRole('table', { name: 'Study results' }).locator('tbody tr').count()).toBe(14); // 7 SNR values × 2 methods
    await shot(page, 'studies-demo');

    await page.goto(`${baseUrl}/studies`);
    await page.getByRole('link', { name: 'New study' }).click();
    await page.locator('#study-name').fill('Browser check: M sweep');
    expect(await page.getByLabel('Elements M').isEnabled()).toBe(true);
    await page.getByLabel('Swept variable').selectOption('elements');
    // the sweep sets M, so the Elements M field is disabled and says so
    expect(await page.getByLabel('Elements M').isDisabled()).toBe(true);
    await page.getByText('Set by the sweep values below').waitFor();
    await page.getByLabel('Values (elements)').fill('8, 12, 16, 24');
    await page.getByLabel('Trials per point').fill('200');
    await page.getByLabel('Bearings (degrees)').fill('0');
    await page.getByLabel('Powers (dB, per-element SNR)').fill('0');
    await page.getByLabel('TLS-ESPRIT').uncheck();
    await shot(page, 'studies-form');
    await page.getByRole('button', { name: 'Start study' }).click();
    await page.waitForURL(/\/studies\/\d+$/);
    // progress first (the study takes about a second or two), then the chart
    const bar = page.getByRole('progressbar', { name: 'Study progress' });
    await bar.waitFor({ timeout: 10_000 });
    await shot(page, 'studies-progress');
    await page.getByRole('img', { name: /RMSE and square root/ }).waitFor({ timeout: 60_000 });
    expect(await bar.count()).toBe(0);
    const rows = page.getByRole('table', { name: 'Study results' }).locator('tbody tr');
    expect(await rows.count()).toBe(4);
    await shot(page, 'studies-result');

    // the table shows the stored numbers
    const id = Number(page.url().split('/').pop());
    const api = await page.request.get(`${baseUrl}/api/v1/studies/${id}`);
    const body = await api.json();
    expect(body.status).toBe('done');
    const first = body.result.points.find((p: { value: number }) => p.value === 8);
    const cells = await rows.first().locator('td').allInnerTexts();
    expect(cells[0]).toBe('8');
    expect(Number(cells[2])).toBeCloseTo(Number(first.methods[0].rmseDeg.toPrecision(4)), 10);
    const slope = body.result.slopes.find((s: { method: string }) => s.method === 'root-music').slope;
    await page
      .getByText(`slope ${slope.toFixed(2)}`)
      .first()
      .waitFor();
    console.info(
      'browser M sweep: root-MUSIC slope',
      slope.toFixed(3),
      'RMSE/√CRB',
      body.result.points
        .map((p: { methods: { rmseOverCrb: number }[] }) => p.methods[0].rmseOverCrb.toFixed(3))
        .join(' '),
    );
    await context.close();
  }, 120_000);

  it('a bad value is shown under its field', async () => {
    const { context, page } = await open();
    await signIn(page, 'engineer@steerwise.test', DEMO_PASSWORD);
    await page.goto(`${baseUrl}/studies/new`);
    await page.getByLabel('Trials per point').fill('0');
    await page.getByRole('button', { name: 'Start study' }).click();
    await page.locator('#study-trials-error').waitFor();
    expect(await page.locator('#study-trials-error').textContent()).toContain('trials');
    await context.close();
  }, 60_000);

  it('viewer reads studies but has no New study', async () => {
    const { context, page } = await open();
    await signIn(page, 'viewer@steerwise.test', DEMO_PASSWORD);
    await page.goto(`${baseUrl}/studies`);
    await page.getByRole('link', { name: DEMO_STUDY_NAME }).waitFor();
    expect(await page.getByRole('link', { name: 'New study' }).count()).toBe(0);
    await page.goto(`${baseUrl}/studies/new`);
    await page
      .getByText(/cannot run studies/)
      .first()
      .waitFor();
    await shot(page, 'studies-viewer-refused');
    await context.close();
  }, 60_000);
});
