/**
 * Bearing–time records in the built app. An engineer opens the seeded demo
 * record (lib/demo/bearing-time.ts), sees the image and the tracks, points at the image and
 * reads time, bearing and level, which must be the stored grid's value for that
 * cell (read back over the API), clicks a block and sees its spectrum and
 * bearings; then starts a new record through the form on the demo recording and sees
 * the progress bar, then the result. A viewer sees records read-only and cannot
 * start one. Screenshots land in test-results/btr-*.png.
 */
import type { Page } from 'playwright-core';
import { describe, expect, it } from 'vitest';
import { DEMO_PASSWORD } from '@/lib/demo/seed';
import { DEMO_BTR_NAME } from '@/lib/demo/bearing-time';
import { browserForFile, csrf, shot, signIn } from './browser';

const { baseUrl, open } = browserForFile();

type ListItem = { id: number; name: string; status: string; datasetId: number | null };

async function json<T>(page: Page, url: string): Promise<T> {
  const res = await page.request.get(url);
  expect(res.status(), url).toBe(200);
  return (await res.json()) as T;
}

/** The seeded demo record (lib/demo/bearing-time.ts), finished at seed time. */
async function demoRecord(page: Page): Promise<{ id: number; name: string; datasetId: number }> {
  const { items } = await json<{ items: ListItem[] }>(page, '/api/v1/bearing-time-records');
  const demo = items.find((r) => r.name === DEMO_BTR_NAME);
  expect(demo?.status).toBe('done');
  return { id: demo!.id, name: demo!.name, datasetId: demo!.datasetId! };
}

describe('bearing–time records', () => {
  it('engineer: the record with readout and block detail, then a new record with progress', async () => {
    const { context, page } = await open({ width: 1440, height: 1100 });
    await signIn(page, 'engineer@steerwise.test', DEMO_PASSWORD);
    const record = await demoRecord(page);

    await page.goto(`${baseUrl}/bearing-time-records`);
    await page.getByRole('link', { name: 'Bearing–time', exact: false }).first().waitFor();
    await page.getByRole('link', { name: record.name }).click();
    await page.waitForURL(/\/bearing-time-records\/\d+$/);
    const plot = page.getByTestId('btr-plot');
    await page.locator('[data-testid="btr-plot"][data-image-ready="true"]').waitFor({ timeout: 30_000 });
    expect(await plot.locator('svg image').count()).toBe(1);

    const api = await json<{
      blocks: { bearingsDeg: number[] }[];
      tracks: { id: number }[];
      image: { bearingsDeg: number[]; timesS: number[]; levelsDb: number[][] };
    }>(page, `/api/v1/bearing-time-records/${record.id}`);
    expect(api.tracks.length).toBeGreaterThan(0);
    const trackRows = page.getByRole('table', { name: 'Tracks' }).locator('tbody tr');
    expect(await trackRows.count()).toBe(api.tracks.length);
    expect(await page.getByRole('list', { name: 'Tracks' }).locator('li').count()).toBe(api.tracks.length);
    await shot(page, 'btr-record');

    // Point at the middle of the plot: the readout is the stored grid's value for that cell.
    const box = (await plot.boundingBox())!;
    const edge = async (name: string) => Number(await plot.getAttribute(`data-plot-${name}`));
    const [left, right, top, bottom] = [
      await edge('left'),
      await edge('right'),
      await edge('top'),
      await edge('bottom'),
    ];
    const x = box.x + left + 0.37 * (right - left);
    const y = box.y + top + 0.55 * (bottom - top);
    await page.mouse.move(x, y);
    const readout = page.getByTestId('btr-readout');
    await page.locator('[data-testid="btr-readout"][data-row]:not([data-row=""])').waitFor();
    // Every value read at once, from one rendering of the readout.
    const shown = await readout.evaluate((el) => {
      const d = (el as HTMLElement).dataset;
      return {
        row: d.row,
        col: d.col,
        db: d.db,
        bearing: d.bearing,
        time: d.time,
        block: d.block,
        text: el.textContent ?? '',
      };
    });
    const row = Number(shown.row);
    const col = Number(shown.col);
    const db = Number(shown.db);
    expect(api.image.timesS.length).toBeLessThanOrEqual(1600); // shown without further pooling
    expect(db).toBe(api.image.levelsDb[row][col]);
    expect(Number(shown.bearing)).toBe(api.image.bearingsDeg[col]);
    expect(Number(shown.time)).toBe(api.image.timesS[row]);
    const text = shown.text;
    expect(text).toContain(`θ = ${api.image.bearingsDeg[col].toFixed(2)}°`);
    expect(text).toContain(`${api.image.levelsDb[row][col].toFixed(2)} dB`);
    await shot(page, 'btr-readout');

    // Click: that block's spectrum and bearings.
    const blockIndex = Number(shown.block);
    expect(shown.block).not.toBe('');
    expect(blockIndex).toBeGreaterThanOrEqual(0);
    await page.mouse.click(x, y);
    const detail = page.locator(`[data-testid="block-detail"][data-block="${blockIndex}"]`);
    await detail.waitFor({ timeout: 20_000 });
    await detail.getByRole('img', { name: `Wideband spectrum of block ${blockIndex + 1}` }).waitFor();
    expect(await detail.getByTestId('block-bearing').count()).toBe(api.blocks[blockIndex].bearingsDeg.length);
    const first = api.blocks[blockIndex].bearingsDeg[0];
    if (first !== undefined)
      expect(Number(await detail.getByTestId('block-bearing').first().getAttribute('data-bearing'))).toBe(first);
    await detail.scrollIntoViewIfNeeded();
    await shot(page, 'btr-block');

    // Zoom in time with the wheel: the time window shrinks.
    await plot.scrollIntoViewIfNeeded();
    const at = (await plot.boundingBox())!;
    const before = Number(await plot.getAttribute('data-time-to')) - Number(await plot.getAttribute('data-time-from'));
    await page.mouse.move(at.x + left + 0.5 * (right - left), at.y + top + 0.5 * (bottom - top));
    await page.mouse.wheel(0, -600);
    await page.waitForTimeout(400);
    const after = Number(await plot.getAttribute('data-time-to')) - Number(await plot.getAttribute('data-time-from'));
    expect(after).toBeLessThan(before);
    await page.getByTestId('btr-zoom-reset').click();

    // Exports are links to the export route.
    for (const f of ['csv', 'json', 'png'])
      expect(await page.getByTestId(`btr-export-${f}`).getAttribute('href')).toBe(
        `/api/v1/bearing-time-records/${record.id}/export?format=${f}`,
      );

    // A new record through the form on the same recording: progress, then the result.
    await page.goto(`${baseUrl}/bearing-time-records/new?dataset=${record.datasetId}`);
    await page.getByTestId('btr-form').waitFor();
    await page.locator('#btr-name').fill('Browser check: new record');
    // The recording's own array is chosen by default; finer blocks than the demo's so the progress shows.
    expect(await page.locator('#btr-dataset').inputValue()).toBe(String(record.datasetId));
    expect(await page.locator('#btr-array option:checked').innerText()).toContain('Port Alder hydrophone line');
    await page.locator('#btr-low').fill('400');
    await page.locator('#btr-high').fill('2600');
    await page.locator('#btr-block').fill('0.5');
    await page.locator('#btr-overlap').fill('75');
    await page.locator('#btr-fft').selectOption('128');
    await page.getByLabel('Sources per block').selectOption('given');
    await page.locator('#btr-count').fill('2');
    await shot(page, 'btr-form');
    await page.getByTestId('btr-submit').click();
    await page.waitForURL(/\/bearing-time-records\/\d+$/, { timeout: 30_000 });
    await page.getByRole('progressbar', { name: 'Record progress' }).waitFor({ timeout: 20_000 });
    await shot(page, 'btr-progress');
    await page.locator('[data-testid="btr-plot"][data-image-ready="true"]').waitFor({ timeout: 180_000 });
    expect(await page.getByRole('progressbar', { name: 'Record progress' }).count()).toBe(0);
    await shot(page, 'btr-new-result');
    await context.close();
  }, 400_000);

  it('a bad band is shown under its field and nothing starts', async () => {
    const { context, page } = await open();
    await signIn(page, 'engineer@steerwise.test', DEMO_PASSWORD);
    await page.goto(`${baseUrl}/bearing-time-records/new`);
    await page.getByTestId('btr-form').waitFor();
    const before = (await json<{ items: unknown[] }>(page, '/api/v1/bearing-time-records')).items.length;
    await page.locator('#btr-low').fill('2000');
    await page.locator('#btr-high').fill('1000');
    await page.getByTestId('btr-submit').click();
    await page.locator('#btr-high-error').waitFor();
    expect(await page.locator('#btr-high-error').innerText()).toMatch(/band\.highHz must be above band\.lowHz/);
    expect(page.url()).toMatch(/\/bearing-time-records\/new$/);
    expect((await json<{ items: unknown[] }>(page, '/api/v1/bearing-time-records')).items.length).toBe(before);
    await context.close();
  }, 120_000);

  it('viewer: reads records, cannot start or delete one', async () => {
    const { context, page } = await open();
    await signIn(page, 'viewer@steerwise.test', DEMO_PASSWORD);
    await page.goto(`${baseUrl}/bearing-time-records`);
    await page.getByText('Your role (viewer) can read records').waitFor();
    expect(await page.getByTestId('btr-new').count()).toBe(0);
    const { items } = await json<{ items: ListItem[] }>(page, '/api/v1/bearing-time-records');
    const done = items.find((r) => r.status === 'done');
    expect(done).toBeDefined();
    await page.getByRole('link', { name: done!.name }).first().click();
    await page.locator('[data-testid="btr-plot"][data-image-ready="true"]').waitFor({ timeout: 30_000 });
    expect(await page.getByRole('button', { name: 'Delete' }).count()).toBe(0);
    await shot(page, 'btr-viewer');
    await page.goto(`${baseUrl}/bearing-time-records/new`);
    await page.getByText(/Your role \(viewer\) cannot run estimates/).waitFor();
    const refused = await page.request.post('/api/v1/bearing-time-records', {
      data: { datasetId: 1, array: { elements: 8, spacingWavelengths: 0.5 }, band: { lowHz: 100, highHz: 200 } },
      headers: { 'x-csrf-token': await csrf(page) },
    });
    expect(refused.status()).toBe(403);
    await context.close();
  }, 120_000);
});
