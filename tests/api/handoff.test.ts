/**
 * E-mail hand-off through a real SMTP sink (smtp-server + mailparser writing
 * the outbox table): the message, its signed expiring link, the download,
 * refusals of altered and expired links, the invitation of a non-member, the
 * outbox, the role matrix, and "nothing kept" when the mail server is down.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { AuditEvent, AuthLink, Handoff, OutboxMessage } from '@/models';
import { listOutbox } from '@/lib/data/outbox';
import { readBundle } from '@/lib/bundle/bundle';
import { createSignedToken } from '@/lib/handoff/signed-link';
import { getCaller } from '@/lib/auth';
import * as handoffRoute from '@/app/api/handoff/route';
import * as downloadRoute from '@/app/api/handoff/[token]/route';
import { browserHeaders, json, params, req, userOf, type Who } from '../helpers/api';
import { startSinkWithRun } from './mail-sink.helpers';

let sink: { port: number; close: () => Promise<void> };
let arrayId: number;
let runId: number;

beforeAll(async () => {
  ({ sink, arrayId, runId } = await startSinkWithRun({ methods: ['esprit-ls'], datasetOnArray: true }));
});
afterAll(async () => {
  await sink.close();
});

async function send(who: Who, body: Record<string, unknown>) {
  return handoffRoute.POST(req('POST', '/api/handoff', { body, headers: await browserHeaders(who) }), params({}));
}

async function download(token: string, accept = 'application/zip') {
  return downloadRoute.GET(req('GET', `/api/handoff/${token}`, { headers: { accept } }), params({ token }));
}

async function mailsTo(address: string) {
  return (await OutboxMessage.findAll({ order: [['id', 'ASC']] })).filter((m) => m.to.includes(address));
}

function tokenIn(text: string): string {
  const m = /http:\/\/localhost:3000\/api\/handoff\/([A-Za-z0-9_-]+\.[A-Za-z0-9_-]+)/.exec(text);
  if (!m) throw new Error(`no hand-off link in: ${text}`);
  return m[1];
}

describe('e-mail hand-off', () => {
  let token: string;

  it('an engineer sends a bundle with a note; the message reaches the sink with recipient, subject and link', async () => {
    const res = await send('engineer', {
      arrayId,
      runs: [runId],
      recipientEmail: 'Range-Admin@steerwise.test',
      note: 'Two contacts near 14°.\nPlease check the TLS run.',
    });
    const body = await json(res);
    expect(res.status, JSON.stringify(body)).toBe(201);
    expect(body).toMatchObject({
      arrayId,
      revision: 1,
      recipientEmail: 'range-admin@steerwise.test',
      runs: [runId],
      invited: false,
      downloadCount: 0,
    });
    expect(body).not.toHaveProperty('link');
    const mails = await mailsTo('range-admin@steerwise.test');
    expect(mails).toHaveLength(1);
    const mail = mails[0];
    expect(mail.subject).toBe('Tobin Hartree sent you "Port Alder inshore line" revision 1 on Steerwise');
    expect(mail.text).toContain('Note from Tobin Hartree:\n  Two contacts near 14°.\n  Please check the TLS run.');
    expect(mail.text).toContain('http://localhost:3000/handoff?link=');
    token = tokenIn(mail.text);
    expect(await AuditEvent.count({ where: { action: 'handoff.sent', target: 'range-admin@steerwise.test' } })).toBe(1);
    // The recipient's admin reads it in their outbox (another team).
    const other = await getCaller(req('GET', '/api/outbox', { headers: await browserHeaders('otherAdmin') }));
    expect((await listOutbox({ caller: other })).map((m) => m.subject)).toContain(mail.subject);
  });

  it('the signed link downloads the bundle without signing in, and counts the download', async () => {
    const res = await download(token);
    expect(res.status).toBe(200);
    expect(res.headers.get('content-type')).toBe('application/zip');
    const { manifest, files } = readBundle(new Uint8Array(await res.arrayBuffer()));
    expect(manifest.title).toBe('Port Alder inshore line, revision 1');
    expect(files.has(`runs/${runId}.json`)).toBe(true);
    expect([...files.keys()].some((p) => p.startsWith('datasets/') && p.endsWith('/data.csv'))).toBe(true);
    const handoff = (await Handoff.findOne({ where: { recipientEmail: 'range-admin@steerwise.test' } }))!;
    expect(handoff.downloadCount).toBe(1);
  });

  it('an altered link is refused with 404, also as a page for a browser', async () => {
    const [payload, signature] = token.split('.');
    const flipped = signature.slice(0, -2) + (signature.at(-2) === 'A' ? 'B' : 'A') + signature.at(-1);
    for (const bad of [
      `${payload}.${flipped}`,
      `${Buffer.from(
        Buffer.from(payload, 'base64url')
          .toString()
          .replace(/"s":"(\d+)"/, '"s":"$10"'),
      ).toString('base64url')}.${signature}`,
      'not-a-token',
    ]) {
      const res = await download(bad);
      expect(res.status).toBe(404);
      expect((await json(res)).error.message).toMatch(
        /This hand-off link is not valid: the link (signature does not match: it was altered or is not ours|is incomplete or malformed)/,
      );
    }
    const page = await download(`${payload}.${flipped}`, 'text/html,application/xhtml+xml');
    expect(page.status).toBe(404);
    expect(page.headers.get('content-type')).toMatch(/text\/html/);
    expect(await page.text()).toContain('This hand-off link cannot be used');
  });

  it('an expired link is refused with 422 link_expired', async () => {
    const handoff = (await Handoff.findOne({ where: { recipientEmail: 'range-admin@steerwise.test' } }))!;
    const old = createSignedToken({
      purpose: 'handoff',
      subject: String(handoff.id),
      ttlSeconds: 3600,
      secret: process.env.NEXTAUTH_SECRET!,
      now: new Date(Date.now() - 2 * 3600 * 1000),
    });
    const res = await download(old);
    expect(res.status).toBe(422);
    expect((await json(res)).error).toMatchObject({
      code: 'link_expired',
      message: expect.stringMatching(
        /This hand-off link has expired \(expired at .*\)\. Ask the sender for a new one\./,
      ),
    });
    // The row's own expiry counts too.
    await handoff.update({ expiresAt: new Date(Date.now() - 1000) });
    try {
      const res2 = await download(token);
      expect(res2.status).toBe(422);
      expect((await json(res2)).error.message).toMatch(/This hand-off link expired at/);
    } finally {
      await handoff.update({ expiresAt: new Date(Date.now() + 3600_000) });
    }
  });

  it("an admin's hand-off to a recipient without an account also invites them into the sender team (viewer)", async () => {
    const res = await send('admin', { arrayId, recipientEmail: 'harbour.pilot@steerwise.test' });
    expect(res.status).toBe(201);
    expect((await json(res)).invited).toBe(true);
    const mails = await mailsTo('harbour.pilot@steerwise.test');
    expect(mails.map((m) => m.subject)).toEqual([
      'Maren Aldous sent you "Port Alder inshore line" revision 1 on Steerwise',
      'You are invited to Kestrel Sound Laboratory on Steerwise',
    ]);
    expect(mails[0].text).toContain('also invited you to Kestrel Sound Laboratory');
    expect(mails[1].text).toMatch(/http:\/\/localhost:3000\/invite\?token=[A-Za-z0-9_-]+/);
    const admin = await userOf('admin');
    const link = await AuthLink.findOne({ where: { email: 'harbour.pilot@steerwise.test', purpose: 'invite' } });
    expect(link).toMatchObject({ role: 'viewer', teamId: admin.teamId, createdById: admin.id, usedAt: null });
  });

  it("an engineer's hand-off to a recipient without an account sends the link only: inviting is for admins", async () => {
    const res = await send('engineer', { arrayId, recipientEmail: 'quay.surveyor@steerwise.test' });
    expect(res.status).toBe(201);
    expect((await json(res)).invited).toBe(false);
    const mails = await mailsTo('quay.surveyor@steerwise.test');
    expect(mails.map((m) => m.subject)).toEqual([
      'Tobin Hartree sent you "Port Alder inshore line" revision 1 on Steerwise',
    ]);
    expect(mails[0].text).not.toContain('invited you');
    expect(tokenIn(mails[0].text)).toBeTruthy();
    expect(await AuthLink.count({ where: { email: 'quay.surveyor@steerwise.test' } })).toBe(0);
  });

  it('role matrix and bad input: viewers and reviewers may not send, another team gets 404, bad fields get 422', async () => {
    for (const who of ['viewer', 'reviewer'] as const)
      expect((await send(who, { arrayId, recipientEmail: 'x@steerwise.test' })).status).toBe(403);
    expect((await send('otherAdmin', { arrayId, recipientEmail: 'x@steerwise.test' })).status).toBe(404);
    expect((await send('anonymous', { arrayId, recipientEmail: 'x@steerwise.test' })).status).toBe(401);
    const bad = await send('engineer', { arrayId, recipientEmail: 'not an address' });
    expect(bad.status).toBe(422);
    expect((await json(bad)).error.fields.recipientEmail).toBeDefined();
    const badRun = await send('engineer', { arrayId, recipientEmail: 'x@steerwise.test', runs: [999999] });
    expect(badRun.status).toBe(404);
    expect((await json(badRun)).error.message).toMatch(/No estimate run with id 999999 in your team/);
    expect(await Handoff.count({ where: { recipientEmail: 'x@steerwise.test' } })).toBe(0);
  });

  it('when the mail server is down the answer is 503 and nothing is kept', async () => {
    const before = { handoffs: await Handoff.count(), links: await AuthLink.count(), audit: await AuditEvent.count() };
    process.env.SMTP_SINK_PORT = '1'; // nothing listens there
    try {
      const res = await send('engineer', { arrayId, recipientEmail: 'nobody.yet@steerwise.test' });
      expect(res.status).toBe(503);
      expect((await json(res)).error.message).toMatch(/Nothing was saved/);
    } finally {
      process.env.SMTP_SINK_PORT = String(sink.port);
    }
    expect({ handoffs: await Handoff.count(), links: await AuthLink.count(), audit: await AuditEvent.count() }).toEqual(
      before,
    );
  });
});
