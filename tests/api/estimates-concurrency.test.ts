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
