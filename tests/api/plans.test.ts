/**
 * POST /api/v1/plans through the exported handler with real session cookies against the seeded
 * temporary database: the role matrix (planning stores nothing: every team member with
 * arrays.read), quantities with units, 422s that name the field or the binding constraint, and
 * the answer's recommended candidate against the numpy reference (fixtures/planner/planner.json,
 * written by fixtures/planner/generate.py; tolerance 1e-6 relative).
 */
import { describe, expect, it } from 'vitest';
import fixture from '@/fixtures/planner/planner.json';
import * as plans from '@/app/api/v1/plans/route';
import { browserHeaders, everyone, json, params, req, type Who } from '../helpers/api';

const sonar = {
  frequencyHz: 3000,
  propagationSpeedMps: 1500,
  scanSectorDeg: 45,
  targets: { accuracyDeg: 0.5, atBearingDeg: 10 },
  snrDbPerElement: 0,
  snapshots: 1000,
  method: 'esprit-ls',
  smoothing: 'auto',
};

async function post(who: Who, body: unknown, headers?: Record<string, string>) {
  const res = await plans.POST(
    req('POST', '/api/v1/plans', { body, headers: headers ?? (await browserHeaders(who)) }),
    params({}),
  );
  return { status: res.status, body: await json(res) };
}

describe('POST /api/v1/plans', () => {
  it('role matrix: anonymous 401, every signed-in role (any team) 200', async () => {
    const expected: Record<Who, number> = {
      anonymous: 401,
      viewer: 200,
      reviewer: 200,
      engineer: 200,
      admin: 200,
      otherAdmin: 200,
    };
    for (const who of everyone) expect([who, (await post(who, sonar)).status]).toEqual([who, expected[who]]);
  });

  it('a cookie request without the CSRF header is refused (403)', async () => {
    const headers = await browserHeaders('viewer', { csrf: false });
    expect((await post('viewer', sonar, headers)).status).toBe(403);
  });

  it('answers the recommended candidate of the numpy reference, with quantities given in units', async () => {
    const c = fixture.cases[0];
    const r = await post('viewer', { ...sonar, frequencyHz: '3 kHz', propagationSpeedMps: '1.5 km/s' });
    expect(r.status).toBe(200);
    const first = r.body.candidates[r.body.recommendedIndex];
    expect(first.elements).toBe(c.expected.front[0].elements);
    expect(first.snapshots).toBe(c.expected.front[0].snapshots);
    expect(first.spacingM).toBe(c.expected.spacingM);
    expect(Math.abs(first.predictedStdDeg / c.expected.front[0].predictedStdDeg - 1)).toBeLessThan(1e-6);
    expect(r.body.evaluation.frequencyHz).toBe(3000);
    expect(r.body.assumptions.length).toBeGreaterThan(3);
  });

  it('N = floor(integrationSeconds × bandwidthHz) is the snapshot budget', async () => {
    const { snapshots: _s, ...rest } = sonar;
    void _s;
    const r = await post('viewer', { ...rest, integrationSeconds: '2.5 s', bandwidthHz: '100.9 Hz' });
    expect(r.status).toBe(200);
    expect(r.body.snapshotBudget).toBe(252);
    expect(r.body.snapshotBudgetFrom).toBe('integrationSeconds');
    for (const c of r.body.candidates) expect(c.snapshots).toBeLessThanOrEqual(252);
  });

  it('a medium stands in for the speed', async () => {
    const { propagationSpeedMps: _p, ...rest } = sonar;
    void _p;
    const r = await post('viewer', {
      ...rest,
      medium: { kind: 'sea-water', equation: 'mackenzie-1981', temperatureC: 10, salinityPpt: 35, depthM: 50 },
    });
    expect(r.status).toBe(200);
    expect(r.body.propagationSpeedMps).toBeGreaterThan(1480);
    expect(r.body.propagationSpeedMps).toBeLessThan(1500);
  });

  it.each([
    [{ ...sonar, targets: { accuracyDeg: -1, atBearingDeg: 0 } }, 'targets.accuracyDeg'],
    [{ ...sonar, frequencyHz: '3 m' }, 'frequencyHz'],
    [{ ...sonar, band: { lowHz: 4000, highHz: 3000 } }, 'frequencyHz'],
    [{ ...sonar, frequencyHz: undefined, band: { lowHz: 4000, highHz: 3000 } }, 'band.lowHz'],
    [{ ...sonar, constraints: { maxApertureM: 'ten metres' } }, 'constraints.maxApertureM'],
    [{ ...sonar, integrationSeconds: 1, bandwidthHz: 10 }, 'snapshots'],
    [{ ...sonar, method: 'root-music', smoothing: 'auto' }, 'smoothing'],
    [{ ...sonar, scanSectorDeg: 95 }, 'scanSectorDeg'],
  ])('422 names the field (%#)', async (body, field) => {
    const r = await post('engineer', body);
    expect(r.status).toBe(422);
    expect(Object.keys(r.body.error.fields)).toContain(field);
    expect(r.body.error.message).toContain(field);
  });

  it('an infeasible target is a 422 naming the binding constraint and by how much', async () => {
    const r = await post('engineer', {
      ...sonar,
      targets: { accuracyDeg: 0.02, atBearingDeg: 10 },
      snapshots: 200,
      constraints: { maxElements: 16 },
    });
    expect(r.status).toBe(422);
    expect(r.body.error.fields['constraints.maxElements'][0]).toMatch(/needs at least \d+ elements .*\(\d+ more\)/);
    expect(r.body.error.fields.snapshots[0]).toMatch(/need \d+ snapshots \([\d.]+× the budget\)/);
  });

  it('a fixed spacing with grating lobes in the sector is a 422 under constraints.spacingM', async () => {
    const r = await post('engineer', { ...sonar, constraints: { spacingM: '40 cm' } });
    expect(r.status).toBe(422);
    expect(r.body.error.fields['constraints.spacingM'][0]).toMatch(/grating lobes .* too wide/);
  });
});
