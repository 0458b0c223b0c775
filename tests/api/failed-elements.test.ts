/**
 * Imperfect arrays through the v1 API (docs/imperfect-arrays.md): a revision with disabled
 * elements is estimated (spectral methods on the enabled elements at their true positions,
 * ESPRIT and root-MUSIC on the longest contiguous run), and a calibrated revision's gains are
 * divided out unless `applyCalibration` is false. References: numpy,
 * fixtures/failed-elements/generate.py.
 */
import { beforeAll, describe, expect, it } from 'vitest';
import failed from '@/fixtures/failed-elements/failed-elements.json';
import calibration from '@/fixtures/failed-elements/apply-calibration.json';
import * as estimateById from '@/app/api/v1/estimates/[id]/route';
import * as rerunRoute from '@/app/api/v1/estimates/[id]/rerun/route';
import { ArrayDesign, ArrayRevision, EstimateRun } from '@/models';
import { browserHeaders, json, params, req, userOf } from '../helpers/api';
import { estimate, footprint } from './datasets.helpers';

type States = { enabled: boolean; gainDb: number; phaseDeg: number }[];

async function makeArray(name: string, elements: number, elementStates: States): Promise<number> {
  const engineer = await userOf('engineer');
  const a = await ArrayDesign.create({ teamId: engineer.teamId as number, name, latestRevision: 1 } as never);
  await ArrayRevision.create({
    arrayId: a.id,
    revision: 1,
    config: { name, elements, spacing: { value: 0.5, unit: 'wavelength' }, elementStates },
    elements,
    spacingWavelengths: 0.5,
  } as never);
  return a.id;
}

async function getRun(id: number) {
  return json(
    await estimateById.GET(
      req('GET', `/api/v1/estimates/${id}`, { headers: await browserHeaders('engineer') }),
      params({ id: String(id) }),
    ),
  );
}

describe('a 16-element line with elements 5 and 14 disabled', () => {
  let arrayId = 0;
  beforeAll(async () => {
    arrayId = await makeArray(
      'Line with two flooded hydrophones',
      16,
      Array.from({ length: 16 }, (_, i) => ({ enabled: !failed.disabled.includes(i), gainDb: 0, phaseDeg: 0 })),
    );
  });

  it('spectral methods on the true positions and ESPRIT/root-MUSIC on the longest run match numpy', async () => {
    const res = await estimate('engineer', {
      snapshots: failed.rows,
      arrayId,
      methods: ['music', 'bartlett', 'mvdr', 'esprit-ls', 'esprit-tls', 'esprit-unitary', 'root-music'],
      sourceCount: 3,
    });
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    const run = await getRun(res.body.id);
    expect(run.inputs.array.disabledElements).toEqual([5, 14]);
    for (const r of run.results) {
      const spectral = ['music', 'bartlett', 'mvdr'].includes(r.method);
      const want = spectral
        ? failed.truePositions[r.method as 'music'].bearingsDeg
        : failed.longestRunBearingsDeg[r.method as 'esprit-ls'];
      for (let i = 0; i < 3; i++) expect(Math.abs(r.bearingsDeg[i] - want[i]), r.method).toBeLessThan(1e-6);
      expect(r.elementSelection.kind).toBe(spectral ? 'enabled-true-positions' : 'longest-contiguous-run');
      const w = r.warnings.find((x: { code: string }) => x.code === 'element-subset');
      expect(w.message).toMatch(spectral ? /14 enabled elements at their true positions/ : /6–13 \(8 of 16/);
      // What it costs in the CRB (numpy: enabled/full ≈ 1.07, run/enabled ≈ 2.78 at the true parameters).
      const ratio = Number(/enabled elements is ([\d.]+)× that of the full 16-element line/.exec(w.message)![1]);
      expect(ratio).toBeGreaterThan(1);
      expect(ratio).toBeLessThan(1.15);
      if (!spectral) {
        const run8 = Number(/8-element run ([\d.]+)× that of the enabled elements/.exec(w.message)![1]);
        expect(run8).toBeGreaterThan(2.3);
        expect(run8).toBeLessThan(3.3);
      }
      // The ±σ is the CRB of the enabled elements at their true positions.
      expect(r.uncertainty.basis).toContain('the 14 enabled elements of a 16-element line at their true positions');
      for (let i = 0; i < 3; i++)
        expect(Math.abs(r.uncertainty.crbStdDeg[i] / failed.crbStdDeg.enabled[i] - 1)).toBeLessThan(0.35);
    }
  });

  it('a line with no two adjacent enabled elements refuses ESPRIT with 422 naming arrayId, and stores nothing', async () => {
    const comb = await makeArray(
      'Every other element dead',
      6,
      Array.from({ length: 6 }, (_, i) => ({ enabled: i % 2 === 0, gainDb: 0, phaseDeg: 0 })),
    );
    const snapshots = { re: failed.rows.re.map((r) => r.slice(0, 6)), im: failed.rows.im.map((r) => r.slice(0, 6)) };
    const before = await footprint();
    const res = await estimate('engineer', { snapshots, arrayId: comb, method: 'esprit-ls', sourceCount: 1 });
    expect(res.status).toBe(422);
    expect(res.body.error.fields.arrayId[0]).toMatch(/adjacent/);
    expect(await footprint()).toEqual(before);
    // MUSIC on the three enabled elements still runs.
    const music = await estimate('engineer', { snapshots, arrayId: comb, method: 'music', sourceCount: 1 });
    expect(music.status, JSON.stringify(music.body)).toBe(201);
  });

  it('K must be below the elements a method uses (8 for ESPRIT here)', async () => {
    const res = await estimate('engineer', { snapshots: failed.rows, arrayId, method: 'esprit-ls', sourceCount: 8 });
    expect(res.status).toBe(422);
    expect(res.body.error.fields.sourceCount[0]).toContain('8 effective elements');
  });
});

describe('a calibrated revision', () => {
  let arrayId = 0;
  beforeAll(async () => {
    arrayId = await makeArray(
      'Calibrated line',
      8,
      calibration.elementStates.map((s) => ({ enabled: true, ...s })),
    );
  });

  it('stores {applied: true, revision, gains} and returns the ideal array’s bearings; applyCalibration: false changes them', async () => {
    const body = { snapshots: calibration.recordedRows, arrayId, methods: ['esprit-ls', 'music'], sourceCount: 2 };
    const on = await estimate('engineer', body);
    expect(on.status, JSON.stringify(on.body)).toBe(201);
    const run = await getRun(on.body.id);
    expect(run.inputs.calibration).toMatchObject({ applied: true, revision: 1 });
    expect(run.inputs.calibration.gains).toEqual(calibration.elementStates);
    for (const r of run.results) {
      const want = calibration.idealBearingsDeg[r.method as 'music'];
      for (let i = 0; i < 2; i++) expect(Math.abs(r.bearingsDeg[i] - want[i])).toBeLessThan(1e-6);
    }

    const off = await estimate('engineer', { ...body, applyCalibration: false });
    expect(off.status).toBe(201);
    const offRun = await getRun(off.body.id);
    expect(offRun.inputs.calibration).toMatchObject({ applied: false, revision: 1 });
    expect(offRun.inputs.calibration.note).toContain('switched off');
    for (const r of offRun.results) {
      const want = calibration.uncalibratedBearingsDeg[r.method as 'music'];
      for (let i = 0; i < 2; i++) expect(Math.abs(r.bearingsDeg[i] - want[i])).toBeLessThan(1e-6);
    }
    expect(Math.abs(offRun.results[0].bearingsDeg[0] - run.results[0].bearingsDeg[0])).toBeGreaterThan(0.2);
  });

  it('a re-run applies the same calibration and reproduces', async () => {
    const on = await estimate('engineer', {
      snapshots: calibration.recordedRows,
      arrayId,
      method: 'esprit-tls',
      sourceCount: 2,
    });
    const rr = await rerunRoute.POST(
      req('POST', `/api/v1/estimates/${on.body.id}/rerun`, { headers: await browserHeaders('engineer') }),
      params({ id: String(on.body.id) }),
    );
    const body = await json(rr);
    expect(rr.status, JSON.stringify(body)).toBe(201);
    const again = await EstimateRun.findByPk(body.id);
    expect((again!.inputs as { calibration: { applied: boolean } }).calibration.applied).toBe(true);
    expect(body.bearingsDeg).toEqual(on.body.bearingsDeg);
    expect(body.comparison[0].identical).toBe(true);
  });

  it('an inline array carries no calibration: the run says so', async () => {
    const res = await estimate('engineer', {
      snapshots: calibration.recordedRows,
      array: { elements: 8, spacingWavelengths: 0.5 },
      method: 'esprit-ls',
      sourceCount: 2,
    });
    expect(res.status).toBe(201);
    expect((await getRun(res.body.id)).inputs.calibration).toEqual({
      applied: false,
      note: 'The array was given inline; it carries no calibration.',
    });
  });

  it('applyCalibration must be a boolean (422 naming the field)', async () => {
    const res = await estimate('engineer', {
      snapshots: calibration.recordedRows,
      arrayId,
      method: 'esprit-ls',
      applyCalibration: 'yes',
    });
    expect(res.status).toBe(422);
    expect(res.body.error.fields.applyCalibration[0]).toContain('applyCalibration must be true or false');
  });
});
