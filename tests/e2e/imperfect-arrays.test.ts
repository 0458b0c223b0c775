/**
 * Imperfect arrays in the browser (docs/imperfect-arrays.md): an estimate on the demo line's
 * revision 2 (element 7 disabled) and on a calibrated revision; the form says which elements each
 * method will use and offers the calibration, and the run page says what was applied.
 */
import { describe, expect, it } from 'vitest';
import { DEMO_PASSWORD } from '@/lib/demo/seed';
import { browserForFile, csrf, shot, signIn } from './browser';

const { open } = browserForFile();
const DATASET = 'Port Alder harbour line — Marsh Wren and Coldharbour (400 × 16, CSV)';

describe('imperfect arrays in the browser', () => {
  it('a revision with a disabled element: the form names the elements used, the run page the disabled element', async () => {
    const { context, page } = await open();
    try {
      await signIn(page, 'engineer@steerwise.test', DEMO_PASSWORD);
      await page.goto('/estimates');
      await page.getByLabel('Dataset').selectOption({ label: DATASET });
      const arraySelect = page.getByLabel('Array', { exact: true });
      const options = await arraySelect.locator('option').allTextContents();
      await arraySelect.selectOption({ label: options.find((o) => o.startsWith('Port Alder hydrophone line r2'))! });
      const note = page.getByTestId('elements-used');
      await note.waitFor();
      await expect(note.textContent()).resolves.toMatch(
        /Element 7[\s\S]*15 enabled elements at their true positions[\s\S]*8–16 \(9 elements\)/,
      );
      await shot(page, 'imperfect-01-form-disabled');
      await page.getByRole('button', { name: 'Estimate bearings' }).click();
      await page.waitForURL(/\/estimates\/\d+$/);
      await page.getByRole('table', { name: 'Bearings by method' }).waitFor({ timeout: 60_000 });
      await expect(page.getByTestId('run-disabled-elements').textContent()).resolves.toContain('Element 7 disabled');
      const main = (await page.locator('#main').textContent()) ?? '';
      expect(main).toContain('longest contiguous run of enabled elements, 8–16');
      expect(main).toContain('15 enabled elements at their true positions');
      await shot(page, 'imperfect-02-run-disabled');
    } finally {
      await context.close();
    }
  });

  it('a calibrated revision: the calibration is applied by default and the run page says so', async () => {
    const { context, page } = await open();
    try {
      await signIn(page, 'engineer@steerwise.test', DEMO_PASSWORD);
      await page.goto('/estimates');
      const created = await page.request.post('/api/v1/arrays', {
        data: {
          name: 'Calibrated test line',
          elements: 16,
          spacing: { value: 0.5, unit: 'wavelength' },
          elementStates: Array.from({ length: 16 }, (_, i) => ({
            enabled: true,
            gainDb: i === 0 ? 0 : ((i * 7) % 5) * 0.4 - 0.8,
            phaseDeg: i === 0 ? 0 : ((i * 11) % 9) * 4 - 16,
          })),
        },
        headers: { 'x-csrf-token': await csrf(page) },
      });
      expect(created.status(), await created.text()).toBe(201);
      await page.goto('/estimates');
      await page.getByLabel('Dataset').selectOption({ label: DATASET });
      const arraySelect = page.getByLabel('Array', { exact: true });
      const options = await arraySelect.locator('option').allTextContents();
      await arraySelect.selectOption({ label: options.find((o) => o.startsWith('Calibrated test line r1'))! });
      const apply = page.getByRole('checkbox', { name: /Apply the calibration of revision 1/ });
      await expect(apply.isChecked()).resolves.toBe(true);
      await shot(page, 'imperfect-03-form-calibrated');
      await page.getByRole('button', { name: 'Estimate bearings' }).click();
      await page.waitForURL(/\/estimates\/\d+$/);
      await page.getByRole('table', { name: 'Bearings by method' }).waitFor({ timeout: 60_000 });
      await expect(page.getByTestId('run-calibration').textContent()).resolves.toContain(
        'Calibration of revision 1 applied',
      );
      await shot(page, 'imperfect-04-run-calibrated');
    } finally {
      await context.close();
    }
  });
});
