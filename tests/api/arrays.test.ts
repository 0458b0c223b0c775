/**
 * The v1 arrays API (docs/conventions.md §7) against a real temporary database:
 * create, read and patch with metrics; immutable revisions; the role matrix;
 * 422s naming the field; bearer tokens; CSRF refusals that write nothing.
 *
 * Sources of the metric values: a numpy/scipy evaluation of the array factor written by the
 * committed generator fixtures/doa/generate_check_values.py (`arrayMetrics` in
 * fixtures/doa/check-values.json) and the computed values of docs/references.md §3. Where
 * an answer's `metrics` is compared with `arrayMetrics()` of lib/doa, that is a consistency
 * check (the API serves the library's figures), not an outside check.
 */
import { describe, expect, it } from 'vitest';
import { ApiToken, ArrayDesign, ArrayRevision, AuditEvent } from '@/models';
import { arrayMetrics } from '@/lib/doa/design/array-figures';
import checkValues from '@/fixtures/doa/check-values.json';
import { propagationSpeed } from '@/lib/doa/design/medium';
import { randomSecret, sha256Hex } from '@/lib/auth/secrets';
import * as arrays from '@/app/api/v1/arrays/route';
import * as arrayById from '@/app/api/v1/arrays/[id]/route';
import * as revisionById from '@/app/api/v1/arrays/[id]/revisions/[rev]/route';
import { browserHeaders, everyone, json, params, req, userOf, type Who } from '../helpers/api';

const tenElements = { name: 'Ten at half a wavelength', elements: 10, spacing: { value: 0.5, unit: 'wavelength' } };

async function create(body: unknown, who: Who = 'engineer') {
  return arrays.POST(req('POST', '/api/v1/arrays', { body, headers: await browserHeaders(who) }), params({}));
}
async function get(id: number | string, who: Who = 'viewer') {
  return arrayById.GET(
    req('GET', `/api/v1/arrays/${id}`, { headers: await browserHeaders(who) }),
    params({ id: String(id) }),
  );
}
async function patch(id: number | string, body: unknown, who: Who = 'engineer') {
  return arrayById.PATCH(
    req('PATCH', `/api/v1/arrays/${id}`, { body, headers: await browserHeaders(who) }),
    params({ id: String(id) }),
  );
}
async function counts() {
  return { arrays: await ArrayDesign.count(), revisions: await ArrayRevision.count(), audit: await AuditEvent.count() };
}

const close = (got: number, want: number, tol: number) =>
  expect(Math.abs(got - want), `${got} vs ${want}`).toBeLessThanOrEqual(tol);

interface Metrics {
  apertureWavelengths: number;
  halfPowerBeamwidthDeg: number;
  rayleighGapDeg: number;
  peakSidelobeDb: number;
  gratingLobeFreeScanDeg: number;
}
/** Outside check: the numpy evaluation for (M, d); HPBW to the 0.001° of docs/conventions.md §5. */
function expectNumpyMetrics(metrics: Metrics, elements: number, spacingWavelengths: number) {
  const ref = checkValues.arrayMetrics.find(
    (r) => r.elements === elements && r.spacingWavelengths === spacingWavelengths,
  )!;
  expect(ref, `no numpy reference for M = ${elements}, d = ${spacingWavelengths}`).toBeDefined();
  close(metrics.apertureWavelengths, ref.apertureWavelengths, 1e-12);
  close(metrics.halfPowerBeamwidthDeg, ref.halfPowerBeamwidthDeg, 1e-3);
  close(metrics.rayleighGapDeg, ref.rayleighGapDeg, 1e-9);
  close(metrics.peakSidelobeDb, ref.peakSidelobeDb, 1e-4);
  close(metrics.gratingLobeFreeScanDeg, ref.gratingLobeFreeScanDeg, 1e-9);
}

describe('create and read, with metrics', () => {
  it('POST answers 201 with the array as GET gives it; metrics match numpy and docs/references.md §3, and arrayMetrics() (consistency check)', async () => {
    const res = await create(tenElements);
    expect(res.status).toBe(201);
    const created = await json(res);
    expect(Object.keys(created).slice(0, 6)).toEqual([
      'id',
      'name',
      'revision',
      'elements',
      'spacingWavelengths',
      'metrics',
    ]);
    expect(created).toMatchObject({ name: tenElements.name, revision: 1, elements: 10, spacingWavelengths: 0.5 });
    // Neither a frequency nor a speed (nor a medium) was given, so neither is reported.
    expect(created).not.toHaveProperty('frequencyHz');
    expect(created).not.toHaveProperty('propagationSpeedMps');
    expect(Object.keys(created.metrics).sort()).toEqual([
      'apertureWavelengths',
      'gratingLobeFreeScanDeg',
      'halfPowerBeamwidthDeg',
      'peakSidelobeDb',
      'rayleighGapDeg',
    ]);
    expect(created.metrics).toEqual(arrayMetrics(10, 0.5)); // consistency check: the API serves lib/doa's figures
    expectNumpyMetrics(created.metrics, 10, 0.5);

    // docs/references.md §3 [computed from the closed-form array factor, numpy]: M = 10, d = λ/2 at broadside:
    // HPBW 10.2092°, Rayleigh 11.537°, peak sidelobe −12.966 dB; aperture (M−1)·d = 4.5 λ (docs/conventions.md §5);
    // d ≤ 0.5 scans to 90° without a grating lobe (docs/conventions.md §5).
    close(created.metrics.halfPowerBeamwidthDeg, 10.2092, 5e-5);
    close(created.metrics.rayleighGapDeg, 11.537, 5e-4);
    close(created.metrics.peakSidelobeDb, -12.966, 5e-4);
    expect(created.metrics.apertureWavelengths).toBe(4.5);
    expect(created.metrics.gratingLobeFreeScanDeg).toBe(90);

    const read = await get(created.id);
    expect(read.status).toBe(200);
    expect(await json(read)).toEqual(created);
  });

  it('M = 16 at λ/2 gives HPBW 6.3587°, Rayleigh 7.181° and sidelobe −13.147 dB (docs/references.md §3, computed; and numpy)', async () => {
    const body = await json(
      await create({ name: 'Sixteen', elements: 16, spacing: { value: 0.5, unit: 'wavelength' } }),
    );
    expectNumpyMetrics(body.metrics, 16, 0.5);
    const eight = await json(await create({ name: 'Eight', elements: 8, spacing: { value: 0.5, unit: 'wavelength' } }));
    expectNumpyMetrics(eight.metrics, 8, 0.5);
    close(body.metrics.halfPowerBeamwidthDeg, 6.3587, 5e-5);
    close(body.metrics.rayleighGapDeg, 7.181, 5e-4);
    close(body.metrics.peakSidelobeDb, -13.147, 5e-4);
  });

  it('spacing in millimetres at 10 GHz in radio resolves to wavelengths with c = 299 792 458 m/s', async () => {
    // docs/references.md §1: λ at 10 GHz = 0.0299792 m, so λ/2 = 14.990 mm; 14.9896229 mm is exactly λ/2.
    const res = await create({
      name: 'X-band row',
      elements: 8,
      spacing: { value: 14.9896229, unit: 'mm' },
      frequencyHz: 10e9,
      propagationSpeedMps: 299_792_458,
    });
    expect(res.status).toBe(201);
    const body = await json(res);
    expect(body.frequencyHz).toBe(10e9);
    expect(body.propagationSpeedMps).toBe(299_792_458);
    close(body.spacingWavelengths, 0.5, 1e-9);
    // docs/references.md §3 [computed]: M = 8 at λ/2, peak sidelobe −12.797 dB, Rayleigh 14.478°.
    close(body.metrics.peakSidelobeDb, -12.797, 5e-4);
    close(body.metrics.rayleighGapDeg, 14.478, 5e-4);
  });

  it('a sea-water medium stands in for the speed; the revision stores the resolved speed (Mackenzie 1981 check value)', async () => {
    // docs/references.md §2: Mackenzie (1981) at T = 25 °C, S = 35 ppt, D = 1000 m gives 1550.744 m/s (published check value).
    const medium = { kind: 'sea-water', temperatureC: 25, salinityPpt: 35, depthM: 1000, equation: 'mackenzie-1981' };
    const res = await create({
      name: 'Deep line',
      elements: 12,
      spacing: { value: 0.25, unit: 'm' },
      frequencyHz: 3000,
      medium,
    });
    expect(res.status).toBe(201);
    const body = await json(res);
    close(body.propagationSpeedMps, 1550.744, 5e-4);
    expect(body.propagationSpeedMps).toBe(
      propagationSpeed({ kind: 'sea-water', equation: 'mackenzie', temperatureC: 25, salinityPsu: 35, depthM: 1000 })
        .speedMps,
    );
    close(body.spacingWavelengths, (0.25 * 3000) / body.propagationSpeedMps, 1e-12);
    expect(body.metrics).toEqual(arrayMetrics(12, body.spacingWavelengths)); // consistency check
    const row = await ArrayRevision.findOne({ where: { arrayId: body.id, revision: 1 } });
    expect(row!.propagationSpeedMps).toBe(body.propagationSpeedMps);
    expect(row!.frequencyHz).toBe(3000);
    expect((row!.config as { medium: unknown }).medium).toEqual(medium);
  });

  it('d between 0.5 and 1 scans to asin(1/d − 1); d ≥ 1 has no grating-lobe-free scan (docs/conventions.md §5)', async () => {
    const b = await json(await create({ name: 'Wide', elements: 6, spacing: { value: 0.75, unit: 'wavelength' } }));
    close(b.metrics.gratingLobeFreeScanDeg, (Math.asin(1 / 0.75 - 1) * 180) / Math.PI, 1e-12);
    expectNumpyMetrics(b.metrics, 6, 0.75);
    const c = await json(await create({ name: 'Wider', elements: 6, spacing: { value: 1.2, unit: 'wavelength' } }));
    expect(c.metrics.gratingLobeFreeScanDeg).toBe(0);
  });

  it('GET /api/v1/arrays lists the team’s arrays at their latest revision in {"items": […]}', async () => {
    const res = await arrays.GET(
      req('GET', '/api/v1/arrays', { headers: await browserHeaders('reviewer') }),
      params({}),
    );
    expect(res.status).toBe(200);
    const body = await json(res);
    expect(Array.isArray(body.items)).toBe(true);
    const names = body.items.map((a: { name: string }) => a.name);
    expect(names).toContain(tenElements.name);
    // The seeded demo arrays are there too, at their latest revision.
    const portAlder = body.items.find((a: { name: string }) => a.name === 'Port Alder hydrophone line');
    expect(portAlder).toMatchObject({
      revision: 3,
      latestRevision: 3,
      elements: 16,
      author: { name: 'Tobin Hartree' },
    });
    // Consistency check: every listed array carries lib/doa's figures for its geometry.
    for (const item of body.items) expect(item.metrics).toEqual(arrayMetrics(item.elements, item.spacingWavelengths));
  });
});

describe('PATCH makes a new immutable revision', () => {
  it('merges a partial change with the latest config, answers revision + 1, and leaves old revisions as they were', async () => {
    const created = await json(
      await create({
        ...tenElements,
        name: 'Revised line',
        frequencyHz: 1000,
        medium: { kind: 'custom', speedMps: 1500 },
      }),
    );
    const r1Row = (await ArrayRevision.findOne({ where: { arrayId: created.id, revision: 1 } }))!.toJSON();

    const res = await patch(created.id, { elements: 12 });
    expect(res.status).toBe(200);
    const r2 = await json(res);
    expect(r2).toMatchObject({
      id: created.id,
      revision: 2,
      latestRevision: 2,
      elements: 12,
      spacingWavelengths: 0.5,
      frequencyHz: 1000,
      propagationSpeedMps: 1500,
    });
    expect(r2.metrics).toEqual(arrayMetrics(12, 0.5)); // consistency check
    expect(r2.config.medium).toEqual({ kind: 'custom', speedMps: 1500 });

    const r3 = await json(await patch(created.id, { spacing: { value: 0.6, unit: 'm' }, name: 'Revised line, wider' }));
    // 0.6 m at 1 kHz and 1500 m/s is 0.4 λ.
    expect(r3).toMatchObject({ revision: 3, name: 'Revised line, wider', elements: 12 });
    close(r3.spacingWavelengths, 0.4, 1e-15);

    // Revision 1 is untouched, row for row, and still readable as it was.
    expect((await ArrayRevision.findOne({ where: { arrayId: created.id, revision: 1 } }))!.toJSON()).toEqual(r1Row);
    const old = await json(
      await revisionById.GET(
        req('GET', `/api/v1/arrays/${created.id}/revisions/1`, { headers: await browserHeaders('viewer') }),
        params({ id: String(created.id), rev: '1' }),
      ),
    );
    expect(old).toMatchObject({
      revision: 1,
      latestRevision: 3,
      elements: 10,
      spacingWavelengths: 0.5,
      name: 'Revised line',
    });
    expect(old.metrics).toEqual(arrayMetrics(10, 0.5)); // consistency check
    expectNumpyMetrics(old.metrics, 10, 0.5);

    const latest = await json(await get(created.id));
    expect(latest.revision).toBe(3);
    expect(latest.revisions.map((r: { revision: number }) => r.revision)).toEqual([3, 2, 1]);
    expect(latest.revisions[0].author).toEqual({ id: (await userOf('engineer')).id, name: 'Tobin Hartree' });
    expect(await ArrayRevision.count({ where: { arrayId: created.id } })).toBe(3);
    expect(await AuditEvent.count({ where: { action: 'array.revised', target: 'Revised line, wider' } })).toBe(1);
  });

  it('a new element count resizes the per-element states; null removes an optional field', async () => {
    const states = Array.from({ length: 4 }, (_, m) => ({ enabled: m !== 2, gainDb: m, phaseDeg: 0 }));
    const created = await json(
      await create({
        name: 'States',
        elements: 4,
        spacing: { value: 0.5, unit: 'wavelength' },
        elementStates: states,
        frequencyHz: 5000,
      }),
    );
    const grown = await json(await patch(created.id, { elements: 6 }));
    expect(grown.config.elementStates).toEqual([
      ...states,
      { enabled: true, gainDb: 0, phaseDeg: 0 },
      { enabled: true, gainDb: 0, phaseDeg: 0 },
    ]);
    const cleared = await json(await patch(created.id, { frequencyHz: null }));
    expect(cleared.revision).toBe(3);
    expect(cleared).not.toHaveProperty('frequencyHz');
  });

  it('a bad patch is refused with 422 and no revision is added', async () => {
    const created = await json(await create({ ...tenElements, name: 'Guarded' }));
    const before = await counts();
    const res = await patch(created.id, { spacing: { value: 0.2, unit: 'm' } });
    expect(res.status).toBe(422);
    const body = await json(res);
    expect(Object.keys(body.error.fields)).toContain('frequencyHz');
    expect(await counts()).toEqual(before);
    expect((await json(await get(created.id))).revision).toBe(1);
  });
});

describe('bad input is refused with 422 naming the field', () => {
  const cases: { what: string; body: unknown; field: string; message: RegExp }[] = [
    {
      what: 'negative spacing',
      body: { name: 'x', elements: 8, spacing: { value: -0.5, unit: 'wavelength' } },
      field: 'spacing.value',
      message: /spacing\.value must be greater than 0/,
    },
    {
      what: 'one element',
      body: { name: 'x', elements: 1, spacing: { value: 0.5, unit: 'wavelength' } },
      field: 'elements',
      message: /at least 2/,
    },
    {
      what: 'metres without a frequency',
      body: { name: 'x', elements: 8, spacing: { value: 0.25, unit: 'm' }, propagationSpeedMps: 1500 },
      field: 'frequencyHz',
      message: /frequencyHz is required when the spacing is given in metres/,
    },
    {
      what: 'metres without a speed',
      body: { name: 'x', elements: 8, spacing: { value: 0.25, unit: 'm' }, frequencyHz: 3000 },
      field: 'propagationSpeedMps',
      message: /propagationSpeedMps \(or a medium\) is required/,
    },
    {
      what: 'a huge element count',
      body: { name: 'x', elements: 1_000_000, spacing: { value: 0.5, unit: 'wavelength' } },
      field: 'elements',
      message: /at most 512/,
    },
    {
      what: 'a fractional element count',
      body: { name: 'x', elements: 7.5, spacing: { value: 0.5, unit: 'wavelength' } },
      field: 'elements',
      message: /whole number/,
    },
    {
      what: 'a missing name',
      body: { elements: 8, spacing: { value: 0.5, unit: 'wavelength' } },
      field: 'name',
      message: /name is required/,
    },
    {
      what: 'an unknown spacing unit',
      body: { name: 'x', elements: 8, spacing: { value: 0.5, unit: 'furlong' } },
      field: 'spacing.unit',
      message: /wavelength, m or mm/,
    },
    {
      what: 'a spacing of a million wavelengths',
      body: { name: 'x', elements: 8, spacing: { value: 1e6, unit: 'wavelength' } },
      field: 'spacing.value',
      message: /at most 1000 wavelengths/,
    },
    {
      what: 'a speed that disagrees with the medium',
      body: {
        name: 'x',
        elements: 8,
        spacing: { value: 0.5, unit: 'wavelength' },
        medium: { kind: 'air', temperatureC: 20 },
        propagationSpeedMps: 1500,
      },
      field: 'propagationSpeedMps',
      message: /differs from the medium/,
    },
    {
      what: 'a bad per-element gain',
      body: {
        name: 'x',
        elements: 2,
        spacing: { value: 0.5, unit: 'wavelength' },
        elementStates: [
          { enabled: true, gainDb: 0, phaseDeg: 0 },
          { enabled: true, gainDb: 99, phaseDeg: 0 },
        ],
      },
      field: 'elementStates.1.gainDb',
      message: /±60 dB/,
    },
    { what: 'a list instead of an object', body: [1, 2], field: '_', message: /JSON object/ },
  ];
  for (const c of cases) {
    it(c.what, async () => {
      const before = await counts();
      const res = await create(c.body);
      expect(res.status).toBe(422);
      const body = await json(res);
      expect(body.error.code).toBe('validation_failed');
      expect(Object.keys(body.error.fields)).toContain(c.field);
      expect(body.error.fields[c.field].join(' ')).toMatch(c.message);
      expect(await counts()).toEqual(before);
    });
  }

  it('malformed JSON is 400 and a non-JSON content type 415', async () => {
    const headers = await browserHeaders('engineer');
    const bad = await arrays.POST(req('POST', '/api/v1/arrays', { body: '{"name": ', headers }), params({}));
    expect(bad.status).toBe(400);
    const text = await arrays.POST(
      req('POST', '/api/v1/arrays', { body: 'name=x', headers: { ...headers, 'content-type': 'text/plain' } }),
      params({}),
    );
    expect(text.status).toBe(415);
  });

  it('a non-numeric or unknown id is 404', async () => {
    expect((await get('abc')).status).toBe(404);
    expect((await get(999_999)).status).toBe(404);
    const res = await revisionById.GET(
      req('GET', '/api/v1/arrays/1/revisions/99', { headers: await browserHeaders('viewer') }),
      params({ id: String((await ArrayDesign.findOne())!.id), rev: '99' }),
    );
    expect(res.status).toBe(404);
  });
});

describe('role matrix', () => {
  // What each caller gets: anonymous 401; read for every role; write for engineer and admin;
  // another team's admin: can create in its own team, but our array is "not found".
  const expected: Record<Who, { list: number; read: number; create: number; patch: number }> = {
    anonymous: { list: 401, read: 401, create: 401, patch: 401 },
    viewer: { list: 200, read: 200, create: 403, patch: 403 },
    reviewer: { list: 200, read: 200, create: 403, patch: 403 },
    engineer: { list: 200, read: 200, create: 201, patch: 200 },
    admin: { list: 200, read: 200, create: 201, patch: 200 },
    otherAdmin: { list: 200, read: 404, create: 201, patch: 404 },
  };
  for (const who of everyone) {
    it(who, async () => {
      const ours = await json(await create({ ...tenElements, name: `Matrix target for ${who}` }, 'engineer'));
      const want = expected[who];
      const before = await counts();

      const list = await arrays.GET(req('GET', '/api/v1/arrays', { headers: await browserHeaders(who) }), params({}));
      expect(list.status).toBe(want.list);
      if (list.status === 200) {
        const names = (await json(list)).items.map((a: { name: string }) => a.name);
        expect(names.includes(ours.name)).toBe(who !== 'otherAdmin');
      }
      const read = await get(ours.id, who);
      expect(read.status).toBe(want.read);

      const patched = await patch(ours.id, { elements: 11 }, who);
      expect(patched.status).toBe(want.patch);
      if (want.patch !== 200) {
        const err = (await json(patched)).error;
        if (want.patch === 403) expect(err.message).toBe(`Your role (${who}) cannot create or edit arrays.`);
        if (want.patch === 404) expect(err.message).toMatch(/No array with id/);
        expect((await json(await get(ours.id))).revision).toBe(1);
      }

      const created = await create({ ...tenElements, name: `Made by ${who}` }, who);
      expect(created.status).toBe(want.create);
      if (want.create === 201) {
        const row = await ArrayDesign.findByPk((await json(created)).id);
        expect(row!.teamId).toBe(
          who === 'anonymous' ? undefined : (await userOf(who as Exclude<Who, 'anonymous'>)).teamId,
        );
      } else {
        expect(await ArrayDesign.count()).toBe(before.arrays);
      }
      if (who === 'anonymous') expect((await json(created)).error.code).toBe('unauthenticated');
    });
  }

  it('an old revision of another team’s array is not found either', async () => {
    const ours = await json(await create({ ...tenElements, name: 'Private line' }));
    const res = await revisionById.GET(
      req('GET', `/api/v1/arrays/${ours.id}/revisions/1`, { headers: await browserHeaders('otherAdmin') }),
      params({ id: String(ours.id), rev: '1' }),
    );
    expect(res.status).toBe(404);
  });
});

describe('bearer tokens', () => {
  it('a token acts with its user’s role in its team, needs no CSRF proof, and a revoked one is refused', async () => {
    const engineer = await userOf('engineer');
    const secret = randomSecret('sw_', 24);
    const token = await ApiToken.create({
      userId: engineer.id,
      name: 'arrays script',
      tokenHash: sha256Hex(secret),
      prefix: secret.slice(0, 9),
    });
    const auth = { authorization: `Bearer ${secret}` };
    const res = await arrays.POST(
      req('POST', '/api/v1/arrays', { body: { ...tenElements, name: 'From a script' }, headers: auth }),
      params({}),
    );
    expect(res.status).toBe(201);
    const created = await json(res);
    expect(created.author).toEqual({ id: engineer.id, name: 'Tobin Hartree' });
    const patched = await arrayById.PATCH(
      req('PATCH', `/api/v1/arrays/${created.id}`, { body: { elements: 9 }, headers: auth }),
      params({ id: String(created.id) }),
    );
    expect(patched.status).toBe(200);
    expect((await json(patched)).revision).toBe(2);
    expect(
      (await AuditEvent.findOne({ where: { action: 'array.revised', target: 'From a script' } }))!.detail,
    ).toMatchObject({ via: 'token', revision: 2 });

    const viewer = await userOf('viewer');
    const vSecret = randomSecret('sw_', 24);
    await ApiToken.create({
      userId: viewer.id,
      name: 'viewer script',
      tokenHash: sha256Hex(vSecret),
      prefix: vSecret.slice(0, 9),
    });
    const vAuth = { authorization: `Bearer ${vSecret}` };
    expect(
      (
        await arrayById.GET(
          req('GET', `/api/v1/arrays/${created.id}`, { headers: vAuth }),
          params({ id: String(created.id) }),
        )
      ).status,
    ).toBe(200);
    expect(
      (
        await arrayById.PATCH(
          req('PATCH', `/api/v1/arrays/${created.id}`, { body: { elements: 3 }, headers: vAuth }),
          params({ id: String(created.id) }),
        )
      ).status,
    ).toBe(403);

    token.revokedAt = new Date();
    await token.save();
    const refused = await arrays.GET(req('GET', '/api/v1/arrays', { headers: auth }), params({}));
    expect(refused.status).toBe(401);
  });
});

describe('CSRF', () => {
  it('a cookie-authenticated create or patch without the CSRF proof is refused and writes nothing', async () => {
    const target = await json(await create({ ...tenElements, name: 'CSRF target' }));
    const before = await counts();
    const noCsrf = await browserHeaders('engineer', { csrf: false });
    const post = await arrays.POST(
      req('POST', '/api/v1/arrays', { body: { ...tenElements, name: 'Forged create' }, headers: noCsrf }),
      params({}),
    );
    expect(post.status).toBe(403);
    expect((await json(post)).error.code).toBe('csrf_failed');
    const p = await arrayById.PATCH(
      req('PATCH', `/api/v1/arrays/${target.id}`, { body: { elements: 3 }, headers: noCsrf }),
      params({ id: String(target.id) }),
    );
    expect(p.status).toBe(403);
    const crossSite = await arrayById.PATCH(
      req('PATCH', `/api/v1/arrays/${target.id}`, {
        body: { elements: 3 },
        headers: { ...(await browserHeaders('engineer')), origin: 'https://evil.example' },
      }),
      params({ id: String(target.id) }),
    );
    expect(crossSite.status).toBe(403);
    expect(await counts()).toEqual(before);
    expect(await ArrayDesign.count({ where: { name: 'Forged create' } })).toBe(0);
    // Reads need no CSRF proof.
    expect((await get(target.id, 'engineer')).status).toBe(200);
  });
});

describe('demo seed', () => {
  it('seeds the two invented arrays once, with a second revision on the hydrophone line; seeding again adds nothing', async () => {
    const { getDb } = await import('@/lib/db');
    const { seedDemo } = await import('@/lib/demo/seed');
    const before = await counts();
    await seedDemo(await getDb());
    expect(await counts()).toEqual(before);
    const line = await ArrayDesign.findOne({ where: { name: 'Port Alder hydrophone line' } });
    expect(line!.latestRevision).toBe(3);
    const [r1, r2, r3] = await Promise.all(
      [1, 2, 3].map((revision) => ArrayRevision.findOne({ where: { arrayId: line!.id, revision } })),
    );
    // Mackenzie (1981) at 9 °C, 34 ppt, 40 m; d = 0.25 m at 3 kHz.
    const c = propagationSpeed({
      kind: 'sea-water',
      equation: 'mackenzie',
      temperatureC: 9,
      salinityPsu: 34,
      depthM: 40,
    }).speedMps;
    close(r1!.spacingWavelengths, (0.25 * 3000) / c, 1e-12);
    expect(r2!.spacingWavelengths).toBe(r1!.spacingWavelengths);
    expect((r2!.config as { elementStates: { enabled: boolean }[] }).elementStates[6].enabled).toBe(false);
    // Revision 3: the hydrophone is replaced; every element is back in use.
    expect((r3!.config as { elementStates: { enabled: boolean }[] }).elementStates.every((e) => e.enabled)).toBe(true);
    const row = await ArrayDesign.findOne({ where: { name: 'Gannet Point X-band receive row' } });
    const rr = await ArrayRevision.findOne({ where: { arrayId: row!.id, revision: 1 } });
    // 15 mm at 10 GHz: λ = 29.9792458 mm (docs/references.md §1).
    close(rr!.spacingWavelengths, 15 / 29.9792458, 1e-12);
    expect(rr!.frequencyHz).toBe(10e9);
    expect(rr!.propagationSpeedMps).toBe(299_792_458);
  });
});
