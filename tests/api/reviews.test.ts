/**
 * Reviews and sign-off through /api/v1/reviews: who may comment, approve or
 * ask for changes; the author's e-mail (real SMTP sink); the sign-off sticks
 * to its revision, and a later edit (PATCH, a new revision) needs its own.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { AuditEvent, OutboxMessage, Review } from '@/models';
import * as reviewsRoute from '@/app/api/v1/reviews/route';
import * as arrayRoute from '@/app/api/v1/arrays/[id]/route';
import { browserHeaders, json, params, req, type Who } from '../helpers/api';
import { startSinkWithRun } from './mail-sink.helpers';

let sink: { port: number; close: () => Promise<void> };
let arrayId: number;
let runId: number;

beforeAll(async () => {
  ({ sink, arrayId, runId } = await startSinkWithRun({ methods: ['root-music'] }));
});
afterAll(async () => {
  await sink.close();
});

async function post(who: Who, body: Record<string, unknown>) {
  return reviewsRoute.POST(req('POST', '/api/v1/reviews', { body, headers: await browserHeaders(who) }), params({}));
}
async function get(who: Who, query: string) {
  return reviewsRoute.GET(req('GET', `/api/v1/reviews?${query}`, { headers: await browserHeaders(who) }), params({}));
}

describe('reviews and sign-off', () => {
  it('a reviewer approves revision 1: the thread shows the sign-off with name and time, and the author is told by e-mail', async () => {
    const before = Date.now();
    const res = await post('reviewer', {
      arrayId,
      revision: 1,
      kind: 'approval',
      body: 'Spacing checked against the 6 kHz band.',
    });
    const body = await json(res);
    expect(res.status, JSON.stringify(body)).toBe(201);
    expect(body.status).toBe('approved');
    expect(body.signOffs).toHaveLength(1);
    expect(body.signOffs[0]).toMatchObject({
      by: 'Ilse Carrow',
      role: 'reviewer',
      note: 'Spacing checked against the 6 kHz band.',
    });
    expect(Date.parse(body.signOffs[0].at)).toBeGreaterThanOrEqual(before - 1000);
    expect(body.notified).toBe(true);
    const mail = (await OutboxMessage.findAll()).find(
      (m) => m.to.includes('engineer@steerwise.test') && m.subject.includes('approved'),
    );
    expect(mail?.subject).toBe('Ilse Carrow approved "Port Alder inshore line" revision 1');
    expect(mail?.text).toContain(`http://localhost:3000/arrays/${arrayId}?rev=1`);
    expect(await AuditEvent.count({ where: { action: 'review.approved' } })).toBe(1);
  });

  it('engineers reply with comments but may not approve or ask for changes; viewers may not comment', async () => {
    const c = await post('engineer', {
      arrayId,
      revision: 1,
      kind: 'comment',
      body: 'Thanks — the calibration of element 3 is from the tank test.',
    });
    expect(c.status).toBe(201);
    expect((await json(c)).notified).toBeNull(); // the author does not mail themselves
    const a = await post('engineer', { arrayId, revision: 1, kind: 'approval' });
    expect(a.status).toBe(403);
    expect((await json(a)).error.message).toBe('Your role (engineer) cannot approve reviews.');
    expect((await post('engineer', { arrayId, revision: 1, kind: 'changes-requested', body: 'x' })).status).toBe(403);
    const v = await post('viewer', { arrayId, revision: 1, kind: 'comment', body: 'hello' });
    expect(v.status).toBe(403);
    expect((await post('admin', { arrayId, revision: 1, kind: 'comment', body: 'Noted.' })).status).toBe(201);
    expect(await AuditEvent.count({ where: { action: 'review.commented' } })).toBe(2);
  });

  it('another team gets 404 for reading and writing; bad input gets 422 naming the field', async () => {
    expect((await get('otherAdmin', `arrayId=${arrayId}&revision=1`)).status).toBe(404);
    expect((await post('otherAdmin', { arrayId, revision: 1, kind: 'approval' })).status).toBe(404);
    expect((await post('otherAdmin', { runId, kind: 'approval' })).status).toBe(404);
    const noBody = await post('reviewer', { arrayId, revision: 1, kind: 'comment', body: '  ' });
    expect(noBody.status).toBe(422);
    expect((await json(noBody)).error.fields.body).toEqual(['body: write the comment']);
    const both = await post('reviewer', { arrayId, revision: 1, runId, kind: 'approval' });
    expect(both.status).toBe(422);
    const noRev = await post('reviewer', { arrayId, kind: 'approval' });
    expect((await json(noRev)).error.fields.revision).toEqual(['revision is required with arrayId']);
    expect((await post('reviewer', { arrayId, revision: 7, kind: 'approval' })).status).toBe(404);
  });

  it('a later edit makes revision 2 without a sign-off; revision 1 keeps its own', async () => {
    const patch = await arrayRoute.PATCH(
      req('PATCH', `/api/v1/arrays/${arrayId}`, {
        body: { spacing: { value: 0.12, unit: 'm' } },
        headers: await browserHeaders('engineer'),
      }),
      params({ id: String(arrayId) }),
    );
    expect(patch.status).toBe(200);
    expect((await json(patch)).revision).toBe(2);
    const r2 = await json(await get('viewer', `arrayId=${arrayId}&revision=2`));
    expect(r2).toMatchObject({ status: 'open', signOffs: [], items: [] });
    const r1 = await json(await get('viewer', `arrayId=${arrayId}&revision=1`));
    expect(r1.status).toBe('approved');
    expect(r1.signOffs.map((s: { by: string }) => s.by)).toEqual(['Ilse Carrow']);
    expect(r1.items.map((i: { kind: string }) => i.kind)).toEqual(['approval', 'comment', 'comment']);
    // Approving revision 2 gives it its own sign-off.
    const ok = await json(await post('admin', { arrayId, revision: 2, kind: 'approval' }));
    expect(ok.signOffs.map((s: { by: string }) => s.by)).toEqual(['Maren Aldous']);
  });

  it('runs are reviewed too: a request for changes, then an approval, each decides the status', async () => {
    const changes = await json(
      await post('reviewer', {
        runId,
        kind: 'changes-requested',
        body: 'Re-run with forward–backward off to compare.',
      }),
    );
    expect(changes.status).toBe('changes-requested');
    expect(changes.target).toEqual({ type: 'run', runId });
    const mail = (await OutboxMessage.findAll()).find(
      (m) => m.subject === `Ilse Carrow asked for changes to estimate run ${runId}`,
    );
    expect(mail?.to).toContain('engineer@steerwise.test');
    const approved = await json(await post('reviewer', { runId, kind: 'approval' }));
    expect(approved.status).toBe('approved');
    expect(await Review.count({ where: { estimateRunId: runId } })).toBe(2);
    expect(await AuditEvent.count({ where: { action: 'review.changes_requested' } })).toBe(1);
  });
});
