/**
 * The array designer in the built app, with mouse and keyboard: an engineer
 * creates an array, adds an element, drags the spacing, disables an element,
 * drags a source arrow and saves revisions; a reviewer opens it read-only.
 * After each step the figures on the page must equal lib/doa's figures for
 * the state the page shows, and the separation chart must flag exactly the
 * pairs that docs/conventions.md §5 calls "below the resolvable gap".
 * Screenshots land in test-results/designer-*.png.
 */
import fs from 'node:fs';
import { describe, expect, it } from 'vitest';
import type { Page } from 'playwright-core';
import { DEMO_PASSWORD } from '@/lib/demo/seed';
import {
  apertureWavelengths,
  arrayMetrics,
  firstNullBeamwidthDeg,
  gratingLobeFreeScanDeg,
  halfPowerBeamwidthDeg,
  peakSidelobeDb,
  rayleighGap,
} from '@/lib/doa/design/array-figures';
import { arrayInputSchema, resolveArrayGeometry, type ArrayInput } from '@/lib/validations/array';
import { browserForFile, shot, signIn } from './browser';

const { open } = browserForFile();

/** The designer's state as the page reports it (the hidden `designer-state` output's data-json), validated with the shared schema. */
async function state(page: Page): Promise<ArrayInput> {
  const json = await page.getByTestId('designer-state').getAttribute('data-json');
  return arrayInputSchema.parse(JSON.parse(json!));
}

const spacingOf = (s: ArrayInput) => resolveArrayGeometry(s).spacingWavelengths;

async function shownFigure(page: Page, id: string): Promise<number | null> {
  const v = await page.getByTestId(`figure-${id}`).getAttribute('data-value');
  return v === '' || v === null ? null : Number(v);
}

/**
 * Every figure on the page equals lib/doa's figure, computed here in Node, for the state
 * the page shows. Tolerance 1e−8 relative: the page runs the same code in Chromium, whose
 * last-bit sin/asin may differ from Node's, and the null search can lift that to ~1e−10°.
 */
async function expectFiguresMatchEngine(page: Page, label: string): Promise<ArrayInput> {
  await page.waitForTimeout(150);
  const s = await state(page);
  const d = spacingOf(s);
  const states = s.elementStates!;
  const taper =
    s.taper!.kind === 'chebyshev'
      ? { kind: 'chebyshev' as const, sidelobeDb: s.taper!.sidelobeDb }
      : { kind: s.taper!.kind };
  const options = {
    elements: s.elements,
    spacingWavelengths: d,
    steerDeg: s.steerDeg ?? 0,
    taper,
    enabled: states.map((e) => e.enabled),
    gainDb: states.map((e) => e.gainDb),
    phaseDeg: states.map((e) => e.phaseDeg),
  };
  const expected: Record<string, number | null> = {
    hpbw: halfPowerBeamwidthDeg(options),
    fnbw: firstNullBeamwidthDeg(options),
    psl: peakSidelobeDb(options),
    aperture: apertureWavelengths(s.elements, d),
    'grating-free-scan': gratingLobeFreeScanDeg(d),
    'rayleigh-gap': rayleighGap(s.elements, d).u,
  };
  for (const [id, want] of Object.entries(expected)) {
    const got = await shownFigure(page, id);
    if (want === null) expect(got, `${label}: ${id}`).toBeNull();
    else
      expect(Math.abs(got! - want), `${label}: ${id} shown ${got}, engine ${want}`).toBeLessThanOrEqual(
        1e-8 * Math.max(1, Math.abs(want)),
      );
  }
  return s;
}

async function center(page: Page, testId: string): Promise<{ x: number; y: number }> {
  const box = (await page.getByTestId(testId).boundingBox())!;
  return { x: box.x + box.width / 2, y: box.y + box.height / 2 };
}

async function drag(page: Page, testId: string, dx: number, dy: number, steps = 10): Promise<void> {
  const from = await center(page, testId);
  await page.mouse.move(from.x, from.y);
  await page.mouse.down();
  for (let k = 1; k <= steps; k++) await page.mouse.move(from.x + (dx * k) / steps, from.y + (dy * k) / steps);
  await page.mouse.up();
  await page.waitForTimeout(250);
}

function watchErrors(page: Page): string[] {
  const errors: string[] = [];
  page.on('pageerror', (e) => errors.push(String(e)));
  page.on(
    'console',
    (m) => m.type() === 'error' && !m.text().startsWith('Failed to load resource') && errors.push(m.text()),
  );
  page.on('response', (r) => r.status() >= 400 && errors.push(`${r.status()} ${r.url()}`));
  return errors;
}

let arrayId = 0;
const arrayName = 'Skerry Bank trial line (e2e)';

describe('an engineer designs an array in the browser', () => {
  it('creates it, edits it by mouse and keyboard with the figures matching the engine, and saves revisions', async () => {
    const { context, page } = await open({ width: 1440, height: 1000 });
    const errors = watchErrors(page);
    try {
      await signIn(page, 'engineer@steerwise.test', DEMO_PASSWORD);
      await page.goto('/arrays');
      await page.getByRole('table', { name: 'Arrays' }).waitFor();
      // The seeded demo arrays are listed with their latest revision and author.
      const demoRow = page.getByRole('row', { name: /Port Alder hydrophone line/ });
      await expect(demoRow.textContent()).resolves.toMatch(/r3.*Tobin Hartree/);
      await shot(page, 'designer-00-list');

      await page.getByTestId('new-array').click();
      await page.waitForURL('**/arrays/new');
      await page.getByTestId('element-7').waitFor({ timeout: 60_000 });
      let s = await expectFiguresMatchEngine(page, 'initial');
      expect(s.elements).toBe(8);
      await page.getByTestId('field-name').fill(arrayName);

      // 1. Add an element with the "+" handle.
      const plus = await center(page, 'add-handle');
      await page.mouse.click(plus.x, plus.y);
      await page.waitForTimeout(200);
      s = await expectFiguresMatchEngine(page, 'after add');
      expect(s.elements).toBe(9);

      // 2. Drag the last element outward: the spacing grows and the array stays uniform.
      const before = spacingOf(s);
      await drag(page, 'element-8', 60, 0);
      s = await expectFiguresMatchEngine(page, 'after drag');
      expect(spacingOf(s)).toBeGreaterThan(before);
      const xs = await page
        .locator('[data-testid^="element-"][data-x]')
        .evaluateAll((els) => els.map((e) => Number(e.getAttribute('data-x'))));
      expect(xs).toHaveLength(9);
      const steps = xs.slice(1).map((x, i) => x - xs[i]);
      expect(Math.max(...steps) - Math.min(...steps)).toBeLessThan(1e-6);

      // 3. Click element 3 to disable it: the notice explains what shift-invariance methods will do.
      const e2 = await center(page, 'element-2');
      await page.mouse.click(e2.x, e2.y);
      s = await expectFiguresMatchEngine(page, 'after disable');
      expect(s.elementStates![2].enabled).toBe(false);
      await expect(page.getByTestId('disabled-notice').isVisible()).resolves.toBe(true);
      await expect(page.getByTestId('disabled-notice').textContent()).resolves.toMatch(
        /ESPRIT[\s\S]*longest run of enabled neighbours/,
      );

      // 4. Drag source 1's arrow to a new bearing.
      const b0 = s.plannedSources![0].bearingDeg;
      await drag(page, 'source-0', 90, -45, 8);
      s = await expectFiguresMatchEngine(page, 'after source drag');
      expect(s.plannedSources![0].bearingDeg).not.toBe(b0);
      await shot(page, 'designer-01-edited');

      // 5. Keyboard: ArrowLeft on a focused element narrows the spacing by 0.01 λ; Enter toggles; + adds.
      const d5 = spacingOf(s);
      await page.getByTestId('element-5').focus();
      await page.keyboard.press('ArrowLeft');
      s = await expectFiguresMatchEngine(page, 'after ArrowLeft');
      expect(Math.abs(spacingOf(s) - Math.round((d5 - 0.01) * 1e4) / 1e4)).toBeLessThan(1e-12);
      await page.keyboard.press('Enter');
      s = await expectFiguresMatchEngine(page, 'after Enter');
      expect(s.elementStates![5].enabled).toBe(false);
      await page.keyboard.press('+');
      s = await expectFiguresMatchEngine(page, 'after +');
      expect(s.elements).toBe(10);

      // 6. Save: revision 1 is created and the array's page opens.
      await page.getByTestId('save-revision').click();
      await page.waitForURL(/\/arrays\/\d+$/, { timeout: 30_000 });
      arrayId = Number(new URL(page.url()).pathname.split('/').pop());
      await page.getByTestId('revision-1').waitFor();
      await page.getByTestId('element-9').waitFor({ timeout: 60_000 });
      const api1 = await (await page.request.get(`/api/v1/arrays/${arrayId}`)).json();
      expect(api1).toMatchObject({ name: arrayName, revision: 1, elements: 10 });
      expect(Math.abs(api1.spacingWavelengths - spacingOf(s))).toBeLessThan(1e-12);
      expect(api1.metrics).toEqual(arrayMetrics(api1.elements, api1.spacingWavelengths));
      expect(
        api1.config.elementStates.map((e: { enabled: boolean }) => e.enabled).filter((x: boolean) => !x).length,
      ).toBe(2);
      s = await expectFiguresMatchEngine(page, 'reopened');
      expect(s.elements).toBe(10);

      // 7. Widen by keyboard and save again: revision 2 appears in the list; revision 1 is unchanged.
      await page.getByTestId('element-1').focus();
      await page.keyboard.press('Shift+ArrowRight');
      s = await expectFiguresMatchEngine(page, 'after Shift+ArrowRight');
      await page.getByTestId('save-revision').click();
      await page.getByTestId('revision-2').waitFor();
      await expect(page.getByTestId('revision-status').textContent()).resolves.toMatch(/revision 2 of 2/);
      await expect(page.getByTestId('revision-2').textContent()).resolves.toMatch(/Tobin Hartree/);
      const api2 = await (await page.request.get(`/api/v1/arrays/${arrayId}`)).json();
      expect(api2.revision).toBe(2);
      expect(Math.abs(api2.spacingWavelengths - spacingOf(s))).toBeLessThan(1e-12);
      const old = await (await page.request.get(`/api/v1/arrays/${arrayId}/revisions/1`)).json();
      expect(old.spacingWavelengths).toBe(api1.spacingWavelengths);
      expect(old.config).toEqual(api1.config);
      await shot(page, 'designer-02-saved-r2');

      // 8. Exports of the pattern: PNG, SVG and CSV downloads.
      for (const [kind, ok] of [
        ['png', (b: Buffer) => b.subarray(0, 8).equals(Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]))],
        ['svg', (b: Buffer) => b.toString('utf8').includes('xmlns="http://www.w3.org/2000/svg"')],
        [
          'csv',
          (b: Buffer) =>
            b
              .toString('utf8')
              .split('\n')
              .some((l) => l === 'theta_deg,u,level_db'),
        ],
      ] as const) {
        const [download] = await Promise.all([
          page.waitForEvent('download'),
          page.getByTestId(`pattern-export-${kind}`).click(),
        ]);
        expect(ok(fs.readFileSync((await download.path())!)), `${kind} export`).toBe(true);
      }
      expect(errors).toEqual([]);
    } finally {
      await context.close();
    }
  });

  it('the separation chart flags a pair below the resolvable gap and not a pair above it', async () => {
    const { context, page } = await open({ width: 1440, height: 1000 });
    try {
      await signIn(page, 'engineer@steerwise.test', DEMO_PASSWORD);
      await page.goto('/arrays/new');
      await page.getByTestId('element-7').waitFor({ timeout: 60_000 });
      // 8 elements at λ/2: the gap is 1/(M·d) = 0.25 in u. Sources at 0°, 5° and 40°:
      // Δu(0°, 5°) = 0.087 is below it; Δu(0°, 40°) = 0.643 and Δu(5°, 40°) = 0.556 are above it.
      for (const [i, bearing] of [0, 5, 40].entries()) {
        if (i >= (await state(page)).plannedSources!.length) await page.getByTestId('add-source').click();
        await page.getByTestId(`field-plannedSources.${i}.bearingDeg`).fill(String(bearing));
      }
      await page.waitForTimeout(500);
      const s = await state(page);
      expect(s.plannedSources!.map((p) => p.bearingDeg)).toEqual([0, 5, 40]);
      const gapU = 1 / (s.elements * spacingOf(s));
      const items = page.getByTestId('pair-item');
      await expect(items.count()).resolves.toBe(3);
      const seen: Record<string, boolean> = {};
      for (let k = 0; k < 3; k++) {
        const item = items.nth(k);
        const [i, j] = (await item.getAttribute('data-pair'))!.split('-').map(Number);
        const sinI = Math.sin((s.plannedSources![i].bearingDeg * Math.PI) / 180);
        const sinJ = Math.sin((s.plannedSources![j].bearingDeg * Math.PI) / 180);
        // docs/conventions.md §5: "below the resolvable gap" when |sin θ1 − sin θ2| < 1/(M·d).
        const below = Math.abs(sinI - sinJ) < gapU;
        expect(await item.getAttribute('data-below-gap'), `pair ${i}-${j}`).toBe(below ? 'true' : 'false');
        seen[`${i}-${j}`] = below;
      }
      expect(seen).toEqual({ '0-1': true, '0-2': false, '1-2': false });
      const flagged = page.locator('[data-testid="pair-item"][data-below-gap="true"]');
      await expect(flagged.textContent()).resolves.toMatch(/Below/);
      // The chart draws the same pairs, flagged the same way (the pair points it plots, on its container).
      const drawn = (await page.getByTestId('separation-plot').getAttribute('data-pairs'))!.split(' ');
      expect(drawn.sort()).toEqual(['0-1:below', '0-2:above', '1-2:above']);
      await page.getByTestId('separation-panel').scrollIntoViewIfNeeded();
      await page.getByTestId('separation-panel').screenshot({ path: 'test-results/designer-03-separation.png' });
    } finally {
      await context.close();
    }
  });
});

describe('a reviewer opens an array read-only', () => {
  it('sees every figure but cannot edit or save, and can open an older revision', async () => {
    expect(arrayId, 'the engineer test saved an array first').toBeGreaterThan(0);
    const { context, page } = await open({ width: 1440, height: 1000 });
    const errors = watchErrors(page);
    try {
      await signIn(page, 'reviewer@steerwise.test', DEMO_PASSWORD);
      await page.goto('/arrays');
      await page.getByRole('table', { name: 'Arrays' }).waitFor();
      expect(await page.getByTestId('new-array').count()).toBe(0);
      await expect(page.getByRole('note').textContent()).resolves.toContain(
        'Your role (reviewer) cannot create or edit arrays.',
      );

      await page.getByRole('link', { name: arrayName }).click();
      await page.waitForURL(`**/arrays/${arrayId}`);
      await page.getByTestId('element-0').waitFor({ timeout: 60_000 });
      await expect(page.getByTestId('read-only-note').textContent()).resolves.toContain(
        'Your role (reviewer) cannot create or edit arrays.',
      );
      await expect(page.getByTestId('designer').getAttribute('data-read-only')).resolves.toBe('true');
      expect(await page.getByTestId('save-revision').count()).toBe(0);
      await expect(page.getByTestId('element-0').isDisabled()).resolves.toBe(true);
      await expect(page.getByTestId('field-elements').isDisabled()).resolves.toBe(true);
      const s0 = await expectFiguresMatchEngine(page, 'reviewer');
      expect(s0.elements).toBe(10);

      // Mouse and keyboard do nothing to the design.
      const e4 = await center(page, 'element-4');
      await page.mouse.click(e4.x, e4.y);
      await page.getByTestId('element-4').focus();
      await page.keyboard.press('ArrowRight');
      await page.keyboard.press('+');
      await page.waitForTimeout(200);
      expect(await state(page)).toEqual(s0);
      await shot(page, 'designer-04-reviewer-readonly');

      // A PATCH from the reviewer's session is refused by the server as well.
      const csrf = (await (await page.request.get('/api/auth/csrf')).json()).csrfToken as string;
      const refused = await page.request.patch(`/api/v1/arrays/${arrayId}`, {
        data: { elements: 4 },
        headers: { 'x-csrf-token': csrf },
      });
      expect(refused.status()).toBe(403);

      // Revision 1, read-only with a note and a way back to the latest.
      await page.getByTestId('revision-1').getByRole('link', { name: 'r1' }).click();
      await page.waitForURL(`**/arrays/${arrayId}?rev=1`);
      await page.getByTestId('old-revision-note').waitFor();
      await expect(page.getByTestId('revision-status').textContent()).resolves.toMatch(/revision 1 of 2/);
      const r1 = await expectFiguresMatchEngine(page, 'revision 1');
      const api1 = await (await page.request.get(`/api/v1/arrays/${arrayId}/revisions/1`)).json();
      expect(Math.abs(spacingOf(r1) - api1.spacingWavelengths)).toBeLessThan(1e-12);
      await shot(page, 'designer-05-reviewer-old-revision');

      await page.goto('/arrays/new');
      await expect(page.locator('#main').getByRole('alert').textContent()).resolves.toContain(
        'Your role (reviewer) cannot create or edit arrays.',
      );
      expect(errors.filter((e) => !e.includes(`/api/v1/arrays/${arrayId}`))).toEqual([]);
    } finally {
      await context.close();
    }
  });
});
