/**
 * Every route so far × anonymous, viewer, reviewer, engineer, admin and
 * another team's admin, called through the exported handlers with real
 * session cookies (plus the CSRF cookie and header for writes) against the
 * seeded temporary database. Ids always point at records of the demo team,
 * so the other team's admin must get 404, never the record.
 */
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { AuthLink, OutboxMessage, User, ApiToken, ArrayDesign, Study } from '@/models';
import { hashPassword } from '@/lib/auth/passwords';
import { randomSecret, sha256Hex } from '@/lib/auth/secrets';
import { startSmtpSink } from '@/lib/mail/sink';
import { storeCapturedMail } from '@/lib/mail/outbox';
import * as health from '@/app/api/health/route';
import * as account from '@/app/api/account/route';
import * as password from '@/app/api/account/password/route';
import * as tokens from '@/app/api/account/tokens/route';
import * as tokenById from '@/app/api/account/tokens/[id]/route';
import * as team from '@/app/api/team/route';
import * as members from '@/app/api/team/members/route';
import * as memberById from '@/app/api/team/members/[id]/route';
import * as invitations from '@/app/api/team/invitations/route';
import * as invitationById from '@/app/api/team/invitations/[id]/route';
import * as outbox from '@/app/api/outbox/route';
import * as outboxById from '@/app/api/outbox/[id]/route';
import * as audit from '@/app/api/audit/route';
import * as passwordReset from '@/app/api/password-reset/route';
import * as linksComplete from '@/app/api/links/complete/route';
import * as arrays from '@/app/api/v1/arrays/route';
import * as arrayById from '@/app/api/v1/arrays/[id]/route';
import * as arrayRevision from '@/app/api/v1/arrays/[id]/revisions/[rev]/route';
import * as studies from '@/app/api/v1/studies/route';
import * as studyById from '@/app/api/v1/studies/[id]/route';
import { browserHeaders, everyone, json, params, req, userOf, type Who } from '../helpers/api';
import { DEMO_PASSWORD } from '@/lib/demo/seed';

type Ctx = { params: Promise<Record<string, string>> };
type Handler = (req: Request, ctx: Ctx) => Promise<Response>;

type Case = {
  name: string;
  method: string;
  path: (p: Record<string, string>) => string;
  handler: Handler;
  /** Creates whatever the call needs (a fresh target record, a body). */
  prepare?: (who: Who) => Promise<{ params?: Record<string, string>; body?: unknown }>;
  expect: Record<Who, number>;
};

const all = (anonymous: number, signedIn: number): Record<Who, number> => ({
  anonymous,
  viewer: signedIn,
  reviewer: signedIn,
  engineer: signedIn,
  admin: signedIn,
  otherAdmin: signedIn,
});
/** Readable by every member of the demo team; another team's admin gets 404. */
const teamRead = (ok: number): Record<Who, number> => ({
  anonymous: 401,
  viewer: ok,
  reviewer: ok,
  engineer: ok,
  admin: ok,
  otherAdmin: 404,
});
/** Engineers and admins (any team, acting in their own); viewers and reviewers 403. */
const editors = (ok: number): Record<Who, number> => ({
  anonymous: 401,
  viewer: 403,
  reviewer: 403,
  engineer: ok,
  admin: ok,
  otherAdmin: ok,
});
const adminOnly = (ok: number, otherAdmin: number): Record<Who, number> => ({
  anonymous: 401,
  viewer: 403,
  reviewer: 403,
  engineer: 403,
  admin: ok,
  otherAdmin,
});

let counter = 0;
async function freshMember(): Promise<User> {
  counter += 1;
  const admin = await userOf('admin');
  return User.create({
    email: `matrix-${counter}@steerwise.test`,
    name: `Matrix Member ${counter}`,
    role: 'viewer',
    passwordHash: 'x',
    teamId: admin.teamId as number,
  });
}
async function freshInvitation(): Promise<AuthLink> {
  counter += 1;
  const admin = await userOf('admin');
  return AuthLink.create({
    purpose: 'invite',
    email: `invitee-${counter}@steerwise.test`,
    role: 'viewer',
    teamId: admin.teamId as number,
    createdById: admin.id,
    tokenHash: sha256Hex(randomSecret('', 16)),
    expiresAt: new Date(Date.now() + 3600_000),
  });
}
async function demoArrayId(): Promise<string> {
  const admin = await userOf('admin');
  const array = await ArrayDesign.findOne({ where: { teamId: admin.teamId as number }, order: [['id', 'ASC']] });
  return String(array!.id);
}
async function demoStudyId(): Promise<string> {
  const admin = await userOf('admin');
  const study = await Study.findOne({ where: { teamId: admin.teamId as number }, order: [['id', 'ASC']] });
  return String(study!.id);
}
async function engineerToken(): Promise<ApiToken> {
  const engineer = await userOf('engineer');
  return ApiToken.create({
    userId: engineer.id,
    name: `matrix ${++counter}`,
    tokenHash: sha256Hex(randomSecret('sw_', 16)),
    prefix: 'sw_matrix',
  });
}

let sink: { port: number; close: () => Promise<void> };
let demoMailId = 0;

beforeAll(async () => {
  sink = await startSmtpSink({ port: 0, store: storeCapturedMail });
  process.env.SMTP_SINK_PORT = String(sink.port);
  const mail = await OutboxMessage.create({
    to: 'engineer@steerwise.test',
    from: 'Steerwise <no-reply@steerwise.test>',
    subject: 'Reset your Steerwise password',
    text: 'demo',
    html: null,
    receivedAt: new Date(),
  });
  demoMailId = mail.id;
  // Every user's password is the demo password, so the password-change case can succeed for each role.
  const hash = await hashPassword(DEMO_PASSWORD);
  await User.update({ passwordHash: hash }, { where: {} });
});

afterAll(async () => {
  await sink.close();
});

const cases: Case[] = [
  {
    name: 'GET /api/health',
    method: 'GET',
    path: () => '/api/health',
    handler: () => health.GET(),
    expect: all(200, 200),
  },
  {
    name: 'GET /api/account',
    method: 'GET',
    path: () => '/api/account',
    handler: account.GET as Handler,
    expect: all(401, 200),
  },
  {
    name: 'PATCH /api/account',
    method: 'PATCH',
    path: () => '/api/account',
    handler: account.PATCH as Handler,
    prepare: async () => ({ body: { name: 'Renamed Person' } }),
    expect: all(401, 200),
  },
  {
    name: 'POST /api/account/password',
    method: 'POST',
    path: () => '/api/account/password',
    handler: password.POST as Handler,
    prepare: async () => ({ body: { currentPassword: DEMO_PASSWORD, newPassword: DEMO_PASSWORD } }),
    expect: all(401, 204),
  },
  {
    name: 'GET /api/account/tokens',
    method: 'GET',
    path: () => '/api/account/tokens',
    handler: tokens.GET as Handler,
    expect: all(401, 200),
  },
  {
    name: 'POST /api/account/tokens',
    method: 'POST',
    path: () => '/api/account/tokens',
    handler: tokens.POST as Handler,
    prepare: async () => ({ body: { name: 'matrix' } }),
    expect: all(401, 201),
  },
  {
    name: "DELETE /api/account/tokens/{id} (the engineer's token)",
    method: 'DELETE',
    path: (p) => `/api/account/tokens/${p.id}`,
    handler: tokenById.DELETE as Handler,
    prepare: async () => ({ params: { id: String((await engineerToken()).id) } }),
    expect: { anonymous: 401, viewer: 404, reviewer: 404, engineer: 200, admin: 404, otherAdmin: 404 },
  },
  {
    name: 'GET /api/team',
    method: 'GET',
    path: () => '/api/team',
    handler: team.GET as Handler,
    expect: all(401, 200),
  },
  {
    name: 'PATCH /api/team',
    method: 'PATCH',
    path: () => '/api/team',
    handler: team.PATCH as Handler,
    prepare: async () => ({ body: { allowViewerDatasetExport: false } }),
    expect: adminOnly(200, 200),
  },
  {
    name: 'GET /api/team/members',
    method: 'GET',
    path: () => '/api/team/members',
    handler: members.GET as Handler,
    expect: all(401, 200),
  },
  {
    name: 'PATCH /api/team/members/{id}',
    method: 'PATCH',
    path: (p) => `/api/team/members/${p.id}`,
    handler: memberById.PATCH as Handler,
    prepare: async () => ({ params: { id: String((await freshMember()).id) }, body: { role: 'reviewer' } }),
    expect: adminOnly(200, 404),
  },
  {
    name: 'DELETE /api/team/members/{id}',
    method: 'DELETE',
    path: (p) => `/api/team/members/${p.id}`,
    handler: memberById.DELETE as Handler,
    prepare: async () => ({ params: { id: String((await freshMember()).id) } }),
    expect: adminOnly(204, 404),
  },
  {
    name: 'GET /api/team/invitations',
    method: 'GET',
    path: () => '/api/team/invitations',
    handler: invitations.GET as Handler,
    expect: adminOnly(200, 200),
  },
  {
    name: 'POST /api/team/invitations',
    method: 'POST',
    path: () => '/api/team/invitations',
    handler: invitations.POST as Handler,
    prepare: async () => ({ body: { email: `new-${++counter}@steerwise.test`, role: 'engineer' } }),
    expect: adminOnly(201, 201),
  },
  {
    name: 'DELETE /api/team/invitations/{id}',
    method: 'DELETE',
    path: (p) => `/api/team/invitations/${p.id}`,
    handler: invitationById.DELETE as Handler,
    prepare: async () => ({ params: { id: String((await freshInvitation()).id) } }),
    expect: adminOnly(200, 404),
  },
  {
    name: 'GET /api/outbox',
    method: 'GET',
    path: () => '/api/outbox',
    handler: outbox.GET as Handler,
    expect: adminOnly(200, 200),
  },
  {
    name: 'GET /api/outbox/{id}',
    method: 'GET',
    path: (p) => `/api/outbox/${p.id}`,
    handler: outboxById.GET as Handler,
    prepare: async () => ({ params: { id: String(demoMailId) } }),
    expect: adminOnly(200, 404),
  },
  {
    name: 'GET /api/audit',
    method: 'GET',
    path: () => '/api/audit',
    handler: audit.GET as Handler,
    expect: adminOnly(200, 200),
  },
  // Anonymous by design: the answer never depends on who asks.
  {
    name: 'POST /api/password-reset',
    method: 'POST',
    path: () => '/api/password-reset',
    handler: passwordReset.POST as Handler,
    prepare: async (who) => ({ body: { email: `nobody-${who}@steerwise.test` } }),
    expect: all(202, 202),
  },
  {
    name: 'GET /api/v1/arrays',
    method: 'GET',
    path: () => '/api/v1/arrays',
    handler: arrays.GET as Handler,
    expect: all(401, 200),
  },
  {
    name: 'POST /api/v1/arrays',
    method: 'POST',
    path: () => '/api/v1/arrays',
    handler: arrays.POST as Handler,
    prepare: async (who) => ({
      body: { name: `Matrix line ${who}`, elements: 8, spacing: { value: 0.5, unit: 'wavelength' } },
    }),
    expect: editors(201),
  },
  {
    name: 'GET /api/v1/arrays/{id}',
    method: 'GET',
    path: (p) => `/api/v1/arrays/${p.id}`,
    handler: arrayById.GET as Handler,
    prepare: async () => ({ params: { id: await demoArrayId() } }),
    expect: teamRead(200),
  },
  {
    name: 'GET /api/v1/arrays/{id}/revisions/{rev}',
    method: 'GET',
    path: (p) => `/api/v1/arrays/${p.id}/revisions/${p.rev}`,
    handler: arrayRevision.GET as Handler,
    prepare: async () => ({ params: { id: await demoArrayId(), rev: '1' } }),
    expect: teamRead(200),
  },
  {
    name: 'GET /api/v1/studies',
    method: 'GET',
    path: () => '/api/v1/studies',
    handler: studies.GET as Handler,
    expect: all(401, 200),
  },
  // an empty body: the permission is checked before the body, so editors get 422 and nothing is queued
  {
    name: 'POST /api/v1/studies (empty body)',
    method: 'POST',
    path: () => '/api/v1/studies',
    handler: studies.POST as Handler,
    prepare: async () => ({ body: {} }),
    expect: editors(422),
  },
  {
    name: 'GET /api/v1/studies/{id}',
    method: 'GET',
    path: (p) => `/api/v1/studies/${p.id}`,
    handler: studyById.GET as Handler,
    prepare: async () => ({ params: { id: await demoStudyId() } }),
    expect: teamRead(200),
  },
  {
    name: 'POST /api/links/complete (unknown token)',
    method: 'POST',
    path: () => '/api/links/complete',
    handler: linksComplete.POST as Handler,
    prepare: async () => ({ body: { token: 'x'.repeat(43), password: 'long enough password' } }),
    expect: all(404, 404),
  },
];

describe('authorization matrix: every route × every caller', () => {
  for (const c of cases) {
    for (const who of everyone) {
      it(`${c.name} as ${who} → ${c.expect[who]}`, async () => {
        const prepared = (await c.prepare?.(who)) ?? {};
        const headers = await browserHeaders(who);
        const res = await c.handler(
          req(c.method, c.path(prepared.params ?? {}), { body: prepared.body, headers }),
          params(prepared.params ?? {}),
        );
        const body = await json(res);
        expect(res.status, JSON.stringify(body)).toBe(c.expect[who]);
        if (res.status >= 400) {
          expect(body.error.code).toBeTypeOf('string');
          expect(body.error.message.length).toBeGreaterThan(10);
        }
        if (res.status === 403) expect(body.error.message).toMatch(new RegExp(`^Your role \\(${who}\\) cannot `));
      });
    }
  }
});

describe('the same routes answer a bearer token like the session', () => {
  it('a viewer token reads the team but is refused the audit log with a clear message', async () => {
    const viewer = await userOf('viewer');
    const secret = randomSecret('sw_', 32);
    await ApiToken.create({
      userId: viewer.id,
      name: 'matrix bearer',
      tokenHash: sha256Hex(secret),
      prefix: secret.slice(0, 9),
    });
    const ok = await members.GET(
      req('GET', '/api/team/members', { headers: { authorization: `Bearer ${secret}` } }),
      params({}),
    );
    expect(ok.status).toBe(200);
    const refused = await audit.GET(
      req('GET', '/api/audit', { headers: { authorization: `Bearer ${secret}` } }),
      params({}),
    );
    expect(refused.status).toBe(403);
    expect((await json(refused)).error.message).toBe('Your role (viewer) cannot read the audit log.');
  });
});

describe("another team's admin sees only their own team", () => {
  it('members, audit and outbox lists contain nothing of the demo team', async () => {
    const headers = await browserHeaders('otherAdmin');
    const m = await json(await members.GET(req('GET', '/api/team/members', { headers }), params({})));
    expect(m.items.map((u: { email: string }) => u.email)).toEqual(['range-admin@steerwise.test']);
    const a = await json(await audit.GET(req('GET', '/api/audit', { headers }), params({})));
    const demoTeam = (await userOf('admin')).teamId;
    expect(a.items.length).toBeGreaterThan(0);
    for (const e of a.items) expect(e.target ?? '').not.toMatch(/^(admin|engineer|reviewer|viewer)@steerwise\.test$/);
    const o = await json(await outbox.GET(req('GET', '/api/outbox', { headers }), params({})));
    expect(o.items.find((x: { id: number }) => x.id === demoMailId)).toBeUndefined();
    expect(demoTeam).not.toBe((await userOf('otherAdmin')).teamId);
  });
});
