/**
 * Invitations and password resets through e-mailed one-time links, with a
 * real SMTP sink (smtp-server + mailparser) writing to the outbox table.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { AuthLink, OutboxMessage, User } from '@/models';
import { startSmtpSink } from '@/lib/mail/sink';
import { storeCapturedMail } from '@/lib/mail/outbox';
import { verifyCredentials } from '@/lib/auth';
import { DEMO_PASSWORD } from '@/lib/demo/seed';
import * as invitations from '@/app/api/team/invitations/route';
import * as invitationById from '@/app/api/team/invitations/[id]/route';
import * as passwordReset from '@/app/api/password-reset/route';
import * as complete from '@/app/api/links/complete/route';
import { browserHeaders, json, params, req } from '../helpers/api';

let sink: { port: number; close: () => Promise<void> };

beforeAll(async () => {
  sink = await startSmtpSink({ port: 0, store: storeCapturedMail });
  process.env.SMTP_SINK_PORT = String(sink.port);
});
afterAll(async () => {
  await sink.close();
});

async function lastMailTo(address: string) {
  const rows = await OutboxMessage.findAll({ order: [['id', 'DESC']] });
  return rows.find((m) => m.to.includes(address)) ?? null;
}

function linkToken(text: string, path: '/invite' | '/reset'): string {
  const m = new RegExp(`http://localhost:3000${path}\\?token=([A-Za-z0-9_-]+)`).exec(text);
  if (!m) throw new Error(`no ${path} link in: ${text}`);
  return m[1];
}

describe('invitation by e-mail', () => {
  it('admin invites, the mail reaches the sink, the invitee sets a password and joins with the invited role', async () => {
    const res = await invitations.POST(
      req('POST', '/api/team/invitations', {
        body: { email: 'Deckhand.Two@steerwise.test', role: 'engineer' },
        headers: await browserHeaders('admin'),
      }),
      params({}),
    );
    expect(res.status).toBe(201);
    const dto = await json(res);
    expect(dto).toMatchObject({ email: 'deckhand.two@steerwise.test', role: 'engineer', status: 'pending' });
    expect(dto).not.toHaveProperty('tokenHash');

    const mail = await lastMailTo('deckhand.two@steerwise.test');
    expect(mail?.subject).toBe('You are invited to Kestrel Sound Laboratory on Steerwise');
    const token = linkToken(mail!.text, '/invite');
    // Only the hash is stored.
    expect(await AuthLink.count({ where: { tokenHash: token } })).toBe(0);

    const done = await complete.POST(
      req('POST', '/api/links/complete', { body: { token, password: 'harbour lights 42', name: 'Deck Hand' } }),
      params({}),
    );
    expect(done.status).toBe(200);
    const user = await User.findOne({ where: { email: 'deckhand.two@steerwise.test' } });
    expect(user).toMatchObject({ role: 'engineer', name: 'Deck Hand' });
    expect(
      await verifyCredentials({ email: 'deckhand.two@steerwise.test', password: 'harbour lights 42', ip: '10.1.1.1' }),
    ).not.toBeNull();

    // The same link again: refused clearly, nothing changes.
    const again = await complete.POST(
      req('POST', '/api/links/complete', { body: { token, password: 'another password 1', name: 'Intruder' } }),
      params({}),
    );
    expect(again.status).toBe(409);
    expect((await json(again)).error).toMatchObject({
      code: 'link_used',
      message: expect.stringMatching(/already been used/),
    });
    expect((await User.findOne({ where: { email: 'deckhand.two@steerwise.test' } }))?.name).toBe('Deck Hand');
  });

  it('an expired invitation is refused and no account is created', async () => {
    await invitations.POST(
      req('POST', '/api/team/invitations', {
        body: { email: 'late@steerwise.test', role: 'viewer' },
        headers: await browserHeaders('admin'),
      }),
      params({}),
    );
    const token = linkToken((await lastMailTo('late@steerwise.test'))!.text, '/invite');
    await AuthLink.update({ expiresAt: new Date(Date.now() - 1000) }, { where: { email: 'late@steerwise.test' } });
    const res = await complete.POST(
      req('POST', '/api/links/complete', { body: { token, password: 'too late anyway', name: 'Late' } }),
      params({}),
    );
    expect(res.status).toBe(422);
    expect((await json(res)).error).toMatchObject({
      code: 'link_expired',
      message: 'This invitation has expired. Ask for a new one.',
    });
    expect(await User.count({ where: { email: 'late@steerwise.test' } })).toBe(0);
  });

  it('a revoked invitation no longer works', async () => {
    const created = await json(
      await invitations.POST(
        req('POST', '/api/team/invitations', {
          body: { email: 'revoked@steerwise.test', role: 'viewer' },
          headers: await browserHeaders('admin'),
        }),
        params({}),
      ),
    );
    const token = linkToken((await lastMailTo('revoked@steerwise.test'))!.text, '/invite');
    const del = await invitationById.DELETE(
      req('DELETE', `/api/team/invitations/${created.id}`, { headers: await browserHeaders('admin') }),
      params({ id: String(created.id) }),
    );
    expect((await json(del)).status).toBe('revoked');
    const res = await complete.POST(
      req('POST', '/api/links/complete', { body: { token, password: 'revoked but trying', name: 'R' } }),
      params({}),
    );
    expect(res.status).toBe(404);
    expect(await User.count({ where: { email: 'revoked@steerwise.test' } })).toBe(0);
  });

  it('inviting an address that already has an account is 409', async () => {
    const res = await invitations.POST(
      req('POST', '/api/team/invitations', {
        body: { email: 'range-admin@steerwise.test', role: 'viewer' },
        headers: await browserHeaders('admin'),
      }),
      params({}),
    );
    expect(res.status).toBe(409);
  });

  it('when the mail cannot be sent the answer is 503 and no invitation is kept', async () => {
    const saved = process.env.SMTP_SINK_PORT;
    process.env.SMTP_SINK_PORT = '1'; // nothing listens there
    try {
      const res = await invitations.POST(
        req('POST', '/api/team/invitations', {
          body: { email: 'unsent@steerwise.test', role: 'viewer' },
          headers: await browserHeaders('admin'),
        }),
        params({}),
      );
      expect(res.status).toBe(503);
      expect(await AuthLink.count({ where: { email: 'unsent@steerwise.test' } })).toBe(0);
    } finally {
      process.env.SMTP_SINK_PORT = saved;
    }
  });
});

describe('password reset by e-mail', () => {
  it('request → mail → new password; the old password stops working; the link works once', async () => {
    const res = await passwordReset.POST(
      req('POST', '/api/password-reset', { body: { email: 'viewer@steerwise.test' } }),
      params({}),
    );
    expect(res.status).toBe(202);
    const mail = await lastMailTo('viewer@steerwise.test');
    expect(mail?.subject).toBe('Reset your Steerwise password');
    const token = linkToken(mail!.text, '/reset');

    const short = await complete.POST(
      req('POST', '/api/links/complete', { body: { token, password: 'short' } }),
      params({}),
    );
    expect(short.status).toBe(422);
    expect((await json(short)).error.fields.password[0]).toMatch(/at least 10/);

    const done = await complete.POST(
      req('POST', '/api/links/complete', { body: { token, password: 'fresh tide 2024' } }),
      params({}),
    );
    expect(done.status).toBe(200);
    expect(
      await verifyCredentials({ email: 'viewer@steerwise.test', password: DEMO_PASSWORD, ip: '10.2.2.2' }),
    ).toBeNull();
    expect(
      await verifyCredentials({ email: 'viewer@steerwise.test', password: 'fresh tide 2024', ip: '10.2.2.2' }),
    ).not.toBeNull();

    const again = await complete.POST(
      req('POST', '/api/links/complete', { body: { token, password: 'third time lucky' } }),
      params({}),
    );
    expect(again.status).toBe(409);
  });

  it('an expired reset link is refused and the password is unchanged', async () => {
    await passwordReset.POST(
      req('POST', '/api/password-reset', { body: { email: 'reviewer@steerwise.test' } }),
      params({}),
    );
    const token = linkToken((await lastMailTo('reviewer@steerwise.test'))!.text, '/reset');
    await AuthLink.update(
      { expiresAt: new Date(Date.now() - 1) },
      { where: { email: 'reviewer@steerwise.test', purpose: 'reset' } },
    );
    const hashBefore = (await User.findOne({ where: { email: 'reviewer@steerwise.test' } }))!.passwordHash;
    const res = await complete.POST(
      req('POST', '/api/links/complete', { body: { token, password: 'should not apply' } }),
      params({}),
    );
    expect(res.status).toBe(422);
    expect((await json(res)).error.message).toBe('This reset link has expired. Ask for a new one.');
    expect((await User.findOne({ where: { email: 'reviewer@steerwise.test' } }))!.passwordHash).toBe(hashBefore);
  });

  it('an unknown address gets the same 202 answer and no mail', async () => {
    const before = await OutboxMessage.count();
    const res = await passwordReset.POST(
      req('POST', '/api/password-reset', { body: { email: 'stranger@steerwise.test' } }),
      params({}),
    );
    expect(res.status).toBe(202);
    expect(await OutboxMessage.count()).toBe(before);
  });

  it('reset requests are rate-limited per address (429 after 3 in 15 minutes)', async () => {
    const statuses: number[] = [];
    for (let i = 0; i < 4; i++) {
      statuses.push(
        (
          await passwordReset.POST(
            req('POST', '/api/password-reset', { body: { email: 'engineer@steerwise.test' } }),
            params({}),
          )
        ).status,
      );
    }
    expect(statuses).toEqual([202, 202, 202, 429]);
  });
});
