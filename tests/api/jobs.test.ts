/**
 * The job lifecycle of lib/jobs through the v1 API and the module itself:
 * Stop (POST …/cancel) on studies and estimate runs with its role matrix,
 * DELETE of a running study, stale-lease recovery (re-queued and re-run to the
 * same answer, or failed with the reason after the attempt limit), and
 * idempotent re-runs. Consistency checks: the product is compared with itself
 * (the same seed and inputs must give the same numbers).
 */
import { beforeAll, describe, expect, it } from 'vitest';
import { EstimateRun, Job, Study } from '@/models';
import * as studies from '@/app/api/v1/studies/route';
import * as studyById from '@/app/api/v1/studies/[id]/route';
import * as studyCancel from '@/app/api/v1/studies/[id]/cancel/route';
import * as estimates from '@/app/api/v1/estimates/route';
import * as estimateById from '@/app/api/v1/estimates/[id]/route';
import * as estimateCancel from '@/app/api/v1/estimates/[id]/cancel/route';
import { browserHeaders, json, params, req, userOf, type Who } from '../helpers/api';

// One compute thread, so a long study holds it and later jobs stay queued (set before the pool starts).
process.env.STEERWISE_WORKERS = '1';

const quick = {
  name: 'Jobs check: quick',
  array: { elements: 8, spacingWavelengths: 0.5 },
  sources: { bearingsDeg: [-10, 12], powersDb: [0, 0] },
  snapshots: 50,
  sweep: { variable: 'snr', values: [0, 10] },
  methods: ['esprit-ls'],
  trials: 40,
  seed: 11,
};
// About a minute of compute (9e10 of the 1e11 budget): it is always still running when stopped.
const long = {
  ...quick,
  name: 'Jobs check: long',
  array: { elements: 16, spacingWavelengths: 0.5 },
  snapshots: 200,
  trials: 600,
  sweep: { variable: 'snr', values: [0, 5, 10, 15] },
  methods: ['music', 'esprit-tls'],
};

async function call(
  handler: (r: Request, c: { params: Promise<Record<string, string>> }) => Promise<Response>,
  method: string,
  url: string,
  who: Who,
  p: Record<string, string>,
  body?: unknown,
  extra: Record<string, string> = {},
) {
  const res = await handler(
    req(method, url, { body, headers: { ...(await browserHeaders(who)), ...extra } }),
    params(p),
  );
  return { status: res.status, body: res.status === 204 ? null : await json(res) };
}
const createStudy = (body: unknown, who: Who = 'engineer') =>
  call(studies.POST as never, 'POST', '/api/v1/studies', who, {}, body);
const getStudy = (id: number, who: Who = 'engineer') =>
  call(studyById.GET as never, 'GET', `/api/v1/studies/${id}`, who, { id: String(id) });
const cancelStudy = (id: number, who: Who = 'engineer', body?: unknown) =>
  call(studyCancel.POST as never, 'POST', `/api/v1/studies/${id}/cancel`, who, { id: String(id) }, body);
const deleteStudy = (id: number, who: Who = 'engineer') =>
  call(studyById.DELETE as never, 'DELETE', `/api/v1/studies/${id}`, who, { id: String(id) });
const cancelRun = (id: number, who: Who = 'engineer') =>
  call(estimateCancel.POST as never, 'POST', `/api/v1/estimates/${id}/cancel`, who, { id: String(id) });
const getRun = (id: number, who: Who = 'engineer') =>
  call(estimateById.GET as never, 'GET', `/api/v1/estimates/${id}`, who, { id: String(id) });

async function until<T>(what: string, fn: () => Promise<T | null | undefined | false>, ms = 60_000): Promise<T> {
  const end = Date.now() + ms;
  for (;;) {
    const v = await fn();
    if (v) return v;
    if (Date.now() > end) throw new Error(`timed out waiting for ${what}`);
    await new Promise((r) => setTimeout(r, 50));
  }
}

const finalStatus = async (id: number) => {
  const r = await getStudy(id);
  return ['done', 'failed', 'cancelled'].includes(r.body.status) ? r.body : null;
};

beforeAll(async () => {
  await userOf('engineer');
});

/** A tiny inline estimate (3 snapshots of 4 elements, LS-ESPRIT, K = 1) for the Stop and recovery cases. */
const tinyEstimate = {
  method: 'esprit-ls',
  sourceCount: 1,
  array: { elements: 4, spacingWavelengths: 0.5 },
  snapshots: {
    re: [
      [1, 0, -1, 0],
      [0, 1, 0, -1],
      [1, 1, 1, 1],
    ],
    im: [
      [0, 1, 0, -1],
      [1, 0, -1, 0],
      [0, 0, 0, 0],
    ],
  },
};

describe('Stop and DELETE of studies', () => {
  it('Stop cancels a running study: its thread is stopped, the row and its job say why, a second Stop is 409', async () => {
    const created = await createStudy(long);
    expect(created.status).toBe(202);
    const id = created.body.id as number;
    await until('the study to run', async () => (await getStudy(id)).body.status === 'running');
    const stopped = await cancelStudy(id);
    expect(stopped.status).toBe(200);
    expect(stopped.body.status).toBe('cancelled');
    expect(stopped.body.error).toMatch(/Stopped by/);
    const job = await Job.findOne({ where: { kind: 'study', inputRef: String(id) } });
    expect(job?.status).toBe('cancelled');
    expect((await cancelStudy(id)).status).toBe(409);
    // The thread is free again: a quick study runs to the end.
    const next = await createStudy(quick);
    const done = await until('the quick study', () => finalStatus(next.body.id));
    expect(done.status).toBe('done');
    expect((await Study.findByPk(id))?.status).toBe('cancelled');
  });

  it('DELETE of a running study stops it and removes the row', async () => {
    const created = await createStudy(long);
    const id = created.body.id as number;
    await until('the study to run', async () => (await getStudy(id)).body.status === 'running');
    expect((await deleteStudy(id)).status).toBe(204);
    expect(await Study.findByPk(id)).toBeNull();
    const job = await Job.findOne({ where: { kind: 'study', inputRef: String(id) } });
    expect(job?.status).toBe('cancelled');
    const next = await createStudy(quick);
    expect((await until('the quick study', () => finalStatus(next.body.id))).status).toBe('done');
  });

  it('cancel role matrix: anonymous 401, viewer and reviewer 403, another team 404, engineer and admin 200; unknown keys 422', async () => {
    const blocker = await createStudy(long);
    const a = (await createStudy(quick)).body.id as number; // queued behind the blocker
    const b = (await createStudy(quick)).body.id as number;
    expect((await cancelStudy(a, 'anonymous')).status).toBe(401);
    expect((await cancelStudy(a, 'viewer')).status).toBe(403);
    expect((await cancelStudy(a, 'reviewer')).status).toBe(403);
    expect((await cancelStudy(a, 'otherAdmin')).status).toBe(404);
    const bad = await cancelStudy(a, 'engineer', { force: true });
    expect(bad.status).toBe(422);
    expect((await cancelStudy(a, 'engineer')).status).toBe(200);
    expect((await cancelStudy(b, 'admin')).status).toBe(200);
    expect((await cancelStudy(blocker.body.id, 'admin')).status).toBe(200);
    expect((await getStudy(a)).body.status).toBe('cancelled');
  });
});

describe('Stop of estimate runs', () => {
  it('a queued run is cancelled (200), a finished one is 409; roles as for studies', async () => {
    const blocker = await createStudy(long);
    await until('the blocker to run', async () => (await getStudy(blocker.body.id)).body.status === 'running');
    const body = tinyEstimate;
    const queued = await call(estimates.POST as never, 'POST', '/api/v1/estimates', 'engineer', {}, body, {
      prefer: 'respond-async',
    });
    expect(queued.status).toBe(202);
    const id = queued.body.id as number;
    expect((await cancelRun(id, 'anonymous')).status).toBe(401);
    expect((await cancelRun(id, 'viewer')).status).toBe(403);
    expect((await cancelRun(id, 'reviewer')).status).toBe(403);
    expect((await cancelRun(id, 'otherAdmin')).status).toBe(404);
    const stopped = await cancelRun(id, 'engineer');
    expect(stopped.status).toBe(200);
    expect(stopped.body.status).toBe('cancelled');
    expect((await cancelRun(id, 'admin')).status).toBe(409);
    await cancelStudy(blocker.body.id, 'admin');
    const done = await call(estimates.POST as never, 'POST', '/api/v1/estimates', 'engineer', {}, body);
    expect(done.status).toBe(201);
    expect((await cancelRun(done.body.id, 'engineer')).status).toBe(409);
    expect((await getRun(done.body.id)).body.status).toBe('done');
  });
});

describe('recovery of jobs whose server died', () => {
  async function killedMidway(id: number, kind: 'study' | 'estimate', attempts: number) {
    // What a SIGKILL leaves: the job running under a lease owner on this host that no longer exists.
    const job = await Job.findOne({ where: { kind, inputRef: String(id) }, order: [['id', 'DESC']] });
    await Job.update(
      {
        status: 'running',
        attempts,
        leaseOwner: `${(await import('node:os')).hostname()}/999999999/dead`,
        leaseExpiresAt: new Date(Date.now() + 60_000),
      },
      { where: { id: job!.id } },
    );
    if (kind === 'study') await Study.update({ status: 'running', result: null, progress: 0.4 }, { where: { id } });
    else await EstimateRun.update({ status: 'running', result: null, progress: 0.4 }, { where: { id } });
    return job!.id;
  }

  it('below the attempt limit the job is re-queued and re-runs to the same answer', async () => {
    const created = await createStudy(quick);
    const first = await until('the first run', () => finalStatus(created.body.id));
    expect(first.status).toBe('done');
    await killedMidway(created.body.id, 'study', 1);
    const { recoverStaleJobs, startJobRunner } = await import('@/lib/jobs');
    const out = await recoverStaleJobs();
    expect(out.requeued).toBe(1);
    startJobRunner();
    const again = await until('the re-run', () => finalStatus(created.body.id));
    expect(again.status).toBe('done');
    expect(again.result.points.map((p: { methods: unknown }) => p.methods)).toEqual(
      first.result.points.map((p: { methods: unknown }) => p.methods),
    );
  });

  it('at the attempt limit the job fails with the reason, shown on the run to its owner', async () => {
    const body = tinyEstimate;
    const run = await call(estimates.POST as never, 'POST', '/api/v1/estimates', 'engineer', {}, body);
    expect(run.status).toBe(201);
    await killedMidway(run.body.id, 'estimate', 2);
    const { recoverStaleJobs } = await import('@/lib/jobs');
    expect((await recoverStaleJobs()).failed).toBe(1);
    const read = await getRun(run.body.id);
    expect(read.body.status).toBe('failed');
    expect(read.body.error).toMatch(/server stopped while it ran; given up after 2 attempts/);
  });
});

describe('inline snapshots stored once by content', () => {
  it('two runs of the same snapshots share one file; the run refers to it; a re-run reproduces exactly', async () => {
    const fs = await import('node:fs');
    const path = await import('node:path');
    const { createHash } = await import('node:crypto');
    const re = [
      [1, 0.5, -0.2, 0.1, 0.3],
      [0.2, 1, 0.4, -0.6, 0.9],
      [-0.7, 0.3, 1, 0.2, -0.4],
      [0.6, -0.8, 0.1, 1, 0.5],
      [0.1, 0.2, -0.9, 0.4, 1],
      [0.3, 0.7, 0.5, -0.3, 0.2],
    ];
    const im = re.map((row) => row.map((v, i) => v * 0.5 - i * 0.1));
    const body = {
      method: 'esprit-ls',
      sourceCount: 1,
      array: { elements: 5, spacingWavelengths: 0.5 },
      snapshots: { re, im },
    };
    const a = await call(estimates.POST as never, 'POST', '/api/v1/estimates', 'engineer', {}, body);
    const b = await call(estimates.POST as never, 'POST', '/api/v1/estimates', 'engineer', {}, body);
    expect([a.status, b.status]).toEqual([201, 201]);
    const runA = await EstimateRun.findByPk(a.body.id);
    const runB = await EstimateRun.findByPk(b.body.id);
    const refA = (runA!.inputs as { snapshotSet: { sha256: string; path: string } }).snapshotSet;
    expect(refA.sha256).toBe((runB!.inputs as { snapshotSet: { sha256: string } }).snapshotSet.sha256);
    expect((runA!.inputs as { request: Record<string, unknown> }).request.snapshots).toBeUndefined();
    // The file is the re then im float64 values (little-endian), and its name is their SHA-256.
    const bytes = fs.readFileSync(path.join(process.env.STEERWISE_DATA_DIR!, refA.path));
    const expected = Buffer.from(new Float64Array([...re.flat(), ...im.flat()]).buffer);
    expect(bytes.equals(expected)).toBe(true);
    expect(createHash('sha256').update(bytes).digest('hex')).toBe(refA.sha256);
    const dir = path.join(process.env.STEERWISE_DATA_DIR!, 'snapshots', refA.sha256.slice(0, 2));
    expect(fs.readdirSync(dir).filter((f) => f.startsWith(refA.sha256))).toHaveLength(1);
    // The stored inputs no longer carry the matrix.
    expect(JSON.stringify(runA!.inputs).length).toBeLessThan(1000);
    const { POST: rerun } = await import('@/app/api/v1/estimates/[id]/rerun/route');
    const again = await call(rerun as never, 'POST', `/api/v1/estimates/${a.body.id}/rerun`, 'engineer', {
      id: String(a.body.id),
    });
    expect(again.status).toBe(201);
    expect(again.body.comparison[0].identical).toBe(true);
    expect(again.body.bearingsDeg).toEqual(a.body.bearingsDeg);
  });
});
