/**
 * Calibrations through the v1 API against the real temp SQLite: reference CSVs simulated
 * with known element errors (tests/lib/doa/calibration-helpers.ts) are uploaded, fitted on
 * the worker pool, and answered with a new revision whose element states hold the fit;
 * bad inputs are 422 naming the field, with nothing stored.
 */
import { beforeAll, describe, expect, it } from 'vitest';
import * as arraysRoute from '@/app/api/v1/arrays/route';
import * as calibrationsRoute from '@/app/api/v1/arrays/[id]/calibrations/route';
import * as calibrationById from '@/app/api/v1/arrays/[id]/calibrations/[calibrationId]/route';
import * as acceptRoute from '@/app/api/v1/arrays/[id]/calibrations/[calibrationId]/accept/route';
import { ArrayRevision, AuditEvent, Calibration, Job } from '@/models';
import { browserHeaders, json, params, req, type Who } from '../helpers/api';
import { upload } from './datasets.helpers';
import { csvOf, float32Wav, oddChannelsLate, randomStates, simulateReference } from '../lib/doa/calibration-helpers';
import { simulateBroadband } from '@/lib/doa/wideband/simulate';

const M = 8;
const D = 0.5;
// Seeded; the σ themselves are checked over 40 seeds in tests/lib/doa/calibration.test.ts.
const truth = randomStates(M, 42);

async function reference(
  name: string,
  bearingsDeg: number[],
  seed: number,
  opts: { snapshots?: number; elements?: number } = {},
) {
  const rows = simulateReference({
    elements: opts.elements ?? M,
    spacingWavelengths: D,
    bearingsDeg,
    noisePower: 0.01,
    snapshots: opts.snapshots ?? 1000,
    seed,
    states: opts.elements && opts.elements !== M ? randomStates(opts.elements, 3) : truth,
  });
  const up = await upload('engineer', `${name}.csv`, csvOf(rows));
  expect(up.status, JSON.stringify(up.body)).toBe(201);
  return up.body.id as number;
}

async function post(who: Who, arrayId: number, body: unknown, headers: Record<string, string> = {}) {
  const res = await calibrationsRoute.POST(
    req('POST', `/api/v1/arrays/${arrayId}/calibrations`, {
      body,
      headers: { ...(await browserHeaders(who)), ...headers },
    }),
    params({ id: String(arrayId) }),
  );
  return { status: res.status, body: await json(res) };
}

async function stored() {
  return {
    calibrations: await Calibration.count(),
    jobs: await Job.count({ where: { kind: 'calibration' } }),
    revisions: await ArrayRevision.count(),
  };
}

let arrayId = 0;
const ds = { at20: 0, at_45: 0, at40: 0, short: 0, sixChannels: 0 };

beforeAll(async () => {
  const res = await arraysRoute.POST(
    req('POST', '/api/v1/arrays', {
      body: { name: 'Calibration test line', elements: M, spacing: { value: D, unit: 'wavelength' } },
      headers: await browserHeaders('engineer'),
    }),
    params({}),
  );
  expect(res.status).toBe(201);
  arrayId = (await json(res)).id;
  ds.at20 = await reference('ref-20', [20], 1);
  ds.at_45 = await reference('ref-minus-45', [-45], 2);
  ds.at40 = await reference('ref-40', [40], 3);
  ds.short = await reference('short', [20], 4, { snapshots: 5 });
  ds.sixChannels = await reference('six', [20], 5, { elements: 6 });
}, 60_000);

describe('POST /api/v1/arrays/{id}/calibrations', () => {
  it('one reference: 201 with the new revision holding the fitted states, and the report', async () => {
    const before = await stored();
    const res = await post('engineer', arrayId, { datasetId: ds.at20, bearingsDeg: [20] });
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    const { revision, report, elementStates } = res.body;
    expect(revision.revision).toBe(before.revisions ? revision.revision : 2);
    expect(revision.config.elementStates).toHaveLength(M);
    expect(report.method).toBe('known-bearings');
    expect(report.verdict.status).toBe('supported');
    expect(report.elements).toHaveLength(M);
    for (let i = 1; i < M; i++) {
      const e = report.elements[i];
      // Within 3σ of the simulated truth (σ from the jackknife), and the revision holds the estimate.
      expect(Math.abs(e.gainDb - truth[i].gainDb)).toBeLessThanOrEqual(3 * e.gainStdDb);
      expect(Math.abs(e.phaseDeg - truth[i].phaseDeg)).toBeLessThanOrEqual(3 * e.phaseStdDeg);
      expect(revision.config.elementStates[i].gainDb).toBeCloseTo(elementStates[i].gainDb, 3);
      expect(revision.config.elementStates[i].phaseDeg).toBeCloseTo(elementStates[i].phaseDeg, 2);
      expect(revision.config.elementStates[i].enabled).toBe(true);
    }
    expect(report.residual).toBeLessThan(report.residualUncalibrated);
    const after = await stored();
    expect(after.calibrations).toBe(before.calibrations + 1);
    expect(after.revisions).toBe(before.revisions + 1);
    expect(await AuditEvent.count({ where: { action: 'calibration.accepted' } })).toBeGreaterThan(0);

    const one = await calibrationById.GET(
      req('GET', `/api/v1/arrays/${arrayId}/calibrations/${res.body.id}`, { headers: await browserHeaders('viewer') }),
      params({ id: String(arrayId), calibrationId: String(res.body.id) }),
    );
    expect(one.status).toBe(200);
    const body = await json(one);
    expect(body.acceptedRevision).toBe(revision.revision);
    expect(body.status).toBe('done');
    const list = await calibrationsRoute.GET(
      req('GET', `/api/v1/arrays/${arrayId}/calibrations`, { headers: await browserHeaders('viewer') }),
      params({ id: String(arrayId) }),
    );
    expect((await json(list)).items.map((c: { id: number }) => c.id)).toContain(res.body.id);
  });

  it('several references jointly, as a proposal, then accepted once', async () => {
    const res = await post('engineer', arrayId, {
      references: [
        { datasetId: ds.at20, bearingsDeg: [20] },
        { datasetId: ds.at_45, bearingsDeg: [-45] },
        { datasetId: ds.at40, bearingsDeg: [40] },
      ],
      accept: false,
    });
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    expect(res.body.revision).toBeNull();
    expect(res.body.acceptedRevision).toBeNull();
    expect(res.body.report.references).toHaveLength(3);
    for (const r of res.body.report.references) expect(r.consistency.disagrees).toBe(false);
    expect(res.body.report.verdict.supported).toBe(true);
    const call = async (who: Who) => {
      const a = await acceptRoute.POST(
        req('POST', `/api/v1/arrays/${arrayId}/calibrations/${res.body.id}/accept`, {
          headers: await browserHeaders(who),
        }),
        params({ id: String(arrayId), calibrationId: String(res.body.id) }),
      );
      return { status: a.status, body: await json(a) };
    };
    expect((await call('viewer')).status).toBe(403);
    const accepted = await call('engineer');
    expect(accepted.status).toBe(201);
    expect(accepted.body.acceptedRevision).toBe(accepted.body.revision.revision);
    expect((await call('engineer')).status).toBe(409);
  });

  it('self-calibration is available as an option, labelled with its assumptions', async () => {
    const res = await post('engineer', arrayId, {
      references: [
        { datasetId: ds.at_45, bearingsDeg: [-43] },
        { datasetId: ds.at20, bearingsDeg: [22] },
      ],
      method: 'self-calibration',
      accept: false,
    });
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    expect(res.body.report.method).toBe('self-calibration');
    expect(res.body.report.assumptions.join(' ')).toMatch(/linear trend/);
    expect(res.body.report.references[0].fittedBearingsDeg).toHaveLength(1);
  });

  it('Prefer: respond-async answers 202 with the queued proposal', async () => {
    const res = await post('engineer', arrayId, { datasetId: ds.at20, bearingsDeg: [20] }, { prefer: 'respond-async' });
    expect(res.status).toBe(202);
    expect(res.body.revision).toBeNull();
    expect(['queued', 'running', 'done']).toContain(res.body.status);
  });
});

describe('bad inputs: 422 naming the field, nothing stored', () => {
  const cases: [string, () => unknown, string][] = [
    ['a reference with fewer snapshots than elements', () => ({ datasetId: ds.short, bearingsDeg: [20] }), 'datasetId'],
    ['known bearings outside ±90°', () => ({ datasetId: ds.at20, bearingsDeg: [20, 95] }), 'bearingsDeg.1'],
    [
      'a bearing outside ±90° in the joint form',
      () => ({ references: [{ datasetId: ds.at20, bearingsDeg: [-91] }] }),
      'references.0.bearingsDeg.0',
    ],
    ['a dataset whose channel count differs', () => ({ datasetId: ds.sixChannels, bearingsDeg: [20] }), 'datasetId'],
    [
      'a channel count that differs in the second reference',
      () => ({
        references: [
          { datasetId: ds.at20, bearingsDeg: [20] },
          { datasetId: ds.sixChannels, bearingsDeg: [20] },
        ],
      }),
      'references.1.datasetId',
    ],
    [
      'a recording with no signal at the bearing given',
      () => ({ datasetId: ds.at20, bearingsDeg: [-50] }),
      'bearingsDeg.0',
    ],
    [
      'no signal at the bearing given in the joint form',
      () => ({
        references: [
          { datasetId: ds.at20, bearingsDeg: [20] },
          { datasetId: ds.at40, bearingsDeg: [-10] },
        ],
      }),
      'references.1.bearingsDeg.0',
    ],
    ['neither form', () => ({ frequencyHz: 1000 }), 'datasetId'],
  ];
  for (const [name, body, field] of cases) {
    it(`${name} → 422 on ${field}`, async () => {
      const before = await stored();
      const res = await post('engineer', arrayId, body());
      expect(res.status, JSON.stringify(res.body)).toBe(422);
      expect(Object.keys(res.body.error.fields)).toContain(field);
      expect(res.body.error.message).toContain(field);
      expect(await stored()).toEqual(before);
    });
  }

  it('viewers and reviewers may not calibrate (403), nothing stored', async () => {
    const before = await stored();
    for (const who of ['viewer', 'reviewer'] as const) {
      const res = await post(who, arrayId, { datasetId: ds.at20, bearingsDeg: [20] });
      expect(res.status).toBe(403);
    }
    expect(await stored()).toEqual(before);
  });
});

describe('a WAV reference with every second channel one sample late', () => {
  it('frequencyHz re-analyses it there: −45° on elements 2, 4, … at bin 32 of 256', async () => {
    const fs = 16000;
    const res = await arraysRoute.POST(
      req('POST', '/api/v1/arrays', {
        body: {
          name: 'Calibration WAV line',
          elements: 8,
          spacing: { value: 0.375, unit: 'm' },
          frequencyHz: 2000,
          propagationSpeedMps: 1500,
        },
        headers: await browserHeaders('engineer'),
      }),
      params({}),
    );
    expect(res.status).toBe(201);
    const wavArray = (await json(res)).id as number;
    const channels = simulateBroadband({
      elements: 8,
      spacingM: 0.375,
      propagationSpeedMps: 1500,
      sampleRate: fs,
      durationS: 4,
      sources: [{ trajectory: [{ tS: 0, bearingDeg: 30 }], rms: 0.1, bandHz: [1000, 3000] }],
      noiseRms: 0.005,
      seed: 9,
      interpolationHalfLength: 8,
      firTaps: 63,
    });
    // Uploaded with another analysis frequency; the calibration names the one it holds for.
    const up = await upload('engineer', 'late.wav', float32Wav(oddChannelsLate(channels), fs), {
      frequencyHz: 1500,
      fftLength: 256,
    });
    expect(up.status, JSON.stringify(up.body)).toBe(201);
    const cal = await post('engineer', wavArray, { datasetId: up.body.id, bearingsDeg: [30], frequencyHz: 2000 });
    expect(cal.status, JSON.stringify(cal.body)).toBe(201);
    expect(cal.body.inputs.analysisFrequencyHz).toBe(2000);
    expect(cal.body.inputs.spacingWavelengths).toBeCloseTo(0.5, 12);
    cal.body.elementStates.forEach((s: { gainDb: number; phaseDeg: number }, i: number) => {
      // A one-sample delay at bin k of L is exp(−j·2π·k/L): k = round(2000·256/16000) = 32, so −45° (docs/conventions.md §6).
      expect(Math.abs(s.phaseDeg - (i % 2 ? -45 : 0))).toBeLessThan(1);
      expect(Math.abs(s.gainDb)).toBeLessThan(0.2);
    });
    expect(cal.body.revision.config.elementStates[1].phaseDeg).toBeCloseTo(cal.body.elementStates[1].phaseDeg, 2);
  });
});
