/**
 * By-hand browser check of the designer harness (not a vitest file).
 *
 *   NEXTAUTH_SECRET=… npx next dev -p 3107        # with the same secret
 *   NEXTAUTH_SECRET=… BASE_URL=http://localhost:3107 npx tsx tests/lib/designer/designer-browser.script.ts
 *
 * Signs in by minting a session JWT with the dev server's NEXTAUTH_SECRET
 * (the app's proxy only checks the token), opens /designer-harness, and with
 * mouse and keyboard: adds an element, drags the spacing, disables an element,
 * drags a source arrow, changes the spacing by keyboard. After each step the
 * figures on the page must equal lib/doa's figures for the state the page
 * reports. Screenshots go to test-results/designer-*.png.
 */
import { chromium, type Page } from 'playwright-core';
import { encode } from 'next-auth/jwt';
import fs from 'node:fs';
import { halfPowerBeamwidthDeg, firstNullBeamwidthDeg, peakSidelobeDb, apertureWavelengths, gratingLobeFreeScanDeg } from '@/lib/doa/array-figures';
import { resolveArrayGeometry, arrayInputSchema } from '@/lib/validations/array';

const BASE = process.env.BASE_URL ?? 'http://localhost:3107';
const SECRET = process.env.NEXTAUTH_SECRET;
if (!SECRET) throw new Error('set NEXTAUTH_SECRET to the dev server’s secret');

let failures = 0;
function check(ok: boolean, what: string) {
  console.log(`${ok ? 'ok  ' : 'FAIL'} ${what}`);
  if (!ok) failures++;
}

async function state(page: Page) {
  const json = await page.getByTestId('designer-state').getAttribute('data-json');
  return JSON.parse(json!);
}

async function shownFigure(page: Page, id: string): Promise<number | null> {
  const v = await page.getByTestId(`figure-${id}`).getAttribute('data-value');
  return v === '' || v === null ? null : Number(v);
}

/** The figures on the page equal the engine's figures for the page's state. */
async function figuresMatchEngine(page: Page, label: string) {
  await page.waitForTimeout(150);
  const draft = arrayInputSchema.parse(await state(page));
  const d = resolveArrayGeometry(draft).spacingWavelengths;
  const options = {
    elements: draft.elements,
    spacingWavelengths: d,
    steerDeg: draft.steerDeg ?? 0,
    taper: draft.taper ? (draft.taper.kind === 'chebyshev' ? { kind: 'chebyshev' as const, sidelobeDb: draft.taper.sidelobeDb } : { kind: draft.taper.kind }) : undefined,
    enabled: draft.elementStates!.map((e) => e.enabled),
    gainDb: draft.elementStates!.map((e) => e.gainDb),
    phaseDeg: draft.elementStates!.map((e) => e.phaseDeg),
  };
  const expected: Record<string, number | null> = {
    hpbw: halfPowerBeamwidthDeg(options),
    fnbw: firstNullBeamwidthDeg(options),
    psl: peakSidelobeDb(options),
    aperture: apertureWavelengths(draft.elements, d),
    'grating-free-scan': gratingLobeFreeScanDeg(d),
  };
  for (const [id, want] of Object.entries(expected)) {
    const got = await shownFigure(page, id);
    // The page runs the same lib/doa code in Chromium; Node's and Chromium's sin/cos/asin may differ in the
    // last bit, which the golden-section null search can lift to ~1e−10°. Hence a 1e−8 relative tolerance.
    const same = got === want || (got !== null && want !== null && Math.abs(got - want) <= 1e-8 * Math.max(1, Math.abs(want)));
    check(same, `${label}: ${id} shown ${got} equals engine ${want}`);
  }
  return draft;
}

async function main() {
  fs.mkdirSync('test-results', { recursive: true });
  const browser = await chromium.launch({
    executablePath: '/usr/bin/chromium',
    args: ['--headless', '--no-sandbox', '--disable-gpu', '--disable-background-networking', '--no-first-run', '--disable-component-update', '--disable-sync'],
  });
  const context = await browser.newContext({ viewport: { width: 1440, height: 1000 }, acceptDownloads: true });
  const token = await encode({ token: { sub: 'harness', email: 'engineer@steerwise.test', name: 'Harness', role: 'engineer' }, secret: SECRET! });
  await context.addCookies([{ name: 'next-auth.session-token', value: token, url: BASE }]);
  const page = await context.newPage();
  const errors: string[] = [];
  page.on('pageerror', (e) => errors.push(String(e)));
  // Resource failures are caught by status below (the browser's own favicon probe is not a page request).
  page.on('console', (m) => m.type() === 'error' && !m.text().startsWith('Failed to load resource') && errors.push(m.text()));
  page.on('response', (r) => r.status() >= 400 && errors.push(`${r.status()} ${r.url()}`));

  await page.goto(`${BASE}/designer-harness`, { waitUntil: 'networkidle', timeout: 120_000 });
  check(new URL(page.url()).pathname === '/designer-harness', `not redirected (at ${page.url()})`);
  await page.getByTestId('element-15').waitFor({ timeout: 60_000 });
  await page.screenshot({ path: 'test-results/designer-01-initial.png', fullPage: true });
  let s = await figuresMatchEngine(page, 'initial');
  check(s.elements === 16, 'starts with 16 elements');

  // 1. Add an element with the "+" handle.
  const plus = (await page.getByTestId('add-handle').boundingBox())!;
  await page.mouse.click(plus.x + plus.width / 2, plus.y + plus.height / 2);
  await page.waitForTimeout(200);
  s = await figuresMatchEngine(page, 'after add');
  check(s.elements === 17, `the "+" handle added an element (now ${s.elements})`);

  // 2. Drag the last element outward: the spacing grows, the array stays uniform.
  const before = resolveArrayGeometry(arrayInputSchema.parse(s)).spacingWavelengths;
  const last = (await page.getByTestId('element-16').boundingBox())!;
  const lx = last.x + last.width / 2;
  const ly = last.y + last.height / 2;
  await page.mouse.move(lx, ly);
  await page.mouse.down();
  for (let k = 1; k <= 10; k++) await page.mouse.move(lx + 6 * k, ly, { steps: 1 });
  await page.mouse.up();
  await page.waitForTimeout(200);
  s = await figuresMatchEngine(page, 'after drag');
  const after = resolveArrayGeometry(arrayInputSchema.parse(s)).spacingWavelengths;
  check(after > before, `dragging stretched the spacing ${before.toFixed(4)} → ${after.toFixed(4)} λ`);
  const xs = await page.evaluate(() => window.__steerwiseCanvas!.elements.map((e) => e.x));
  const steps = xs.slice(1).map((x, i) => x - xs[i]);
  check(Math.max(...steps) - Math.min(...steps) < 1e-6, 'elements stay equally spaced on the canvas');
  await page.screenshot({ path: 'test-results/designer-02-dragged.png', fullPage: true });

  // 3. Click element 3 to disable it.
  const e2 = (await page.getByTestId('element-2').boundingBox())!;
  await page.mouse.click(e2.x + e2.width / 2, e2.y + e2.height / 2);
  await page.waitForTimeout(200);
  s = await figuresMatchEngine(page, 'after disable');
  check(s.elementStates![2].enabled === false, 'element 3 is disabled');
  check(await page.getByTestId('disabled-notice').isVisible(), 'the disabled-element notice shows');

  // 4. Drag source 1's handle to a new bearing.
  const src = (await page.getByTestId('source-0').boundingBox())!;
  const sx = src.x + src.width / 2;
  const sy = src.y + src.height / 2;
  const b0 = s.plannedSources![0].bearingDeg;
  await page.mouse.move(sx, sy);
  await page.mouse.down();
  for (let k = 1; k <= 8; k++) await page.mouse.move(sx + 12 * k, sy - 6 * k, { steps: 1 });
  await page.mouse.up();
  await page.waitForTimeout(400);
  s = await figuresMatchEngine(page, 'after source drag');
  check(s.plannedSources![0].bearingDeg !== b0, `source 1 turned ${b0}° → ${s.plannedSources![0].bearingDeg}°`);
  await page.screenshot({ path: 'test-results/designer-03-disabled-and-source.png', fullPage: true });

  // 5. Keyboard: focus element 6, ArrowLeft narrows the spacing by 0.01 λ; Enter toggles it; + adds.
  const d5 = resolveArrayGeometry(arrayInputSchema.parse(s)).spacingWavelengths;
  await page.getByTestId('element-5').focus();
  await page.keyboard.press('ArrowLeft');
  await page.waitForTimeout(150);
  s = await figuresMatchEngine(page, 'after ArrowLeft');
  const d6 = resolveArrayGeometry(arrayInputSchema.parse(s)).spacingWavelengths;
  // Metres are kept to 6 significant digits, so the step is 0.01 λ to within 1e−5 λ.
  check(Math.abs(d6 - (d5 - 0.01)) < 1e-5, `ArrowLeft: ${d5.toFixed(4)} → ${d6.toFixed(4)} λ`);
  await page.getByTestId('element-5').focus();
  await page.keyboard.press('Enter');
  await page.waitForTimeout(150);
  s = await figuresMatchEngine(page, 'after Enter');
  check(s.elementStates![5].enabled === false, 'Enter disabled element 6');
  const n0 = s.elements;
  await page.getByTestId('element-5').focus();
  await page.keyboard.press('+');
  await page.waitForTimeout(150);
  s = await figuresMatchEngine(page, 'after +');
  check(s.elements === n0 + 1, `+ added an element (${n0} → ${s.elements})`);
  await page.screenshot({ path: 'test-results/designer-04-keyboard.png', fullPage: false });

  // 6. Form: a bad element count shows a field error; a good one updates the canvas.
  await page.getByTestId('field-elements').fill('1');
  await page.waitForTimeout(200);
  const err = await page.locator('#f-elements-error').textContent();
  check(/at least 2/.test(err ?? ''), `form shows "${err}" under elements`);
  await page.getByTestId('field-elements').fill('24');
  await page.waitForTimeout(300);
  s = await figuresMatchEngine(page, 'after form edit');
  check(s.elements === 24 && (await page.getByTestId('element-23').count()) === 1, 'form edit to 24 elements reached the canvas');

  // 7. Scan sector beyond the grating-lobe-free scan: warning.
  await page.getByTestId('field-spacing.value').fill('0.4');
  await page.getByTestId('field-scanSectorDeg').fill('80');
  await page.waitForTimeout(300);
  s = await figuresMatchEngine(page, 'wide spacing');
  check(await page.getByTestId('scan-warning').isVisible(), 'scan-sector warning visible');
  await page.getByTestId('pattern-view-polar').click();
  await page.waitForTimeout(200);
  await page.screenshot({ path: 'test-results/designer-05-grating.png', fullPage: true });

  // 8. Exports: PNG (canvas-rendered), SVG and CSV downloads.
  for (const [kind, test] of [
    ['png', (b: Buffer) => b.subarray(0, 8).equals(Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]))],
    ['svg', (b: Buffer) => b.toString('utf8').includes('<svg') && b.toString('utf8').includes('xmlns="http://www.w3.org/2000/svg"')],
    ['csv', (b: Buffer) => b.toString('utf8').split('\n').some((l) => l === 'theta_deg,u,level_db')],
  ] as const) {
    const [download] = await Promise.all([page.waitForEvent('download'), page.getByTestId(`pattern-export-${kind}`).click()]);
    const file = await download.path();
    const bytes = fs.readFileSync(file!);
    check(test(bytes), `pattern export ${kind}: ${download.suggestedFilename()} (${bytes.length} bytes)`);
    if (kind === 'png') fs.copyFileSync(file!, 'test-results/designer-export-pattern.png');
  }

  // 9. Read-only.
  await page.goto(`${BASE}/designer-harness?readonly=1`, { waitUntil: 'networkidle' });
  await page.getByTestId('element-0').waitFor();
  const ro = await page.getByTestId('element-0').isDisabled();
  check(ro, 'read-only: element controls are disabled');
  check((await page.getByTestId('add-element').count()) === 0, 'read-only: no add button');
  await page.screenshot({ path: 'test-results/designer-06-readonly.png', fullPage: false });

  check(errors.length === 0, `no page errors${errors.length ? ': ' + errors.slice(0, 3).join(' | ') : ''}`);
  await browser.close();
  console.log(failures ? `${failures} check(s) failed` : 'all checks passed');
  process.exitCode = failures ? 1 : 0;
}

main().catch((e) => {
  console.error(e);
  process.exitCode = 1;
});
