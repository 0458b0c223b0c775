/**
 * Each refusal is clear and writes nothing: wrong passwords, a missing or
 * forged CSRF token, a foreign Origin, a cross-team id, an oversized or
 * malformed body, invalid fields, revoked tokens.
 */
import { describe, expect, it } from 'vitest';
import { encode } from 'next-auth/jwt';
import { AuditEvent, ApiToken, Team, User } from '@/models';
import { verifyCredentials } from '@/lib/auth';
import { DEMO_PASSWORD } from '@/lib/demo/seed';
import { randomSecret, sha256Hex } from '@/lib/auth/secrets';
import * as account from '@/app/api/account/route';
import * as tokens from '@/app/api/account/tokens/route';
import * as team from '@/app/api/team/route';
import * as memberById from '@/app/api/team/members/[id]/route';
import * as invitations from '@/app/api/team/invitations/route';
import { browserHeaders, csrfPair, json, params, req, sessionCookieFor, userOf } from '../helpers/api';

async function counts() {
  return { users: await User.count(), tokens: await ApiToken.count(), audit: await AuditEvent.count() };
}

describe('wrong passwords', () => {
  it('a wrong password, an unknown e-mail and an empty password are all refused', async () => {
    expect(
      await verifyCredentials({ email: 'engineer@steerwise.test', password: 'not-the-password', ip: '10.0.0.1' }),
    ).toBeNull();
    expect(
      await verifyCredentials({ email: 'nobody@steerwise.test', password: DEMO_PASSWORD, ip: '10.0.0.1' }),
    ).toBeNull();
    expect(await verifyCredentials({ email: 'engineer@steerwise.test', password: '', ip: '10.0.0.1' })).toBeNull();
    const ok = await verifyCredentials({ email: ' Engineer@Steerwise.test ', password: DEMO_PASSWORD, ip: '10.0.0.1' });
    expect(ok?.email).toBe('engineer@steerwise.test');
  });

  it('a wrong current password does not change the password', async () => {
    const { POST } = await import('@/app/api/account/password/route');
    const before = (await userOf('reviewer')).passwordHash;
    const res = await POST(
      req('POST', '/api/account/password', {
        body: { currentPassword: 'wrong-wrong-wrong', newPassword: 'a brand new password' },
        headers: await browserHeaders('reviewer'),
      }),
      params({}),
    );
    expect(res.status).toBe(422);
    expect((await json(res)).error.fields.currentPassword[0]).toMatch(/not correct/);
    expect((await userOf('reviewer')).passwordHash).toBe(before);
  });
});

describe('CSRF: cookie-authenticated changes need the proof', () => {
  it('a missing CSRF token is refused with 403 and nothing is written', async () => {
    const before = await counts();
    const headers = await browserHeaders('engineer', { csrf: false });
    const res = await account.PATCH(req('PATCH', '/api/account', { body: { name: 'Hijacked' }, headers }), params({}));
    expect(res.status).toBe(403);
    const body = await json(res);
    expect(body.error.code).toBe('csrf_failed');
    expect(body.error.message).toMatch(/Missing CSRF token/);
    expect((await userOf('engineer')).name).toBe('Tobin Hartree');
    expect(await counts()).toEqual(before);
  });

  it('a header that does not match the cookie is refused', async () => {
    const engineer = await userOf('engineer');
    const pair = csrfPair();
    const headers = { cookie: `${await sessionCookieFor(engineer)}; ${pair.cookie}`, 'x-csrf-token': 'a'.repeat(32) };
    const res = await tokens.POST(
      req('POST', '/api/account/tokens', { body: { name: 'sneaky' }, headers }),
      params({}),
    );
    expect(res.status).toBe(403);
    expect(await ApiToken.count({ where: { name: 'sneaky' } })).toBe(0);
  });

  it('a CSRF cookie not signed with the server secret is refused', async () => {
    const engineer = await userOf('engineer');
    const token = 'f'.repeat(32);
    const forged = `next-auth.csrf-token=${encodeURIComponent(`${token}|${sha256Hex(`${token}wrong-secret`)}`)}`;
    const headers = { cookie: `${await sessionCookieFor(engineer)}; ${forged}`, 'x-csrf-token': token };
    const res = await tokens.POST(
      req('POST', '/api/account/tokens', { body: { name: 'forged' }, headers }),
      params({}),
    );
    expect(res.status).toBe(403);
    expect(await ApiToken.count({ where: { name: 'forged' } })).toBe(0);
  });

  it('a request from another origin is refused even with a valid token', async () => {
    const headers = { ...(await browserHeaders('engineer')), origin: 'https://evil.example' };
    const res = await tokens.POST(
      req('POST', '/api/account/tokens', { body: { name: 'cross-site' }, headers }),
      params({}),
    );
    expect(res.status).toBe(403);
    expect((await json(res)).error.message).toMatch(/Cross-site request refused/);
    expect(await ApiToken.count({ where: { name: 'cross-site' } })).toBe(0);
  });

  it('the same-origin request with the proof succeeds (the check can pass)', async () => {
    const headers = { ...(await browserHeaders('engineer')), origin: 'http://localhost:3000' };
    const res = await tokens.POST(
      req('POST', '/api/account/tokens', { body: { name: 'same-site' }, headers }),
      params({}),
    );
    expect(res.status).toBe(201);
  });

  it('bearer-token writes need no CSRF proof (no ambient credentials)', async () => {
    const engineer = await userOf('engineer');
    const secret = randomSecret('sw_', 32);
    await ApiToken.create({
      userId: engineer.id,
      name: 'script',
      tokenHash: sha256Hex(secret),
      prefix: secret.slice(0, 9),
    });
    const res = await account.PATCH(
      req('PATCH', '/api/account', { body: { name: 'Tobin Hartree' }, headers: { authorization: `Bearer ${secret}` } }),
      params({}),
    );
    expect(res.status).toBe(200);
    const used = await ApiToken.findOne({ where: { tokenHash: sha256Hex(secret) } });
    expect(used?.lastUsedAt).toBeTruthy();
  });
});

describe('tokens and sessions that are not valid', () => {
  it('a revoked token, an unknown token and a malformed header are 401', async () => {
    const engineer = await userOf('engineer');
    const secret = randomSecret('sw_', 32);
    await ApiToken.create({
      userId: engineer.id,
      name: 'old',
      tokenHash: sha256Hex(secret),
      prefix: secret.slice(0, 9),
      revokedAt: new Date(),
    });
    for (const authorization of [`Bearer ${secret}`, 'Bearer sw_unknown', 'Basic abc']) {
      const res = await account.GET(req('GET', '/api/account', { headers: { authorization } }), params({}));
      expect(res.status, authorization).toBe(401);
      expect((await json(res)).error.code).toBe('unauthenticated');
    }
  });

  it('a session cookie signed with another secret is 401 (the same claims with the server secret are 200)', async () => {
    const engineer = await userOf('engineer');
    const claims = {
      sub: String(engineer.id),
      uid: engineer.id,
      role: engineer.role,
      teamId: engineer.teamId as number,
      email: engineer.email,
      name: engineer.name,
    };
    const otherSecret = randomSecret('other_', 32);
    expect(otherSecret).not.toBe(process.env.NEXTAUTH_SECRET);
    const forged = await encode({ token: claims, secret: otherSecret });
    const refused = await account.GET(
      req('GET', '/api/account', { headers: { cookie: `next-auth.session-token=${forged}` } }),
      params({}),
    );
    expect(refused.status).toBe(401);
    expect((await json(refused)).error.code).toBe('unauthenticated');
    // Control: the very same claims signed with the server's secret are accepted.
    const genuine = await encode({ token: claims, secret: process.env.NEXTAUTH_SECRET! });
    const accepted = await account.GET(
      req('GET', '/api/account', { headers: { cookie: `next-auth.session-token=${genuine}` } }),
      params({}),
    );
    expect(accepted.status).toBe(200);
  });

  it('a session cookie that is not a JWT at all is 401', async () => {
    const res = await account.GET(
      req('GET', '/api/account', { headers: { cookie: 'next-auth.session-token=not-a-jwt' } }),
      params({}),
    );
    expect(res.status).toBe(401);
  });
});

describe('cross-team ids', () => {
  it("the other team's admin gets 404 for a demo-team member, and the member is unchanged", async () => {
    const viewer = await userOf('viewer');
    const res = await memberById.PATCH(
      req('PATCH', `/api/team/members/${viewer.id}`, {
        body: { role: 'admin' },
        headers: await browserHeaders('otherAdmin'),
      }),
      params({ id: String(viewer.id) }),
    );
    expect(res.status).toBe(404);
    expect((await json(res)).error.code).toBe('not_found');
    expect((await userOf('viewer')).role).toBe('viewer');
    const del = await memberById.DELETE(
      req('DELETE', `/api/team/members/${viewer.id}`, { headers: await browserHeaders('otherAdmin') }),
      params({ id: String(viewer.id) }),
    );
    expect(del.status).toBe(404);
    expect(await User.count({ where: { id: viewer.id } })).toBe(1);
  });

  it('a non-numeric id is 404, not a crash', async () => {
    const res = await memberById.PATCH(
      req('PATCH', '/api/team/members/abc', { body: { role: 'admin' }, headers: await browserHeaders('admin') }),
      params({ id: 'abc' }),
    );
    expect(res.status).toBe(404);
  });
});

describe('bodies', () => {
  it('an oversized body is 413 and nothing is written', async () => {
    const before = await counts();
    const big = JSON.stringify({ name: 'x'.repeat(1_100_000) });
    const res = await tokens.POST(
      req('POST', '/api/account/tokens', { body: big, headers: await browserHeaders('engineer') }),
      params({}),
    );
    expect(res.status).toBe(413);
    expect((await json(res)).error.code).toBe('too_large');
    expect(await counts()).toEqual(before);
  });

  it('an oversized body without a Content-Length (streamed) is also 413', async () => {
    const chunk = new TextEncoder().encode('x'.repeat(64 * 1024));
    let sent = 0;
    const stream = new ReadableStream<Uint8Array>({
      pull(controller) {
        if (sent > 2_000_000) return controller.close();
        sent += chunk.length;
        controller.enqueue(chunk);
      },
    });
    const headers = { ...(await browserHeaders('engineer')), 'content-type': 'application/json' };
    const request = new Request('http://localhost:3000/api/account/tokens', {
      method: 'POST',
      headers,
      body: stream,
      duplex: 'half',
    } as RequestInit);
    const res = await tokens.POST(request, params({}));
    expect(res.status).toBe(413);
  });

  it('malformed JSON is 400, a wrong content type 415, and invalid fields 422 naming the field', async () => {
    const headers = await browserHeaders('admin');
    const bad = await team.PATCH(
      req('PATCH', '/api/team', { body: '{"allowViewerDatasetExport": tru', headers }),
      params({}),
    );
    expect(bad.status).toBe(400);
    expect((await json(bad)).error.code).toBe('bad_json');

    const form = await team.PATCH(
      req('PATCH', '/api/team', {
        body: 'a=b',
        headers: { ...headers, 'content-type': 'application/x-www-form-urlencoded' },
      }),
      params({}),
    );
    expect(form.status).toBe(415);

    const invalid = await team.PATCH(
      req('PATCH', '/api/team', { body: { allowViewerDatasetExport: 'yes' }, headers }),
      params({}),
    );
    expect(invalid.status).toBe(422);
    const body = await json(invalid);
    expect(body.error.code).toBe('validation_failed');
    expect(Object.keys(body.error.fields)).toEqual(['allowViewerDatasetExport']);

    const unknown = await team.PATCH(req('PATCH', '/api/team', { body: { colour: 'red' }, headers }), params({}));
    expect(unknown.status).toBe(422);

    const admin = await userOf('admin');
    expect((await Team.findByPk(admin.teamId as number))?.settings.allowViewerDatasetExport).toBe(false);
  });

  it('an invitation with a bad e-mail and role is 422 with both fields and no invitation', async () => {
    const res = await invitations.POST(
      req('POST', '/api/team/invitations', {
        body: { email: 'not-an-address', role: 'captain' },
        headers: await browserHeaders('admin'),
      }),
      params({}),
    );
    expect(res.status).toBe(422);
    const body = await json(res);
    expect(Object.keys(body.error.fields).sort()).toEqual(['email', 'role']);
    expect(body.error.fields.role[0]).toMatch(/admin, engineer, reviewer, viewer/);
  });
});

describe('team rules', () => {
  it('the last admin cannot be demoted (409) and stays admin', async () => {
    const admin = await userOf('admin');
    const res = await memberById.PATCH(
      req('PATCH', `/api/team/members/${admin.id}`, {
        body: { role: 'viewer' },
        headers: await browserHeaders('admin'),
      }),
      params({ id: String(admin.id) }),
    );
    expect(res.status).toBe(409);
    expect((await userOf('admin')).role).toBe('admin');
  });

  it('a role change takes effect on the next request, without signing in again', async () => {
    const reviewer = await userOf('reviewer');
    const cookieHeaders = await browserHeaders('reviewer'); // session minted while reviewer
    const audit = await import('@/app/api/audit/route');
    expect((await audit.GET(req('GET', '/api/audit', { headers: cookieHeaders }), params({}))).status).toBe(403);
    await User.update({ role: 'admin' }, { where: { id: reviewer.id } });
    expect((await audit.GET(req('GET', '/api/audit', { headers: cookieHeaders }), params({}))).status).toBe(200);
    await User.update({ role: 'reviewer' }, { where: { id: reviewer.id } });
  });
});
