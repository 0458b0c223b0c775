/**
 * Inline estimates the client waits for (the request path of `npm run bench:service`): many at
 * once all answer 201, each leaves exactly its run (done, with its result), one done job and
 * one audit event, written in grouped transactions (lib/db/write-batch.ts), and GET gives
 * back the same answer as the POST.
 */
import { describe, expect, it } from 'vitest';
import { AuditEvent, EstimateRun, Job } from '@/models';
import { simulateSnapshots } from '@/lib/doa/sim/simulate';
import { estimate } from './datasets.helpers';
import { browserHeaders, json, params, req } from '../helpers/api';
import * as estimateById from '@/app/api/v1/estimates/[id]/route';
import * as estimatesRoute from '@/app/api/v1/estimates/route';

function body(seed: number) {
  const m = 8;
  const n = 200;
  const x = simulateSnapshots({
    elements: m,
    spacingWavelengths: 0.5,
    bearingsDeg: [-12, 20],
    noisePower: 0.1,
    snapshots: n,
    seed,
  });
  const re: number[][] = [];
  const im: number[][] = [];
  for (let t = 0; t < n; t++) {
    re.push(Array.from({ length: m }, (_, i) => x.re[i * n + t]));
    im.push(Array.from({ length: m }, (_, i) => x.im[i * n + t]));
  }
  return {
    method: 'esprit-ls',
    sourceCount: 2,
    array: { elements: m, spacingWavelengths: 0.5 },
    snapshots: { re, im },
  };
}

describe('inline estimates under concurrency', () => {
  it('24 at once: every one 201 with its own run, one done job and one audit event', async () => {
    const runsBefore = await EstimateRun.count();
    const jobsBefore = await Job.count({ where: { kind: 'estimate' } });
    const auditsBefore = await AuditEvent.count({ where: { action: 'estimate.started' } });
    const answers = await Promise.all(Array.from({ length: 24 }, (_, i) => estimate('engineer', body(i % 3))));
    for (const a of answers) expect(a.status, JSON.stringify(a.body)).toBe(201);
    const ids = answers.map((a) => a.body.id as number);
    expect(new Set(ids).size).toBe(24);
    expect(await EstimateRun.count()).toBe(runsBefore + 24);
    expect(await Job.count({ where: { kind: 'estimate' } })).toBe(jobsBefore + 24);
    expect(await AuditEvent.count({ where: { action: 'estimate.started' } })).toBe(auditsBefore + 24);
    for (const id of ids) {
      const run = await EstimateRun.findByPk(id);
      expect(run!.status).toBe('done');
      const job = await Job.findOne({ where: { kind: 'estimate', inputRef: String(id) } });
      expect(job!.status).toBe('done');
      expect(job!.attempts).toBe(1);
    }
    // Same snapshots, same answer; GET of a run repeats its POST answer.
    expect(answers[3].body.bearingsDeg).toEqual(answers[0].body.bearingsDeg);
    const got = await json(
      await estimateById.GET(
        req('GET', `/api/v1/estimates/${ids[5]}`, { headers: await browserHeaders('viewer') }),
        params({ id: String(ids[5]) }),
      ),
    );
    expect(got.bearingsDeg).toEqual(answers[5].body.bearingsDeg);
    expect(got.eigenvalues).toEqual(answers[5].body.eigenvalues);
    expect(got.results[0].criteria.mdl).toHaveLength(8);
    expect(got.results[0].uncertainty.ci95Deg).toHaveLength(2);
  });
});

describe('large bodies are read in a worker thread', () => {
  // 16 × 1200 inline values: above the 128 KiB from which parseEstimateBody uses the pool.
  function big() {
    const m = 16;
    const n = 1200;
    const x = simulateSnapshots({
      elements: m,
      spacingWavelengths: 0.5,
      bearingsDeg: [-12, 20],
      noisePower: 0.1,
      snapshots: n,
      seed: 11,
    });
    const re: number[][] = [];
    const im: number[][] = [];
    for (let t = 0; t < n; t++) {
      re.push(Array.from({ length: m }, (_, i) => x.re[i * n + t]));
      im.push(Array.from({ length: m }, (_, i) => x.im[i * n + t]));
    }
    return {
      method: 'esprit-ls',
      sourceCount: 2,
      array: { elements: m, spacingWavelengths: 0.5 },
      snapshots: { re, im },
    };
  }

  it('a valid one gives the answer of the in-place path', async () => {
    const b = big();
    expect(JSON.stringify(b).length).toBeGreaterThan(128 * 1024);
    const res = await estimate('engineer', b);
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    const { parseEstimateRequest } = await import('@/lib/jobs/estimate-request');
    const direct = parseEstimateRequest({ body: new TextEncoder().encode(JSON.stringify(b)) });
    expect(direct.ok).toBe(true);
    const run = await EstimateRun.findByPk(res.body.id);
    expect((run!.inputs as { snapshotSet: { rows: number; cols: number } }).snapshotSet).toMatchObject({
      rows: 1200,
      cols: 16,
    });
    expect(res.body.bearingsDeg[0]).toBeCloseTo(-12, 0);
    expect(res.body.bearingsDeg[1]).toBeCloseTo(20, 0);
  });

  it('a bad entry is 422 naming row and column; malformed JSON is 400; nothing is stored', async () => {
    const runs = await EstimateRun.count();
    const b = big();
    (b.snapshots.im[700] as unknown[])[4] = 'x';
    const bad = await estimate('engineer', b);
    expect(bad.status).toBe(422);
    expect(bad.body.error.message).toMatch(/snapshots\.im entries must be finite numbers \(row 701, column 5\)/);
    const text = JSON.stringify(big()).slice(0, -2);
    const res = await estimatesRoute.POST(
      req('POST', '/api/v1/estimates', { body: text, headers: await browserHeaders('engineer') }),
      params({}),
    );
    expect(res.status).toBe(400);
    expect((await json(res)).error.message).toMatch(/not valid JSON/);
    expect(await EstimateRun.count()).toBe(runs);
  });
});
