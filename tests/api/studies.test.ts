/**
 * Studies through the v1 API against the real temporary SQLite (seeded):
 * create (202), poll until done, read the result; refusals (422 naming the
 * field, over-budget with how to shrink, nothing written); the role matrix.
 * The numbers are checked against the closed-form single-source stochastic
 * CRB of docs/references.md §5 (Stoica & Nehorai 1990).
 */
import { describe, expect, it } from 'vitest';
import { ArrayDesign, ArrayRevision, Study } from '@/models';
import * as studies from '@/app/api/v1/studies/route';
import * as studyById from '@/app/api/v1/studies/[id]/route';
import { browserHeaders, everyone, json, params, req, userOf, type Who } from '../helpers/api';

const small = {
  name: 'API check: root-MUSIC vs SNR',
  array: { elements: 10, spacingWavelengths: 0.5 },
  sources: { bearingsDeg: [0], powersDb: [0] },
  snapshots: 100,
  sweep: { variable: 'snr', values: [0, 10] },
  methods: ['root-music', 'esprit-tls'],
  trials: 100,
  seed: 7,
};

async function post(who: Who, body: unknown) {
  const res = await studies.POST(
    req('POST', '/api/v1/studies', { body, headers: await browserHeaders(who) }),
    params({}),
  );
  return { status: res.status, body: await json(res) };
}
async function get(who: Who, id: number | string) {
  const res = await studyById.GET(
    req('GET', `/api/v1/studies/${id}`, { headers: await browserHeaders(who) }),
    params({ id: String(id) }),
  );
  return { status: res.status, body: await json(res) };
}
async function list(who: Who) {
  const res = await studies.GET(req('GET', '/api/v1/studies', { headers: await browserHeaders(who) }), params({}));
  return { status: res.status, body: await json(res) };
}
async function del(who: Who, id: number | string) {
  const res = await studyById.DELETE(
    req('DELETE', `/api/v1/studies/${id}`, { headers: await browserHeaders(who) }),
    params({ id: String(id) }),
  );
  return { status: res.status };
}
async function waitDone(id: number, who: Who = 'engineer') {
  const seen: number[] = [];
  for (let i = 0; i < 600; i++) {
    const r = await get(who, id);
    seen.push(r.body.progress);
    if (r.body.status === 'done' || r.body.status === 'failed') return { ...r, seen };
    await new Promise((resolve) => setTimeout(resolve, 25));
  }
  throw new Error('study did not finish');
}

function closedFormCrbDeg(m: number, n: number, snr: number): number {
  const g = Math.PI; // 2π·d·cos 0 with d = λ/2
  return (Math.sqrt((6 / (n * snr * m * (m * m - 1) * g * g)) * (1 + 1 / (m * snr))) * 180) / Math.PI;
}

describe('POST /api/v1/studies → poll → result', () => {
  it('answers 202 {id, status}, reports progress, and stores per-point results near the CRB', async () => {
    const created = await post('engineer', small);
    expect(created.status, JSON.stringify(created.body)).toBe(202);
    expect(Object.keys(created.body).sort()).toEqual(['id', 'status']);
    expect(created.body.status).toBe('queued');
    const done = await waitDone(created.body.id);
    expect(done.body.status, done.body.error).toBe('done');
    expect(done.body.progress).toBe(1);
    expect(done.body.inputs.spec.trials).toBe(100);
    const points = done.body.result.points;
    expect(points.map((p: { value: number }) => p.value)).toEqual([0, 10]);
    for (const p of points) {
      // docs/references.md §5 closed form (0 dB: 0.148911°).
      expect(p.crbStdDeg[0]).toBeCloseTo(closedFormCrbDeg(10, 100, 10 ** (p.value / 10)), 9);
      const rm = p.methods.find((m: { method: string }) => m.method === 'root-music');
      // 100 trials: sampling error of the RMSE ≈ 7 %, so a looser bound than the unit test's 1.15.
      expect(rm.rmseDeg / p.crbStdDeg[0]).toBeLessThan(1.25);
      expect(rm.rmseDeg / p.crbStdDeg[0]).toBeGreaterThan(0.8);
    }
    const listed = await list('viewer');
    expect(listed.status).toBe(200);
    expect(listed.body.items.some((s: { id: number }) => s.id === created.body.id)).toBe(true);
    expect(listed.body.items[0].result).toBeUndefined();
  }, 60_000);

  it('uses an array revision of the team when given arrayId', async () => {
    const engineer = await userOf('engineer');
    // an array of the demo team whose latest revision has no disabled elements
    const arrays = await ArrayDesign.findAll({ where: { teamId: engineer.teamId as number } });
    let array: ArrayDesign | null = null;
    for (const a of arrays) {
      const rev = await ArrayRevision.findOne({ where: { arrayId: a.id, revision: a.latestRevision } });
      const states = (rev?.config as { elementStates?: { enabled?: boolean }[] }).elementStates ?? [];
      if (rev && !states.some((s) => s && s.enabled === false)) array = a;
    }
    expect(array).not.toBeNull();
    const created = await post('engineer', {
      ...small,
      array: undefined,
      arrayId: array!.id,
      trials: 5,
      methods: ['esprit-ls'],
    });
    expect(created.status, JSON.stringify(created.body)).toBe(202);
    const done = await waitDone(created.body.id);
    expect(done.body.inputs.array.arrayId).toBe(array!.id);
    expect(done.body.arrayRevisionId).toBe(done.body.inputs.array.arrayRevisionId);
    // another team's admin cannot use it
    const other = await post('otherAdmin', { ...small, array: undefined, arrayId: array!.id, trials: 5 });
    expect(other.status).toBe(404);
  }, 60_000);
});

describe('refusals (nothing written)', () => {
  const cases: Array<[string, Record<string, unknown>, string]> = [
    ['no array', { array: undefined }, 'array'],
    ['bad method', { methods: ['fourier'] }, 'methods'],
    ['zero trials', { trials: 0 }, 'trials'],
    ['bearing out of range', { sources: { bearingsDeg: [95], powersDb: [0] } }, 'sources'],
    ['powers count', { sources: { bearingsDeg: [0, 5], powersDb: [0] } }, 'sources'],
    ['sweep variable', { sweep: { variable: 'aperture', values: [1] } }, 'sweep'],
    [
      'K ≥ M at a point',
      { sources: { bearingsDeg: [-10, 0, 10], powersDb: [0, 0, 0] }, sweep: { variable: 'elements', values: [3, 10] } },
      'sweep.values',
    ],
    ['fractional N', { sweep: { variable: 'snapshots', values: [10.5] } }, 'sweep.values'],
  ];
  for (const [label, patch, field] of cases) {
    it(`${label} → 422 naming ${field}`, async () => {
      const before = await Study.count();
      const res = await post('engineer', { ...small, ...patch });
      expect(res.status, JSON.stringify(res.body)).toBe(422);
      expect(res.body.error.code).toBe('validation_failed');
      expect(Object.keys(res.body.error.fields)).toContain(field);
      expect(res.body.error.message).toContain(field);
      expect(await Study.count()).toBe(before);
    });
  }

  it('over the budget → 422 that says how to shrink it', async () => {
    const before = await Study.count();
    const res = await post('engineer', {
      ...small,
      array: { elements: 64, spacingWavelengths: 0.5 },
      methods: ['music', 'mvdr', 'bartlett'],
      trials: 5000,
      sweep: { variable: 'snr', values: [0, 5, 10, 15, 20] },
    });
    expect(res.status).toBe(422);
    expect(res.body.error.fields.trials).toBeDefined();
    expect(res.body.error.message).toMatch(/over the compute budget/);
    expect(res.body.error.message).toMatch(/at most \d+ trials/);
    expect(await Study.count()).toBe(before);
  });

  it('malformed JSON → 400', async () => {
    const headers = await browserHeaders('engineer');
    const res = await studies.POST(
      new Request('http://localhost:3000/api/v1/studies', {
        method: 'POST',
        body: '{',
        headers: { ...headers, 'content-type': 'application/json' },
      }),
      params({}),
    );
    expect(res.status).toBe(400);
  });
});

describe('role matrix', () => {
  const expectCreate: Record<Who, number> = {
    anonymous: 401,
    viewer: 403,
    reviewer: 403,
    engineer: 202,
    admin: 202,
    otherAdmin: 202,
  };
  const expectRead: Record<Who, number> = {
    anonymous: 401,
    viewer: 200,
    reviewer: 200,
    engineer: 200,
    admin: 200,
    otherAdmin: 404,
  };
  const expectDelete: Record<Who, number> = {
    anonymous: 401,
    viewer: 403,
    reviewer: 403,
    engineer: 204,
    admin: 204,
    otherAdmin: 404,
  };
  const tiny = { ...small, trials: 2, methods: ['esprit-ls'] };

  for (const who of everyone) {
    it(`${who}: create ${expectCreate[who]}, list, read ${expectRead[who]}, delete ${expectDelete[who]}`, async () => {
      const created = await post(who, tiny);
      expect(created.status, JSON.stringify(created.body)).toBe(expectCreate[who]);
      // the refusal names studies, not estimates
      if (created.status === 403) expect(created.body.error.message).toBe(`Your role (${who}) cannot run studies.`);
      if (created.status === 202) await waitDone(created.body.id, who);
      if (who === 'otherAdmin' && created.status === 202) {
        // the other team's own study is invisible to the demo team
        expect((await get('engineer', created.body.id)).status).toBe(404);
      }
      // a demo-team study as the target
      const target = await post('engineer', tiny);
      await waitDone(target.body.id);
      expect((await list(who)).status).toBe(who === 'anonymous' ? 401 : 200);
      if (who === 'otherAdmin')
        expect((await list(who)).body.items.some((s: { id: number }) => s.id === target.body.id)).toBe(false);
      expect((await get(who, target.body.id)).status).toBe(expectRead[who]);
      expect((await del(who, target.body.id)).status).toBe(expectDelete[who]);
      const after = await Study.findByPk(target.body.id);
      expect(after === null).toBe(expectDelete[who] === 204);
    }, 60_000);
  }

  it('unknown and malformed ids are 404', async () => {
    expect((await get('engineer', 999999)).status).toBe(404);
    expect((await get('engineer', 'abc')).status).toBe(404);
  });
});
