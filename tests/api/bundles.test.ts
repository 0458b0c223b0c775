/**
 * Hand-off bundles through the routes: GET /api/v1/arrays/{id}/bundle and
 * POST /api/v1/bundles. Round trip into another team, re-execution of runs,
 * the role matrix, and a hostile-archive corpus where every case is refused
 * with a clear message and nothing is written (rows and files counted).
 */
import { afterEach, beforeAll, describe, expect, it } from 'vitest';
import { AuditEvent, ArrayDesign, ArrayRevision, Dataset, EstimateRun, Team } from '@/models';
import { readBundle, sha256Hex } from '@/lib/bundle/bundle';
import { safeUnzip } from '@/lib/bundle/safe-unzip';
import { designFigures } from '@/lib/designer/analysis';
import { normalizeDraft } from '@/lib/designer/state';
import { arrayInputSchema } from '@/lib/validations/array';
import { beamPatternBundleOption, separationBundleOption, BUNDLE_CHART_SIZE } from '@/lib/handoff/charts';
import { renderChartSvg } from '@/lib/charts/ssr';
import type { ChartOption } from '@/lib/charts';
import * as bundleRoute from '@/app/api/v1/arrays/[id]/bundle/route';
import * as bundlesRoute from '@/app/api/v1/bundles/route';
import * as rerunRoute from '@/app/api/v1/estimates/[id]/rerun/route';
import { estimate } from './datasets.helpers';
import { browserHeaders, json, params, req, userOf, ORIGIN, type Who } from '../helpers/api';
import { buildZip, type RawEntry } from '../lib/bundle/zip-builder';
import { baseConfig, createArray, createDataset, createRun, storedFiles } from '../lib/handoff/fixtures';

let arrayId: number;
let runId: number;
let datasetId: number;
let storedBearings: { method: string; bearingsDeg: number[] }[];

beforeAll(async () => {
  const engineer = await userOf('engineer');
  const { array, revision, spacingWavelengths } = await createArray({ user: engineer });
  const { dataset } = await createDataset({ user: engineer, elements: 8, spacingWavelengths, arrayId: array.id });
  const { run, results } = await createRun({ user: engineer, revision, dataset, spacingWavelengths });
  arrayId = array.id;
  runId = run.id;
  datasetId = dataset.id;
  storedBearings = results;
});

async function exportBundle(who: Who, query = '') {
  return bundleRoute.GET(
    req('GET', `/api/v1/arrays/${arrayId}/bundle${query}`, { headers: await browserHeaders(who) }),
    params({ id: String(arrayId) }),
  );
}

async function upload(who: Who, bytes: Uint8Array, name = 'bundle.zip') {
  const form = new FormData();
  form.append('file', new Blob([Buffer.from(bytes)], { type: 'application/zip' }), name);
  const headers = await browserHeaders(who);
  return bundlesRoute.POST(
    new Request(`${ORIGIN}/api/v1/bundles`, { method: 'POST', body: form, headers }),
    params({}),
  );
}

async function counts() {
  return {
    arrays: await ArrayDesign.count(),
    revisions: await ArrayRevision.count(),
    datasets: await Dataset.count(),
    runs: await EstimateRun.count(),
    imports: await AuditEvent.count({ where: { action: 'bundle.imported' } }),
    files: storedFiles(),
  };
}

let goodBundle: Uint8Array;
async function good(): Promise<Uint8Array> {
  if (!goodBundle) {
    const res = await exportBundle('engineer', `?runs=${runId}`);
    expect(res.status).toBe(200);
    goodBundle = new Uint8Array(await res.arrayBuffer());
  }
  return goodBundle;
}

/** The good bundle's entries, changed by `edit`, written back with the test zip writer (manifest untouched unless edited). */
async function rebuilt(edit: (files: Map<string, Uint8Array>) => void): Promise<Uint8Array> {
  const files = safeUnzip(await good());
  edit(files);
  const entries: RawEntry[] = [...files].map(([name, data]) => ({ name, data, deflate: true }));
  return buildZip(entries);
}

const text = (s: string) => new TextEncoder().encode(s);

describe('export', () => {
  it('an engineer downloads a zip holding the revision, calibration, charts, summary, the run and its dataset, all checksummed', async () => {
    const res = await exportBundle('engineer', `?runs=${runId}`);
    expect(res.status).toBe(200);
    expect(res.headers.get('content-type')).toBe('application/zip');
    expect(res.headers.get('content-disposition')).toMatch(
      /^attachment; filename="port-alder-inshore-line-r1\.steerwise\.zip"$/,
    );
    const bytes = new Uint8Array(await res.arrayBuffer());
    expect(res.headers.get('x-bundle-sha256')).toBe(sha256Hex(bytes));
    const { manifest, files } = readBundle(bytes);
    expect(manifest).toMatchObject({
      format: 'steerwise-bundle',
      schemaVersion: 1,
      author: { email: 'engineer@steerwise.test' },
      title: 'Port Alder inshore line, revision 1',
    });
    expect(manifest.files.map((f) => f.path).sort()).toEqual(
      [
        'array/calibration.csv',
        'array/revision.json',
        'charts/beam-pattern.svg',
        'charts/separation-vs-aperture.svg',
        `datasets/${datasetId}/data.csv`,
        `datasets/${datasetId}/dataset.json`,
        `runs/${runId}.json`,
        'summary.txt',
      ].sort(),
    );
    const revision = JSON.parse(Buffer.from(files.get('array/revision.json')!).toString());
    expect(revision.config).toEqual(arrayInputSchema.parse(baseConfig));
    // Calibration: header + one row per element; element 3 carries its gain and phase.
    const csv = Buffer.from(files.get('array/calibration.csv')!).toString().trim().split('\n');
    expect(csv).toHaveLength(9);
    expect(csv[4].split(',')).toEqual([
      '3',
      String(3 * revision.spacingWavelengths),
      expect.any(String),
      '1',
      '0.4',
      '-2.5',
    ]);
    // Charts are standalone SVG with a drawn curve, rendered on the server from the
    // same chart definitions the designer page draws (consistency check: lib/charts).
    const draft = normalizeDraft(revision.config);
    const expected: Record<string, ChartOption> = {
      'charts/beam-pattern.svg': beamPatternBundleOption(draft),
      'charts/separation-vs-aperture.svg': separationBundleOption(draft),
    };
    for (const [p, option] of Object.entries(expected)) {
      const svg = Buffer.from(files.get(p)!).toString();
      expect(svg.startsWith('<svg ')).toBe(true);
      expect(svg).toContain('xmlns="http://www.w3.org/2000/svg"');
      expect(svg).toMatch(/<path d="M[0-9.]+ [0-9.]+L/);
      expect(svg.trim().endsWith('</svg>')).toBe(true);
      expect(svg).toBe(renderChartSvg(option, BUNDLE_CHART_SIZE));
    }
    // The summary states the engine's figures for this revision.
    const summary = Buffer.from(files.get('summary.txt')!).toString();
    const fig = designFigures(normalizeDraft(arrayInputSchema.parse(baseConfig)));
    expect(summary).toContain(`Half-power beamwidth          ${fig.halfPowerBeamwidthDeg!.toFixed(3)}°`);
    expect(summary).toContain(`Grating-lobe-free scan        ±${fig.gratingLobeFreeScanDeg.toFixed(2)}°`);
    expect(summary).toMatch(/sources 2\/3 at 14° and 17°: (needs-high-resolution|unresolvable)/);
    expect(summary).toContain(`run ${runId}`);
    expect(await AuditEvent.count({ where: { action: 'bundle.exported' } })).toBeGreaterThan(0);
  });

  it('answers 404 to another team, 401 without credentials, 404 for a missing revision and 422 for a bad query', async () => {
    expect((await exportBundle('otherAdmin')).status).toBe(404);
    expect((await exportBundle('anonymous')).status).toBe(401);
    const missing = await exportBundle('engineer', '?revision=9');
    expect(missing.status).toBe(404);
    expect((await json(missing)).error.message).toMatch(/has no revision 9 \(latest is 1\)/);
    const bad = await exportBundle('engineer', '?runs=1,abc');
    expect(bad.status).toBe(422);
    expect((await json(bad)).error.message).toMatch(/runs must be a comma-separated list of ids \(got 'abc'\)/);
  });

  it('viewers may not export datasets when the team setting forbids it, and may when it allows it', async () => {
    const viewer = await userOf('viewer');
    const team = (await Team.findByPk(viewer.teamId as number))!;
    expect(team.settings.allowViewerDatasetExport).toBe(false);
    const refused = await exportBundle('viewer', `?datasets=${datasetId}`);
    expect(refused.status).toBe(403);
    expect((await json(refused)).error.message).toMatch(/cannot export dataset files in this team/);
    // A run without its data: the bundle leaves the dataset out and says so.
    const runOnly = await exportBundle('viewer', `?runs=${runId}`);
    expect(runOnly.status).toBe(200);
    const { files } = readBundle(new Uint8Array(await runOnly.arrayBuffer()));
    expect([...files.keys()].some((p) => p.startsWith('datasets/'))).toBe(false);
    expect(JSON.parse(Buffer.from(files.get(`runs/${runId}.json`)!).toString()).dataset).toBeNull();
    expect(Buffer.from(files.get('summary.txt')!).toString()).toContain('Dataset files were left out');
    // The reviewer (not a viewer) may.
    expect((await exportBundle('reviewer', `?datasets=${datasetId}`)).status).toBe(200);
    await team.update({ settings: { ...team.settings, allowViewerDatasetExport: true } });
    try {
      expect((await exportBundle('viewer', `?datasets=${datasetId}`)).status).toBe(200);
    } finally {
      await team.update({ settings: { ...team.settings, allowViewerDatasetExport: false } });
    }
  });
});

describe('import', () => {
  it('round trip into another team: identical revision config, new records, the run reproduces its bearings to ≤ 1e-9°', async () => {
    const bytes = await good();
    const before = await counts();
    const res = await upload('otherAdmin', bytes);
    const body = await json(res);
    expect(res.status, JSON.stringify(body)).toBe(201);
    const other = await userOf('otherAdmin');
    const array = (await ArrayDesign.findByPk(body.arrayId))!;
    expect(array.teamId).toBe(other.teamId);
    expect(array.id).not.toBe(arrayId);
    const newRev = (await ArrayRevision.findOne({ where: { arrayId: array.id } }))!;
    const oldRev = (await ArrayRevision.findOne({ where: { arrayId } }))!;
    expect(newRev.revision).toBe(1);
    expect(newRev.config).toEqual(oldRev.config);
    expect(newRev.spacingWavelengths).toBe(oldRev.spacingWavelengths);
    // One dataset with the same bytes, under the other team's folder.
    expect(body.datasets).toHaveLength(1);
    const ds = (await Dataset.findByPk(body.datasets[0].id))!;
    const original = (await Dataset.findByPk(datasetId))!;
    expect(ds.teamId).toBe(other.teamId);
    expect(ds.sha256).toBe(original.sha256);
    expect(ds.storagePath).toMatch(new RegExp(`^datasets/${other.teamId}/`));
    // The run: re-executed, every method within 1e-9°.
    expect(body.runs).toHaveLength(1);
    expect(body.reproduced).toBe(true);
    const run = body.runs[0];
    expect(run).toMatchObject({ originalId: runId, reproduced: true });
    expect(run.comparison.methods.map((m: { method: string }) => m.method)).toEqual(
      storedBearings.map((m) => m.method),
    );
    for (const m of run.comparison.methods) {
      expect(m.maxAbsDifferenceDeg).toBeLessThanOrEqual(1e-9);
      expect(m.storedDeg).toEqual(storedBearings.find((s) => s.method === m.method)!.bearingsDeg);
      expect(m.recomputedDeg).toHaveLength(2);
    }
    const newRun = (await EstimateRun.findByPk(run.id))!;
    expect(newRun).toMatchObject({
      teamId: other.teamId,
      datasetId: ds.id,
      arrayRevisionId: newRev.id,
      status: 'done',
    });
    expect((newRun.inputs as { dataset: { id: number } }).dataset.id).toBe(ds.id);
    const after = await counts();
    expect(after.arrays).toBe(before.arrays + 1);
    expect(after.runs).toBe(before.runs + 1);
    expect(after.imports).toBe(before.imports + 1);
    expect(after.files.length).toBe(before.files.length + 1);
    // Importing again makes another new array: nothing is overwritten.
    const again = await json(await upload('otherAdmin', bytes));
    expect(again.arrayId).not.toBe(body.arrayId);
  });

  it('a run on a calibrated revision with a disabled element carries its calibration and reproduces after import', async () => {
    const engineer = await userOf('engineer');
    const states = Array.from({ length: 8 }, (_, i) => ({
      enabled: i !== 6,
      gainDb: [0, 1.2, -0.8, 0.4, 1.9, -1.5, 0.7, -0.3][i],
      phaseDeg: [0, 14, -9, -2.5, 18, -17, 6, 11][i],
    }));
    const created = await createArray({ user: engineer, config: { ...baseConfig, elementStates: states } });
    const { dataset } = await createDataset({
      user: engineer,
      elements: 8,
      spacingWavelengths: created.spacingWavelengths,
      arrayId: created.array.id,
      seed: 11,
    });
    const submitted = await estimate('engineer', {
      datasetId: dataset.id,
      arrayId: created.array.id,
      methods: ['esprit-ls', 'music', 'mvdr'],
      sourceCount: 2,
    });
    expect(submitted.status, JSON.stringify(submitted.body)).toBe(201);
    const stored = (await EstimateRun.findByPk(submitted.body.id))!;
    expect(stored.status, String(stored.error)).toBe('done');
    const res = await bundleRoute.GET(
      req('GET', `/api/v1/arrays/${created.array.id}/bundle?runs=${submitted.body.id}`, {
        headers: await browserHeaders('engineer'),
      }),
      params({ id: String(created.array.id) }),
    );
    expect(res.status, res.status === 200 ? '' : JSON.stringify(await res.clone().json())).toBe(200);
    const bytes = new Uint8Array(await res.arrayBuffer());
    const files = safeUnzip(bytes);
    const runJson = JSON.parse(Buffer.from(files.get(`runs/${submitted.body.id}.json`)!).toString());
    expect(runJson.inputs.calibration).toMatchObject({ applied: true, revision: 1 });
    expect(runJson.inputs.calibration.gains).toEqual(states.map(({ gainDb, phaseDeg }) => ({ gainDb, phaseDeg })));
    expect(runJson.inputs.array.disabledElements).toEqual([7]);
    const summary = Buffer.from(files.get('summary.txt')!).toString();
    expect(summary).toContain('calibration of revision 1 applied');
    expect(summary).toContain('disabled elements 7 left out');
    // Without the calibration the stored bearings are not reproduced: the bundle's gains matter.
    const { reproduceRun } = await import('@/lib/handoff/runs');
    const { parseSnapshotFile } = await import('@/lib/datasets');
    const { resolveStoragePath } = await import('@/lib/storage/files');
    const parsed = await parseSnapshotFile({
      path: resolveStoragePath(dataset.storagePath),
      format: 'csv',
      fileName: 'trial-3.csv',
      maxBytes: 1e8,
    });
    const rows = { rows: parsed.snapshots, cols: parsed.elements, re: parsed.re, im: parsed.im };
    const { calibration: _c, ...uncalibrated } = runJson.inputs;
    void _c;
    const args = { rows, spacingWavelengths: created.spacingWavelengths, result: runJson.result };
    expect(reproduceRun({ ...args, inputs: runJson.inputs }).reproduced).toBe(true);
    expect(reproduceRun({ ...args, inputs: uncalibrated }).reproduced).toBe(false);

    const imported = await upload('otherAdmin', bytes);
    const body = await json(imported);
    expect(imported.status, JSON.stringify(body)).toBe(201);
    expect(body.reproduced).toBe(true);
    for (const m of body.runs[0].comparison.methods) expect(m.maxAbsDifferenceDeg).toBeLessThanOrEqual(1e-9);
    const newRun = (await EstimateRun.findByPk(body.runs[0].id))!;
    const newRev = (await ArrayRevision.findOne({ where: { arrayId: body.arrayId } }))!;
    expect((newRun.inputs as { calibration: unknown }).calibration).toMatchObject({
      applied: true,
      revision: 1,
      arrayRevisionId: newRev.id,
    });
    // A re-run of the imported run in the new team applies the imported revision's calibration again.
    const rr = await rerunRoute.POST(
      req('POST', `/api/v1/estimates/${newRun.id}/rerun`, { headers: await browserHeaders('otherAdmin') }),
      params({ id: String(newRun.id) }),
    );
    const again = await json(rr);
    expect(rr.status, JSON.stringify(again)).toBe(201);
    for (const c of again.comparison) expect(c.identical).toBe(true);
  });

  it('shows the exact differences when a stored bearing does not match the re-run', async () => {
    const path = `runs/${runId}.json`;
    const tampered = await rebuilt((files) => {
      const run = JSON.parse(Buffer.from(files.get(path)!).toString());
      run.result.results[0].bearingsDeg[1] += 2e-6;
      const data = text(JSON.stringify(run));
      files.set(path, data);
      const manifest = JSON.parse(Buffer.from(files.get('manifest.json')!).toString());
      const entry = manifest.files.find((f: { path: string }) => f.path === path);
      entry.sha256 = sha256Hex(data);
      entry.bytes = data.byteLength;
      files.set('manifest.json', text(JSON.stringify(manifest)));
    });
    const res = await upload('engineer', tampered);
    const body = await json(res);
    expect(res.status).toBe(201);
    expect(body.reproduced).toBe(false);
    const first = body.runs[0].comparison.methods[0];
    expect(first.reproduced).toBe(false);
    expect(first.maxAbsDifferenceDeg).toBeGreaterThan(1.9e-6);
    expect(first.maxAbsDifferenceDeg).toBeLessThan(2.1e-6);
    expect(first.message).toMatch(/bearing 2 stored .*Δ -2\.0\d\de-6°/);
    expect(body.runs[0].comparison.methods.slice(1).every((m: { reproduced: boolean }) => m.reproduced)).toBe(true);
  });

  it('viewers and reviewers may not import', async () => {
    for (const who of ['viewer', 'reviewer'] as const) {
      const res = await upload(who, await good());
      expect(res.status).toBe(403);
    }
  });
});

describe('hostile archives are refused with a clear message and nothing written', () => {
  let before: Awaited<ReturnType<typeof counts>>;
  afterEach(async () => {
    expect(await counts()).toEqual(before);
    delete process.env.STEERWISE_MAX_BUNDLE_BYTES;
  });

  const cases: {
    name: string;
    status: number;
    message: RegExp;
    bytes: () => Promise<Uint8Array>;
    fileName?: string;
    env?: string;
  }[] = [
    {
      name: 'zip bomb (high compression ratio)',
      status: 422,
      message: /compression ratio of \d+:1, above the limit of 200:1 \(possible zip bomb\)/,
      bytes: async () => buildZip([{ name: 'summary.txt', data: new Uint8Array(20 * 1024 * 1024), deflate: true }]),
    },
    {
      name: '10 000 entries',
      status: 422,
      message: /archive has 10000 entries; at most 500 are allowed/,
      bytes: async () => buildZip(Array.from({ length: 10_000 }, (_, i) => ({ name: `f${i}.txt`, data: text('x') }))),
    },
    {
      name: '../ path',
      status: 422,
      message: /entry name '\.\.\/evil\.txt' is refused: it climbs out of the archive/,
      bytes: async () => buildZip([{ name: '../evil.txt', data: text('x') }]),
    },
    {
      name: 'absolute path',
      status: 422,
      message: /entry name '\/etc\/cron\.d\/x' is refused: it is an absolute path/,
      bytes: async () => buildZip([{ name: '/etc/cron.d/x', data: text('x') }]),
    },
    {
      name: 'symlink entry',
      status: 422,
      message: /entry 'array\/revision\.json' is a symbolic link/,
      bytes: async () => buildZip([{ name: 'array/revision.json', data: text('/etc/passwd'), unixMode: 0o120777 }]),
    },
    {
      name: 'duplicate names',
      status: 422,
      message: /the name 'summary\.txt' appears twice/,
      bytes: async () =>
        buildZip([
          { name: 'summary.txt', data: text('a') },
          { name: 'summary.txt', data: text('b') },
        ]),
    },
    {
      name: 'tampered checksum',
      status: 422,
      message: /'summary\.txt' (fails its SHA-256 check|has \d+ bytes; the manifest says \d+)/,
      bytes: () =>
        rebuilt((files) =>
          files.set('summary.txt', text(Buffer.from(files.get('summary.txt')!).toString().replace('ARRAY', 'ARRAX'))),
        ),
    },
    {
      name: 'wrong schema version',
      status: 422,
      message: /bundle schema version 2 is not supported; this Steerwise reads version 1/,
      bytes: () =>
        rebuilt((files) => {
          const m = JSON.parse(Buffer.from(files.get('manifest.json')!).toString());
          m.schemaVersion = 2;
          files.set('manifest.json', text(JSON.stringify(m)));
        }),
    },
    {
      name: 'a file the manifest does not list',
      status: 422,
      message: /'extra\/run\.sh' is in the archive but not in the manifest/,
      bytes: () => rebuilt((files) => files.set('extra/run.sh', text('#!/bin/sh\n'))),
    },
    {
      name: 'an invalid array in a correctly checksummed bundle',
      status: 422,
      message: /array\/revision\.json: config is not a valid array: elements must be at least 2/,
      bytes: () =>
        rebuilt((files) => {
          const rev = JSON.parse(Buffer.from(files.get('array/revision.json')!).toString());
          rev.config.elements = 1;
          const data = text(JSON.stringify(rev));
          files.set('array/revision.json', data);
          const m = JSON.parse(Buffer.from(files.get('manifest.json')!).toString());
          const e = m.files.find((f: { path: string }) => f.path === 'array/revision.json');
          e.sha256 = sha256Hex(data);
          e.bytes = data.byteLength;
          files.set('manifest.json', text(JSON.stringify(m)));
        }),
    },
    {
      name: 'truncated zip',
      status: 422,
      message: /zip archive is truncated|truncated or corrupt/,
      bytes: async () => (await good()).subarray(0, Math.floor((await good()).byteLength / 2)),
    },
    {
      name: 'a non-zip file with a .zip name',
      status: 415,
      message: /not a zip archive/,
      bytes: async () => text('id,name\n1,not a zip at all, just a CSV with the wrong name\n'),
      fileName: 'bundle.zip',
    },
    { name: 'oversize upload', status: 413, message: /larger than the limit of 2048 bytes/, bytes: good, env: '2048' },
    {
      name: 'a deflate stream that lies about its size',
      status: 422,
      message: /inflates to more than the 10 bytes it declares|holds \d+ bytes but declares 10/,
      bytes: async () =>
        buildZip([{ name: 'summary.txt', data: new Uint8Array(5000).fill(65), deflate: true, declaredSize: 10 }]),
    },
  ];

  for (const c of cases) {
    it(c.name, async () => {
      const bytes = await c.bytes();
      before = await counts();
      if (c.env) process.env.STEERWISE_MAX_BUNDLE_BYTES = c.env;
      const res = await upload('engineer', bytes, c.fileName);
      const body = await json(res);
      expect(res.status, JSON.stringify(body)).toBe(c.status);
      expect(body.error.message).toMatch(c.message);
    });
  }

  it('no file field, and a JSON body instead of a form', async () => {
    before = await counts();
    const form = new FormData();
    form.append('name', 'x');
    const res = await bundlesRoute.POST(
      new Request(`${ORIGIN}/api/v1/bundles`, {
        method: 'POST',
        body: form,
        headers: await browserHeaders('engineer'),
      }),
      params({}),
    );
    expect(res.status).toBe(422);
    expect((await json(res)).error.message).toMatch(/No file: send the bundle in a multipart field named "file"/);
    const asJson = await bundlesRoute.POST(
      req('POST', '/api/v1/bundles', { body: { file: 'x' }, headers: await browserHeaders('engineer') }),
      params({}),
    );
    expect(asJson.status).toBe(415);
  });
});
