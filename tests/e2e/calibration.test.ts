/**
 * Calibration in the built app: an engineer uploads two reference recordings of an
 * 8-element line with simulated element errors (±2 dB, ±20°), runs a joint calibration
 * from the array page's panel, sees the progress, the gain and phase bars with error
 * bars and the verdict, accepts it, and the designer then shows the new revision with
 * the fitted element states (its figures computed from them); a viewer sees the panel
 * read-only. Screenshots land in test-results/calibration-*.png.
 */
import { describe, expect, it } from 'vitest';
import { DEMO_PASSWORD } from '@/lib/demo/seed';
import { peakSidelobeDb } from '@/lib/doa/design/array-figures';
import { browserForFile, csrf, shot, signIn } from './browser';
import { csvOf, randomStates, simulateReference } from '../lib/doa/calibration-helpers';

const { baseUrl, open } = browserForFile();

describe('calibration panel', () => {
  it('engineer runs a calibration, sees bars with error bars, accepts; viewer cannot', async () => {
    const stamp = Date.now();
    const m = 8;
    const truth = randomStates(m, 77);
    const eng = await open();
    await signIn(eng.page, 'engineer@steerwise.test', DEMO_PASSWORD);
    const token = await csrf(eng.page);
    const created = await eng.page.request.post('/api/v1/arrays', {
      headers: { 'x-csrf-token': token },
      data: { name: `Calibration line ${stamp}`, elements: m, spacing: { value: 0.5, unit: 'wavelength' } },
    });
    expect(created.status(), await created.text()).toBe(201);
    const arrayId = ((await created.json()) as { id: number }).id;
    const names: string[] = [];
    for (const [i, bearing] of [-30, 25].entries()) {
      const rows = simulateReference({
        elements: m,
        spacingWavelengths: 0.5,
        bearingsDeg: [bearing],
        noisePower: 0.01,
        snapshots: 800,
        seed: 60 + i,
        states: truth,
      });
      const name = `Range pass ${i + 1} at ${bearing}° ${stamp}`;
      names.push(name);
      const up = await eng.page.request.post('/api/v1/datasets', {
        headers: { 'x-csrf-token': token },
        multipart: { file: { name: `pass-${i + 1}.csv`, mimeType: 'text/csv', buffer: csvOf(rows) }, name },
      });
      expect(up.status(), await up.text()).toBe(201);
    }

    await eng.page.goto(`${baseUrl}/arrays/${arrayId}`);
    const panel = eng.page.getByTestId('calibration-panel');
    await panel.waitFor();
    await panel.getByTestId('calibration-dataset-0').selectOption({ label: `${names[0]} (csv, 800 snapshots)` });
    await panel.getByTestId('calibration-bearings-0').fill('-30');
    await panel.getByTestId('calibration-add-reference').click();
    await panel.getByTestId('calibration-dataset-1').selectOption({ label: `${names[1]} (csv, 800 snapshots)` });
    await panel.getByTestId('calibration-bearings-1').fill('25');
    await panel.getByTestId('calibration-run').click();
    const result = panel.getByTestId('calibration-result');
    await result.waitFor({ timeout: 60_000 });
    expect(await result.getAttribute('data-verdict')).toBe('supported');
    // Bars and error bars are drawn (SVG paths inside each chart).
    for (const id of ['calibration-gain-chart', 'calibration-phase-chart']) {
      const paths = await panel.getByTestId(id).locator('svg path').count();
      expect(paths, id).toBeGreaterThan(m);
    }
    await panel.getByTestId('calibration-residual').waitFor();
    await panel.getByTestId('calibration-references-table').waitFor();
    await result.scrollIntoViewIfNeeded();
    await shot(eng.page, 'calibration-result');

    // The report matches the truth within 3σ (read over the API the panel used).
    const list = await eng.page.request.get(`/api/v1/arrays/${arrayId}/calibrations`);
    const calibration = (
      (await list.json()) as {
        items: {
          id: number;
          report: { elements: { gainDb: number; gainStdDb: number; phaseDeg: number; phaseStdDeg: number }[] };
        }[];
      }
    ).items[0];
    calibration.report.elements.slice(1).forEach((e, k) => {
      const t = truth[k + 1];
      expect(Math.abs(e.gainDb - t.gainDb)).toBeLessThanOrEqual(3 * e.gainStdDb);
      expect(Math.abs(e.phaseDeg - t.phaseDeg)).toBeLessThanOrEqual(3 * e.phaseStdDeg);
    });

    await panel.getByTestId('calibration-accept').click();
    await panel.getByText(/Accepted as revision 2/).waitFor({ timeout: 20_000 });
    await eng.page.getByTestId('revision-status').getByText('revision 2 of 2').waitFor({ timeout: 20_000 });
    // The designer reopens on the new revision (after the page refresh) with the calibrated states,
    // and its figures are those of the calibrated line.
    const want1 = calibration.report.elements[1].gainDb;
    await eng.page.waitForFunction(
      (g) => {
        const el = document.querySelector('[data-testid="designer-state"]');
        const s = el && JSON.parse(el.getAttribute('data-json') ?? '{}');
        return Boolean(s?.elementStates && Math.abs(s.elementStates[1].gainDb - g) < 1e-3);
      },
      want1,
      { timeout: 20_000 },
    );
    const json = await eng.page.getByTestId('designer-state').getAttribute('data-json');
    const state = JSON.parse(json!) as {
      elementStates: { enabled: boolean; gainDb: number; phaseDeg: number }[];
      steerDeg?: number;
      taper?: { kind: 'uniform' | 'hann' | 'hamming' | 'chebyshev'; sidelobeDb?: number };
    };
    const taper =
      state.taper?.kind === 'chebyshev'
        ? { kind: 'chebyshev' as const, sidelobeDb: state.taper.sidelobeDb! }
        : { kind: (state.taper?.kind ?? 'uniform') as 'uniform' | 'hann' | 'hamming' };
    state.elementStates.forEach((s, i) => {
      expect(s.gainDb).toBeCloseTo(calibration.report.elements[i].gainDb, 3);
      expect(s.phaseDeg).toBeCloseTo(calibration.report.elements[i].phaseDeg, 2);
    });
    const psl = Number(await eng.page.getByTestId('figure-psl').getAttribute('data-value'));
    const want = peakSidelobeDb({
      elements: m,
      spacingWavelengths: 0.5,
      steerDeg: state.steerDeg ?? 0,
      taper,
      enabled: state.elementStates.map((s) => s.enabled),
      gainDb: state.elementStates.map((s) => s.gainDb),
      phaseDeg: state.elementStates.map((s) => s.phaseDeg),
    });
    expect(Math.abs(psl - want!)).toBeLessThanOrEqual(1e-6 * Math.max(1, Math.abs(want!)));
    await shot(eng.page, 'calibration-accepted');
    await eng.context.close();

    const viewer = await open();
    await signIn(viewer.page, 'viewer@steerwise.test', DEMO_PASSWORD);
    await viewer.page.goto(`${baseUrl}/arrays/${arrayId}`);
    await viewer.page.getByTestId('calibration-read-only').waitFor();
    expect(await viewer.page.getByTestId('calibration-run').count()).toBe(0);
    const refused = await viewer.page.request.post(`/api/v1/arrays/${arrayId}/calibrations`, {
      headers: { 'x-csrf-token': await csrf(viewer.page) },
      data: { datasetId: 1, bearingsDeg: [0] },
    });
    expect(refused.status()).toBe(403);
    await shot(viewer.page, 'calibration-viewer');
    await viewer.context.close();
  }, 180_000);
});
