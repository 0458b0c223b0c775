/**
 * The aperture planner in the built app: an engineer fills the form (with units), sees the chart
 * and the candidates, starts a Monte Carlo verification and sees predicted against simulated,
 * then opens a candidate in the designer (a draft array with the candidate's geometry). A
 * viewer plans too but gets neither action. The page's recommended candidate is checked
 * against the API answer for the same request; the numbers themselves are checked against the
 * numpy reference in tests/lib/planner. Screenshots land in test-results/planner-*.png.
 */
import { describe, expect, it } from 'vitest';
import { DEMO_PASSWORD } from '@/lib/demo/seed';
import { browserForFile, csrf, shot, signIn } from './browser';

const { baseUrl, open } = browserForFile();

describe('planner', () => {
  it('engineer: plan, verify by Monte Carlo, open in the designer', async () => {
    const { context, page } = await open();
    await signIn(page, 'engineer@steerwise.test', DEMO_PASSWORD);
    await page.getByRole('link', { name: /Planner/ }).click();
    await page.waitForURL('**/plans');
    await page.getByLabel('Analysis frequency').fill('3 kHz');
    await page.getByLabel('Medium').selectOption('speed');
    await page.getByLabel('Propagation speed').fill('1.5 km/s');
    await page.getByLabel('Bearing accuracy σ (degrees)').fill('0.5');
    await page.getByLabel('At bearing (degrees from broadside)').fill('10');
    await page.getByLabel('Scan sector ± (degrees)').fill('45');
    await page.getByLabel('Resolve two contacts (degrees apart)').fill('8');
    await page.getByLabel('SNR per element (dB)').fill('0');
    await page.getByLabel('At most N snapshots').fill('1000');
    await page.getByLabel('Method').selectOption('esprit-ls');
    await shot(page, 'planner-form');
    await page.getByRole('button', { name: 'Plan the array' }).click();
    await page.getByTestId('plan-plane-chart').waitFor();
    const table = page.getByRole('table', { name: 'Candidates' });
    const rows = table.locator('tbody tr');
    expect(await rows.count()).toBeGreaterThan(1);

    // the same request over the API gives the recommended candidate the page shows
    const api = await page.request.post('/api/v1/plans', {
      headers: { 'x-csrf-token': await csrf(page) },
      data: {
        frequencyHz: 3000,
        propagationSpeedMps: 1500,
        scanSectorDeg: 45,
        targets: { accuracyDeg: 0.5, atBearingDeg: 10, resolveDeg: 8, resolutionProbability: 0.9 },
        snrDbPerElement: 0,
        snapshots: 1000,
        method: 'esprit-ls',
        smoothing: 'auto',
      },
    });
    expect(api.status()).toBe(200);
    const plan = await api.json();
    const rec = plan.candidates[plan.recommendedIndex];
    await page
      .getByRole('heading', {
        name: `Recommended: ${rec.elements} elements at ${(rec.spacingM * 1000).toPrecision(3)} mm, ${rec.snapshots} snapshots`,
      })
      .waitFor();
    const first = await rows.first().locator('td').allInnerTexts();
    expect(first[0]).toContain(String(rec.elements));
    expect(first[1]).toBe(String(rec.snapshots));
    await shot(page, 'planner-result');

    // sorting by snapshots orders the rows as the header says
    await table.getByRole('button', { name: 'Snapshots' }).click();
    const sort = await table.locator('th', { hasText: 'Snapshots' }).getAttribute('aria-sort');
    expect(['ascending', 'descending']).toContain(sort);
    const ns = await rows.evaluateAll((trs) => trs.map((tr) => Number(tr.querySelectorAll('td')[1].textContent)));
    const ordered = ns.slice().sort((a, b) => (sort === 'ascending' ? a - b : b - a));
    expect(ns).toEqual(ordered);

    // Monte Carlo verification of the recommended candidate
    await page.getByRole('button', { name: `Verify ${rec.elements} elements by Monte Carlo` }).click();
    await page.getByRole('heading', { name: 'Monte Carlo verification' }).waitFor();
    const simulated = page.getByTestId('simulated-rmse');
    await expect.poll(async () => (await simulated.innerText()).trim(), { timeout: 90_000 }).toMatch(/°/);
    await expect
      .poll(async () => (await page.getByTestId('simulated-resolution').innerText()).trim(), { timeout: 90_000 })
      .toMatch(/^P = /);
    const text = await simulated.innerText();
    const rmse = Number(text.split('°')[0]);
    console.info('planner browser check: predicted', rec.predictedStdDeg.toPrecision(3), 'simulated', text);
    expect(Math.abs(rmse / rec.predictedStdDeg - 1)).toBeLessThan(0.25);
    await shot(page, 'planner-verified');

    // open the recommended candidate in the designer
    await page.getByRole('button', { name: `Open ${rec.elements} elements in the designer` }).click();
    await page.waitForURL(/\/arrays\/\d+$/, { timeout: 30_000 });
    await page.getByTestId(`element-${rec.elements - 1}`).waitFor({ timeout: 60_000 });
    const id = Number(page.url().split('/').pop());
    const arr = await (await page.request.get(`/api/v1/arrays/${id}`)).json();
    expect(arr.elements).toBe(rec.elements);
    expect(arr.spacingWavelengths).toBeCloseTo(rec.spacingWavelengths, 9);
    expect(arr.metrics.gratingLobeFreeScanDeg).toBeGreaterThanOrEqual(45);
    await shot(page, 'planner-designer');
    await context.close();
  }, 240_000);

  it('viewer: plans, sees no designer or Monte Carlo actions; an infeasible target names its constraint', async () => {
    const { context, page } = await open();
    await signIn(page, 'viewer@steerwise.test', DEMO_PASSWORD);
    await page.goto(`${baseUrl}/plans`);
    await page.getByRole('button', { name: 'Plan the array' }).click();
    await page.getByTestId('plan-plane-chart').waitFor();
    expect(await page.getByRole('button', { name: /Open .* in the designer/ }).count()).toBe(0);
    expect(await page.getByRole('button', { name: /by Monte Carlo/ }).count()).toBe(0);
    await page.getByLabel('Bearing accuracy σ (degrees)').fill('0.01');
    await page.getByLabel('Most elements').fill('12');
    await page.getByRole('button', { name: 'Plan the array' }).click();
    await page.getByText(/No design meets the targets/).waitFor();
    await page.locator('#plan-max-elements-error').waitFor();
    expect(await page.locator('#plan-max-elements-error').innerText()).toMatch(/needs at least \d+ elements/);
    await shot(page, 'planner-infeasible');
    await context.close();
  }, 120_000);
});
