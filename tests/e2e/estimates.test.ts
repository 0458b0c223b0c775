/**
 * An engineer uploads a CSV in the browser (with the progress bar), runs
 * ESPRIT and MUSIC on it, and sees the bearings table and the spectrum.
 * The CSV is fixtures/api/two-sources-m8.csv (written by numpy); its numpy
 * reference bearings are in fixtures/api/reference.json.
 */
import path from 'node:path';
import { describe, expect, it } from 'vitest';
import { DEMO_PASSWORD } from '@/lib/demo/seed';
import reference from '@/fixtures/api/reference.json';
import { browserForFile, shot, signIn } from './browser';

const { open } = browserForFile();

describe('datasets and estimates in the browser', () => {
  it('upload a CSV with progress, run LS-ESPRIT and MUSIC, read the bearings and the spectrum', async () => {
    const { context, page } = await open();
    try {
      await signIn(page, 'engineer@steerwise.test', DEMO_PASSWORD);
      await page.goto('/datasets');
      await shot(page, 'estimates-01-datasets');
      const scenario = reference.scenarios[0];
      await page.getByLabel('Snapshot file').setInputFiles(path.resolve(__dirname, '../../fixtures/api', scenario.csv));
      await page.getByLabel('Name (optional)').fill('Browser upload, two sources');
      // Slow the upload down so the progress bar is visible.
      const cdp = await context.newCDPSession(page);
      await cdp.send('Network.enable');
      await cdp.send('Network.emulateNetworkConditions', {
        offline: false,
        latency: 20,
        downloadThroughput: 200_000,
        uploadThroughput: 20_000,
      });
      await page.getByRole('button', { name: 'Upload', exact: true }).click();
      const bar = page.getByRole('progressbar', { name: 'Upload progress' });
      await bar.waitFor();
      await page.waitForFunction(
        () => Number(document.querySelector('[aria-label="Upload progress"]')?.getAttribute('aria-valuenow') ?? 0) > 0,
      );
      await shot(page, 'estimates-02-upload-progress');
      await page.waitForURL(/\/datasets\/\d+$/, { timeout: 60_000 });
      await cdp.send('Network.emulateNetworkConditions', {
        offline: false,
        latency: 0,
        downloadThroughput: -1,
        uploadThroughput: -1,
      });
      await expect(page.getByTestId('sha256').textContent()).resolves.toBe(scenario.csvSha256);
      await page.getByRole('img', { name: 'Eigenvalues with the MDL and AIC choices' }).waitFor();
      await shot(page, 'estimates-03-dataset-page');

      await page.getByRole('link', { name: 'Estimate bearings' }).click();
      await page.waitForURL(/\/estimates\?dataset=\d+/);
      await page.getByRole('radio', { name: 'Spacing only' }).check();
      await page.getByLabel('d (wavelengths)').fill('0.5');
      // default methods are LS-ESPRIT and MUSIC
      await expect(page.getByRole('checkbox', { name: 'LS-ESPRIT', exact: true }).isChecked()).resolves.toBe(true);
      await expect(page.getByRole('checkbox', { name: 'MUSIC', exact: true }).isChecked()).resolves.toBe(true);
      await shot(page, 'estimates-04-form');
      await page.getByRole('button', { name: 'Estimate bearings' }).click();
      await page.waitForURL(/\/estimates\/\d+$/);
      const table = page.getByRole('table', { name: 'Bearings by method' });
      await table.waitFor({ timeout: 60_000 });
      const text = (await table.textContent()) ?? '';
      // numpy reference (fixtures/api/reference.json), shown to 3 decimals
      for (const b of scenario.bearingsDeg['esprit-ls']) expect(text).toContain(`${b.toFixed(3)}°`);
      for (const b of scenario.bearingsDeg.music) expect(text).toContain(`${b.toFixed(3)}°`);
      expect(text).toMatch(/±/);
      expect(text).toMatch(/95%/);
      await page.getByRole('img', { name: 'Pseudo-spectra' }).waitFor();
      expect(await page.locator('svg[aria-label="Pseudo-spectra"] path').count()).toBe(2);
      await shot(page, 'estimates-05-results');
    } finally {
      await context.close();
    }
  });

  it('a saved array revision can be chosen: the demo line offers r3, r2 (disabled element) and r1, and the run keeps the one picked', async () => {
    const { context, page } = await open();
    try {
      await signIn(page, 'engineer@steerwise.test', DEMO_PASSWORD);
      await page.goto('/estimates');
      await page
        .getByLabel('Dataset')
        .selectOption({ label: 'Port Alder harbour line — Marsh Wren and Coldharbour (400 × 16, CSV)' });
      const arraySelect = page.getByLabel('Array', { exact: true });
      const options = await arraySelect.locator('option').allTextContents();
      expect(options.map((o) => o.replace(/ —.*$/, ''))).toEqual([
        'Port Alder hydrophone line r3',
        'Port Alder hydrophone line r2',
        'Port Alder hydrophone line r1',
      ]);
      expect(options[1]).toContain('has disabled elements');
      // The default is the newest revision without disabled elements.
      await expect(arraySelect.inputValue()).resolves.toMatch(/:3$/);
      const r1 = options[2];
      await arraySelect.selectOption({ label: r1 });
      await page.getByRole('button', { name: 'Estimate bearings' }).click();
      await page.waitForURL(/\/estimates\/\d+$/);
      await page.getByRole('table', { name: 'Bearings by method' }).waitFor({ timeout: 60_000 });
      await expect(page.locator('#main').textContent()).resolves.toContain('Port Alder hydrophone line r1');
      await shot(page, 'estimates-07-pinned-revision');
    } finally {
      await context.close();
    }
  });

  it('a viewer reads runs but has no upload or run form', async () => {
    const { context, page } = await open();
    try {
      await signIn(page, 'viewer@steerwise.test', DEMO_PASSWORD);
      await page.goto('/datasets');
      expect(await page.getByLabel('Snapshot file').count()).toBe(0);
      await page.getByText('Port Alder harbour line — Marsh Wren and Coldharbour').waitFor();
      await page.goto('/estimates');
      expect(await page.getByRole('button', { name: 'Estimate bearings' }).count()).toBe(0);
      await shot(page, 'estimates-06-viewer');
    } finally {
      await context.close();
    }
  });
});
