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
import { simulateSnapshots } from '@/lib/doa/sim/simulate';
import { browserForFile, csrf, shot, signIn } from './browser';

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
      // Both spectra are drawn by ECharts (SVG renderer) inside the chart's box.
      await expect(page.getByTestId('spectrum-plot').locator('svg path').count()).resolves.toBeGreaterThan(2);
      await shot(page, 'estimates-05-results');
    } finally {
      await context.close();
    }
  });

  it('the spectrum opens zoomed on two close bearings; the cursor readout at each peak equals the API spectrum', async () => {
    const { context, page } = await open();
    try {
      await signIn(page, 'engineer@steerwise.test', DEMO_PASSWORD);
      // Two sources 3° apart (below the 7.2° Rayleigh gap of 16 elements at λ/2), 20 dB SNR, seeded.
      const x = simulateSnapshots({
        elements: 16,
        spacingWavelengths: 0.5,
        bearingsDeg: [10, 13],
        noisePower: 0.01,
        snapshots: 200,
        seed: 12,
      });
      const rows = (part: Float64Array) =>
        Array.from({ length: x.cols }, (_, n) => Array.from({ length: x.rows }, (_, m) => part[m * x.cols + n]));
      const created = await page.request.post('/api/v1/estimates', {
        data: {
          snapshots: { re: rows(x.re), im: rows(x.im) },
          array: { elements: 16, spacingWavelengths: 0.5 },
          methods: ['music', 'esprit-ls'],
          sourceCount: 2,
          includeSpectrum: true,
        },
        headers: { 'x-csrf-token': await csrf(page) },
      });
      expect(created.status()).toBe(201);
      const { id } = (await created.json()) as { id: number };
      const run = await (await page.request.get(`/api/v1/estimates/${id}`)).json();
      const music = run.results.find((r: { method: string }) => r.method === 'music');
      const spectrum = music.spectrum as { startDeg: number; stepDeg: number; valuesDb: (number | null)[] };
      expect(spectrum.stepDeg).toBe(0.01);
      const bearings = music.bearingsDeg as number[];
      expect(bearings).toHaveLength(2);
      expect(bearings[1] - bearings[0]).toBeGreaterThan(2);
      expect(bearings[1] - bearings[0]).toBeLessThan(4);

      await page.goto(`/estimates/${id}`);
      const plot = page.getByTestId('spectrum-plot');
      await plot.waitFor();
      await page.waitForFunction(
        () => document.querySelector('[data-testid="spectrum-plot"]')?.getAttribute('data-zoom-from') !== '',
      );
      const frame = async () => {
        const a = (k: string) => plot.getAttribute(`data-${k}`).then(Number);
        return {
          from: await a('zoom-from'),
          to: await a('zoom-to'),
          left: await a('plot-left'),
          right: await a('plot-right'),
          top: await a('plot-top'),
          bottom: await a('plot-bottom'),
        };
      };
      // Opens on the bearings: both inside a window a few degrees wide, so neighbouring 0.01° points are > 1 px apart.
      const f = await frame();
      expect(f.from).toBeLessThan(bearings[0]);
      expect(f.to).toBeGreaterThan(bearings[1]);
      expect((f.right - f.left) / ((f.to - f.from) / 0.01)).toBeGreaterThan(1);
      await plot.scrollIntoViewIfNeeded();
      const box = (await plot.boundingBox())!;
      for (const b of bearings) {
        const px = box.x + f.left + ((b - f.from) / (f.to - f.from)) * (f.right - f.left);
        await page.mouse.move(px, box.y + (f.top + f.bottom) / 2);
        const row = page.locator('.chart-readout-row[data-method="music"]');
        await row.waitFor();
        const shownBearing = Number(await row.getAttribute('data-bearing'));
        const shownDb = Number(await row.getAttribute('data-db'));
        const i = Math.round((shownBearing - spectrum.startDeg) / spectrum.stepDeg);
        // The readout names the grid point of the peak and its value as the API stores it.
        expect(Math.abs(shownBearing - b)).toBeLessThan(1e-6);
        expect(shownDb).toBe(spectrum.valuesDb[i]);
        expect(shownDb).toBeGreaterThan(spectrum.valuesDb[i - 1]!);
        expect(shownDb).toBeGreaterThanOrEqual(spectrum.valuesDb[i + 1]!);
        await expect(row.textContent()).resolves.toContain(`${b.toFixed(2)}°`);
      }
      await shot(page, 'estimates-08-spectrum-zoomed');

      // "Full scan" shows −90…90°; the wheel zooms back in.
      await page.getByTestId('spectrum-full-scan').click();
      await page.waitForTimeout(300);
      const full = await frame();
      expect(full.from).toBeCloseTo(-90, 6);
      expect(full.to).toBeCloseTo(90, 6);
      await page.mouse.move(box.x + (full.left + full.right) / 2, box.y + (full.top + full.bottom) / 2);
      await page.mouse.wheel(0, -600);
      await page.waitForTimeout(400);
      const wheel = await frame();
      expect(wheel.to - wheel.from).toBeLessThan(170);
      await shot(page, 'estimates-09-spectrum-full-scan-wheel');
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
