/**
 * The authorization matrix: every (route, method) the app exports × anonymous,
 * viewer, reviewer, engineer, admin and another team's admin.
 *
 * The routes come from the files (tests/helpers/route-discovery.ts walks
 * app/api/**\/route.ts and reads each module's exported HTTP methods), and
 * the first test fails, naming the route and method, when a pair has no row
 * in MATRIX below or a row names a pair that does not exist.
 *
 * Each case calls the real exported handler (inside Next's request scope,
 * tests/helpers/next-request-scope.ts) with real credentials: a signed
 * next-auth session cookie plus the CSRF cookie and header
 * (tests/helpers/api.ts), against the file's own migrated and seeded SQLite.
 * Ids always point at records of the demo team, so the other team's admin
 * must get 404, never the record. Permitted callers send valid minimal
 * bodies and their row states the real success status; a row whose body is
 * refused after the permission check says so in its comment.
 *
 * Adding a route: add one row per exported method to MATRIX (rows are
 * sorted by route, then method), with a one-line comment saying who may call
 * it and what the body is. Extra bodies for the same pair go in rows with a
 * `variant`.
 */
import { callRouteHandler, type RouteHandler } from '../helpers/next-request-scope';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import {
  ApiToken,
  ArrayDesign,
  BearingTimeRecord,
  ArrayRevision,
  AuthLink,
  Dataset,
  Handoff,
  OutboxMessage,
  Study,
  User,
} from '@/models';
import { hashPassword } from '@/lib/auth/passwords';
import { randomSecret, sha256Hex } from '@/lib/auth/secrets';
import { startSmtpSink } from '@/lib/mail/sink';
import { storeCapturedMail } from '@/lib/mail/outbox';
import { createSignedToken } from '@/lib/handoff/signed-link';
import { simulateSnapshots } from '@/lib/doa';
import { DEMO_PASSWORD } from '@/lib/demo/seed';
import {
  browserHeaders,
  csrfPair,
  emails,
  everyone,
  json,
  ORIGIN,
  params,
  req,
  sessionCookieFor,
  userOf,
  type Who,
} from '../helpers/api';
import {
  compareWithTable,
  discoverRoutes,
  exportedMethods,
  fillRoute,
  type HttpMethod,
  type RouteMethod,
} from '../helpers/route-discovery';
import { createArray, createDataset, snapshotsCsv } from '../lib/handoff/fixtures';
import { storeSimulatedWav, tinyBtrBody, waitForRecord } from './btr.helpers';

const TABLE_FILE = 'tests/api/authorization-matrix.test.ts';
const APP_DIR = path.resolve(__dirname, '../../app');

type Expect = Record<Who, number>;
type Prepared = {
  params?: Record<string, string | string[]>;
  /** Appended to the path, with its leading '?'. */
  query?: string;
  /** JSON (sent as application/json), FormData (multipart) or URLSearchParams (a form). */
  body?: unknown;
  /** Replace the caller's headers entirely (next-auth's sign-in builds its own cookies). */
  headers?: Record<string, string>;
};
type Row = {
  route: string;
  method: HttpMethod;
  /** Further rows for the same pair: a second body or query, named. */
  variant?: string;
  expect: Expect;
  prepare?: (who: Who) => Promise<Prepared>;
  /** The error code of this row's 403s when it is not the role refusal ('forbidden'). */
  refusalCode?: string;
  /** More assertions on a successful answer (status below 400), beyond the status. */
  check?: (a: {
    who: Who;
    res: Response;
    body: ReturnType<typeof JSON.parse>;
    prepared: Prepared;
  }) => Promise<void> | void;
};

// ---- expected statuses -------------------------------------------------------

/** The same status for every caller: public endpoints whose answer does not depend on who asks. */
const publicRoute = (status: number): Expect => ({
  anonymous: status,
  viewer: status,
  reviewer: status,
  engineer: status,
  admin: status,
  otherAdmin: status,
});
/** Anyone signed in, acting on their own account or their own team. */
const signedIn = (ok: number): Expect => ({ ...publicRoute(ok), anonymous: 401 });
/** Every member of the demo team reads; another team's admin gets 404. */
const teamRead = (ok: number): Expect => ({ ...signedIn(ok), otherAdmin: 404 });
/** Engineers and admins; viewers and reviewers 403; another team's admin as stated (404 for a demo record, ok when it acts in its own team). */
const engineersAndAdmins = (ok: number, otherAdmin: number): Expect => ({
  anonymous: 401,
  viewer: 403,
  reviewer: 403,
  engineer: ok,
  admin: ok,
  otherAdmin,
});
const adminOnly = (ok: number, otherAdmin: number): Expect => ({
  anonymous: 401,
  viewer: 403,
  reviewer: 403,
  engineer: 403,
  admin: ok,
  otherAdmin,
});

// ---- records of the demo team the rows point at -------------------------------

let counter = 0;
const ids = {
  demoTeam: 0,
  array: 0,
  dataset: 0,
  /** A tiny 4 × 8 CSV dataset of the demo team, for the bundle with a data file. */
  tinyDataset: 0,
  study: 0,
  run: 0,
  mail: 0,
  /** A tiny simulated WAV (3 s, 4 channels) of the demo team and a finished bearing–time record of it. */
  wav: 0,
  btr: 0,
  /** A finished calibration of a 4-element demo-team array (accept: false). */
  calibrationArray: 0,
  calibration: 0,
};
let handoffToken = '';
let bundleBytes: Uint8Array = new Uint8Array();
let sink: { port: number; close: () => Promise<void> };

/** A tiny inline estimate: 4 elements, 8 snapshots, one source at 10° (a simulated, seeded record). */
function tinySnapshots() {
  const n = 8;
  const m = 4;
  const x = simulateSnapshots({
    elements: m,
    spacingWavelengths: 0.5,
    bearingsDeg: [10],
    powers: [10],
    noisePower: 0.1,
    snapshots: n,
    seed: 3,
  });
  const rows = (part: Float64Array) =>
    Array.from({ length: n }, (_, r) => Array.from({ length: m }, (_, c) => part[c * n + r]));
  return { re: rows(x.re), im: rows(x.im) };
}
const tinyEstimate = () => ({
  snapshots: tinySnapshots(),
  array: { elements: 4, spacingWavelengths: 0.5 },
  method: 'esprit-ls',
  sourceCount: 1,
});
/** A tiny study: 4 elements, one SNR point, 2 trials of 16 snapshots, one method (milliseconds of work). */
const tinyStudy = (name: string) => ({
  name,
  array: { elements: 4, spacingWavelengths: 0.5 },
  sources: { bearingsDeg: [5], powersDb: [10] },
  snapshots: 16,
  sweep: { variable: 'snr', values: [10] },
  methods: ['esprit-ls'],
  trials: 2,
  seed: 1,
});

async function demoMember(role: 'viewer' | 'reviewer' = 'viewer'): Promise<User> {
  counter += 1;
  return User.create({
    email: `matrix-${counter}@steerwise.test`,
    name: `Matrix Member ${counter}`,
    role,
    passwordHash: 'x', // never signs in
    teamId: ids.demoTeam,
  });
}
async function demoInvitation(): Promise<AuthLink> {
  counter += 1;
  const admin = await userOf('admin');
  return AuthLink.create({
    purpose: 'invite',
    email: `invitee-${counter}@steerwise.test`,
    role: 'viewer',
    teamId: ids.demoTeam,
    createdById: admin.id,
    tokenHash: sha256Hex(randomSecret('', 16)),
    expiresAt: new Date(Date.now() + 3600_000),
  });
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
/** Calls a route of this file's table as `who` (used by beforeAll to make records through the real routes). */
async function callAs(who: Who, route: string, method: HttpMethod, prepared: Prepared = {}): Promise<Response> {
  const mod = discovered.modules.get(route);
  const handler = mod?.[method] as RouteHandler | undefined;
  if (!handler) throw new Error(`${method} ${route} is not exported`);
  const p = prepared.params ?? {};
  const url = `${ORIGIN}${fillRoute(route, p)}${prepared.query ?? ''}`;
  const headers = prepared.headers ?? (await browserHeaders(who));
  const init: RequestInit = { method, headers: { ...headers } };
  const body = prepared.body;
  if (body instanceof FormData || body instanceof URLSearchParams) init.body = body;
  else if (body !== undefined) {
    init.body = JSON.stringify(body);
    (init.headers as Record<string, string>)['content-type'] = 'application/json';
  }
  return callRouteHandler(route, handler, url, init, p);
}
async function readBody(res: Response) {
  const type = res.headers.get('content-type') ?? '';
  if (/json/.test(type)) return json(res);
  const bytes = new Uint8Array(await res.arrayBuffer());
  return { contentType: type, bytes: bytes.byteLength };
}

// ---- the table: one row per (route, method), sorted by route ------------------

const MATRIX: Row[] = [
  // Own profile; every signed-in caller, whatever the role.
  { route: '/api/account', method: 'GET', expect: signedIn(200) },
  // Own name (sent unchanged, so the row has no side effect on later rows).
  {
    route: '/api/account',
    method: 'PATCH',
    expect: signedIn(200),
    prepare: async (who) => ({ body: { name: who === 'anonymous' ? 'Nobody' : (await userOf(who)).name } }),
  },
  // Own password: the current demo password set again (beforeAll gives every user the demo password).
  {
    route: '/api/account/password',
    method: 'POST',
    expect: signedIn(204),
    prepare: async () => ({ body: { currentPassword: DEMO_PASSWORD, newPassword: DEMO_PASSWORD } }),
  },
  // Own API tokens.
  { route: '/api/account/tokens', method: 'GET', expect: signedIn(200) },
  // A new token for oneself.
  {
    route: '/api/account/tokens',
    method: 'POST',
    expect: signedIn(201),
    prepare: async () => ({ body: { name: 'matrix' } }),
  },
  // Revoking a token is for its owner only (here the engineer's): even the team's admin gets 404.
  {
    route: '/api/account/tokens/[id]',
    method: 'DELETE',
    expect: { anonymous: 401, viewer: 404, reviewer: 404, engineer: 200, admin: 404, otherAdmin: 404 },
    prepare: async () => ({ params: { id: String((await engineerToken()).id) } }),
  },
  // The team's audit log: admins, each of their own team.
  { route: '/api/audit', method: 'GET', expect: adminOnly(200, 200) },
  // next-auth, public: GET /api/auth/session answers 200 for all; the session body only for a valid cookie.
  {
    route: '/api/auth/[...nextauth]',
    method: 'GET',
    expect: publicRoute(200),
    prepare: async () => ({ params: { nextauth: ['session'] } }),
    check: ({ who, body }) => {
      if (who === 'anonymous') expect(body).toEqual({});
      else expect(body.user.email).toBe(emails[who]);
    },
  },
  // next-auth, public: the credentials sign-in (viewer's e-mail and password, CSRF token matching its cookie) sets a session cookie whoever was signed in before.
  {
    route: '/api/auth/[...nextauth]',
    method: 'POST',
    expect: publicRoute(200),
    prepare: async (who) => {
      const pair = csrfPair();
      const cookies = [pair.cookie];
      if (who !== 'anonymous') cookies.push(await sessionCookieFor(await userOf(who)));
      return {
        params: { nextauth: ['callback', 'credentials'] },
        headers: { cookie: cookies.join('; '), 'x-forwarded-for': '192.0.2.200' },
        body: new URLSearchParams({
          email: emails.viewer,
          password: DEMO_PASSWORD,
          csrfToken: pair.header,
          json: 'true',
        }),
      };
    },
    check: ({ res, body }) => {
      expect(body.url).toBe(`${ORIGIN}`);
      expect(res.headers.getSetCookie().some((c) => c.startsWith('next-auth.session-token='))).toBe(true);
    },
  },
  // next-auth refuses a sign-in without its CSRF token: 200 pointing back at the sign-in page, and no session cookie.
  {
    route: '/api/auth/[...nextauth]',
    method: 'POST',
    variant: 'without the CSRF token',
    expect: publicRoute(200),
    prepare: async () => ({
      params: { nextauth: ['callback', 'credentials'] },
      headers: { 'x-forwarded-for': '192.0.2.201' },
      body: new URLSearchParams({ email: emails.viewer, password: DEMO_PASSWORD, json: 'true' }),
    }),
    check: ({ res, body }) => {
      expect(body.url).toMatch(/\/api\/auth\/signin\?csrf=true$/);
      expect(res.headers.getSetCookie().some((c) => c.startsWith('next-auth.session-token='))).toBe(false);
    },
  },
  // The team's sent hand-offs: every member; another team's admin reads its own (empty) list.
  {
    route: '/api/handoff',
    method: 'GET',
    expect: signedIn(200),
    check: ({ who, body }) => {
      const ours = body.items.filter((h: { arrayId: number }) => h.arrayId === ids.array);
      expect(ours.length > 0).toBe(who !== 'otherAdmin');
    },
  },
  // Sending a hand-off (to a demo member, so no invitation): engineers and admins; the demo array is 404 to the other team.
  {
    route: '/api/handoff',
    method: 'POST',
    expect: engineersAndAdmins(201, 404),
    prepare: async () => ({ body: { arrayId: ids.array, recipientEmail: emails.reviewer } }),
  },
  // To an address without an account: only an admin's hand-off also invites it into the team (invitations are team.manage).
  {
    route: '/api/handoff',
    method: 'POST',
    variant: 'to an address without an account',
    expect: engineersAndAdmins(201, 404),
    prepare: async (who) => ({ body: { arrayId: ids.array, recipientEmail: `outsider-${who}@steerwise.test` } }),
    check: async ({ who, body }) => {
      expect(body.invited).toBe(who === 'admin');
      expect(await AuthLink.count({ where: { email: `outsider-${who}@steerwise.test`, purpose: 'invite' } })).toBe(
        who === 'admin' ? 1 : 0,
      );
    },
  },
  // The signed link is the credential: the bundle for anyone holding it, signed in or not, of any team.
  {
    route: '/api/handoff/[token]',
    method: 'GET',
    expect: publicRoute(200),
    prepare: async () => ({ params: { token: handoffToken } }),
    check: ({ body }) => expect(body.contentType).toBe('application/zip'),
  },
  // An altered signature is 404 for everyone.
  {
    route: '/api/handoff/[token]',
    method: 'GET',
    variant: 'altered link',
    expect: publicRoute(404),
    prepare: async () => ({
      params: { token: `${handoffToken.slice(0, -3)}${handoffToken.endsWith('AAA') ? 'BBB' : 'AAA'}` },
    }),
  },
  // Liveness, public.
  { route: '/api/health', method: 'GET', expect: publicRoute(200) },
  // Public: the one-time token in the body is the credential (a fresh reset link of a demo member per call).
  {
    route: '/api/links/complete',
    method: 'POST',
    expect: publicRoute(200),
    prepare: async () => {
      const member = await demoMember();
      const token = randomSecret('', 32);
      await AuthLink.create({
        purpose: 'reset',
        email: member.email,
        teamId: ids.demoTeam,
        createdById: null,
        tokenHash: sha256Hex(token),
        expiresAt: new Date(Date.now() + 3600_000),
      });
      return { body: { token, password: 'a long enough new password' } };
    },
    check: ({ body }) => expect(body.purpose).toBe('reset'),
  },
  // An unknown token is 404 for everyone.
  {
    route: '/api/links/complete',
    method: 'POST',
    variant: 'unknown token',
    expect: publicRoute(404),
    prepare: async () => ({ body: { token: 'x'.repeat(43), password: 'long enough password' } }),
  },
  // The local mail sink: admins see mail addressed to their own team.
  { route: '/api/outbox', method: 'GET', expect: adminOnly(200, 200) },
  // A message to a demo member: the demo admin only.
  {
    route: '/api/outbox/[id]',
    method: 'GET',
    expect: adminOnly(200, 404),
    prepare: async () => ({ params: { id: String(ids.mail) } }),
  },
  // Public by design: 202 for any well-formed address, whether or not it has an account.
  {
    route: '/api/password-reset',
    method: 'POST',
    expect: publicRoute(202),
    prepare: async (who) => ({ body: { email: `nobody-${who}@steerwise.test` } }),
  },
  // Own team.
  { route: '/api/team', method: 'GET', expect: signedIn(200) },
  // Team settings: admins, of their own team.
  {
    route: '/api/team',
    method: 'PATCH',
    expect: adminOnly(200, 200),
    prepare: async () => ({ body: { allowViewerDatasetExport: false } }),
  },
  // Invitations: admins, of their own team.
  { route: '/api/team/invitations', method: 'GET', expect: adminOnly(200, 200) },
  // A new invitation (mailed to the sink): admins, into their own team.
  {
    route: '/api/team/invitations',
    method: 'POST',
    expect: adminOnly(201, 201),
    prepare: async () => ({ body: { email: `new-${++counter}@steerwise.test`, role: 'engineer' } }),
  },
  // Revoking a fresh demo invitation: the demo admin only.
  {
    route: '/api/team/invitations/[id]',
    method: 'DELETE',
    expect: adminOnly(200, 404),
    prepare: async () => ({ params: { id: String((await demoInvitation()).id) } }),
  },
  // Members of one's own team.
  { route: '/api/team/members', method: 'GET', expect: signedIn(200) },
  // A fresh demo member's role: the demo admin only.
  {
    route: '/api/team/members/[id]',
    method: 'PATCH',
    expect: adminOnly(200, 404),
    prepare: async () => ({ params: { id: String((await demoMember()).id) }, body: { role: 'reviewer' } }),
  },
  // Removing a fresh demo member: the demo admin only.
  {
    route: '/api/team/members/[id]',
    method: 'DELETE',
    expect: adminOnly(204, 404),
    prepare: async () => ({ params: { id: String((await demoMember()).id) } }),
  },
  // The team's arrays.
  { route: '/api/v1/arrays', method: 'GET', expect: signedIn(200) },
  // A new 8-element array: engineers and admins, into their own team.
  {
    route: '/api/v1/arrays',
    method: 'POST',
    expect: engineersAndAdmins(201, 201),
    prepare: async (who) => ({
      body: { name: `Matrix line ${who}`, elements: 8, spacing: { value: 0.5, unit: 'wavelength' } },
    }),
  },
  // A cookie-authenticated write without the CSRF header is refused before the role is looked at (csrf_failed).
  {
    route: '/api/v1/arrays',
    method: 'POST',
    variant: 'session cookie without the CSRF header',
    expect: { ...publicRoute(403), anonymous: 401 },
    prepare: async (who) => ({
      headers: await browserHeaders(who, { csrf: false }),
      body: { name: `No CSRF ${who}`, elements: 8, spacing: { value: 0.5, unit: 'wavelength' } },
    }),
    refusalCode: 'csrf_failed',
  },
  // A seeded demo array.
  {
    route: '/api/v1/arrays/[id]',
    method: 'GET',
    expect: teamRead(200),
    prepare: async () => ({ params: { id: String(ids.array) } }),
  },
  // A new revision (steering changed) of a fresh demo array: engineers and admins.
  {
    route: '/api/v1/arrays/[id]',
    method: 'PATCH',
    expect: engineersAndAdmins(200, 404),
    prepare: async () => {
      const { array } = await createArray({ user: await userOf('engineer') });
      return { params: { id: String(array.id) }, body: { steerDeg: 0 } };
    },
    check: ({ res, body }) => {
      if (res.status === 200) expect(body.revision).toBe(2);
    },
  },
  // The seeded array's bundle (revision, calibration, charts, summary; no data files): every member.
  {
    route: '/api/v1/arrays/[id]/bundle',
    method: 'GET',
    expect: teamRead(200),
    prepare: async () => ({ params: { id: String(ids.array) } }),
    check: ({ body }) => expect(body.contentType).toBe('application/zip'),
  },
  // With a dataset file: viewers only when the team allows it (the demo team does not).
  {
    route: '/api/v1/arrays/[id]/bundle',
    method: 'GET',
    variant: 'with a dataset file',
    expect: { ...teamRead(200), viewer: 403 },
    prepare: async () => ({ params: { id: String(ids.array) }, query: `?datasets=${ids.tinyDataset}` }),
  },
  // The array's calibrations: every member.
  {
    route: '/api/v1/arrays/[id]/calibrations',
    method: 'GET',
    expect: teamRead(200),
    prepare: async () => ({ params: { id: String(ids.calibrationArray) } }),
  },
  // A calibration from one reference (a fresh 4-element array and a one-source recording): engineers and admins; the 201 holds the new revision.
  {
    route: '/api/v1/arrays/[id]/calibrations',
    method: 'POST',
    expect: engineersAndAdmins(201, 404),
    prepare: async () => {
      const { arrayId, datasetId } = await calibrationFixture();
      return { params: { id: String(arrayId) }, body: { datasetId, bearingsDeg: [10] } };
    },
    check: ({ res, body }) => {
      if (res.status === 201) expect(body.revision.revision).toBe(2);
    },
  },
  // One calibration of the demo team: every member.
  {
    route: '/api/v1/arrays/[id]/calibrations/[calibrationId]',
    method: 'GET',
    expect: teamRead(200),
    prepare: async () => ({
      params: { id: String(ids.calibrationArray), calibrationId: String(ids.calibration) },
    }),
  },
  // Accepting a fresh finished calibration as a new revision: engineers and admins.
  {
    route: '/api/v1/arrays/[id]/calibrations/[calibrationId]/accept',
    method: 'POST',
    expect: engineersAndAdmins(201, 404),
    prepare: async () => {
      const { arrayId, calibrationId } = await proposedCalibration();
      return { params: { id: String(arrayId), calibrationId: String(calibrationId) } };
    },
  },
  // Revision 1 of the seeded array.
  {
    route: '/api/v1/arrays/[id]/revisions/[rev]',
    method: 'GET',
    expect: teamRead(200),
    prepare: async () => ({ params: { id: String(ids.array), rev: '1' } }),
  },
  // The team's bearing–time records (roles as for estimates).
  { route: '/api/v1/bearing-time-records', method: 'GET', expect: signedIn(200) },
  // A record of the tiny demo-team WAV (3 s, 4 channels): engineers and admins; the dataset is 404 to the other team.
  {
    route: '/api/v1/bearing-time-records',
    method: 'POST',
    expect: engineersAndAdmins(202, 404),
    prepare: async () => ({ body: tinyBtrBody(ids.wav) }),
  },
  // The finished record made in the setup.
  {
    route: '/api/v1/bearing-time-records/[id]',
    method: 'GET',
    expect: teamRead(200),
    prepare: async () => ({ params: { id: String(ids.btr) } }),
  },
  // Deleting a fresh record (and its files): engineers and admins.
  {
    route: '/api/v1/bearing-time-records/[id]',
    method: 'DELETE',
    expect: engineersAndAdmins(204, 404),
    prepare: async () => {
      const res = await callAs('engineer', '/api/v1/bearing-time-records', 'POST', { body: tinyBtrBody(ids.wav) });
      expect(res.status).toBe(202);
      return { params: { id: String((await json(res)).id) } };
    },
  },
  // One block's spectrum and bearings of the finished record.
  {
    route: '/api/v1/bearing-time-records/[id]/blocks/[index]',
    method: 'GET',
    expect: teamRead(200),
    prepare: async () => ({ params: { id: String(ids.btr), index: '2' } }),
  },
  // Stopping the finished record: engineers and admins pass the permission check and get 409 (already ended).
  {
    route: '/api/v1/bearing-time-records/[id]/cancel',
    method: 'POST',
    expect: engineersAndAdmins(409, 404),
    prepare: async () => ({ params: { id: String(ids.btr) }, body: {} }),
  },
  // The CSV export of the finished record (JSON and PNG are the same route with another format).
  {
    route: '/api/v1/bearing-time-records/[id]/export',
    method: 'GET',
    expect: teamRead(200),
    prepare: async () => ({ params: { id: String(ids.btr) }, query: '?format=csv' }),
  },
  // Pure computation on the body (no team data): every signed-in caller.
  {
    route: '/api/v1/bounds',
    method: 'POST',
    expect: signedIn(200),
    prepare: async () => ({
      body: {
        array: { elements: 8, spacingWavelengths: 0.5 },
        bearingsDeg: [-10, 12],
        sourcePowers: [1, 1],
        noisePower: 0.1,
        snapshots: 100,
      },
    }),
  },
  // Planning is pure computation on the body and stores nothing: every signed-in caller (arrays.read).
  {
    route: '/api/v1/plans',
    method: 'POST',
    expect: signedIn(200),
    prepare: async () => ({
      body: {
        frequencyHz: 3000,
        propagationSpeedMps: 1500,
        scanSectorDeg: 60,
        targets: { accuracyDeg: 1, atBearingDeg: 0 },
        snrDbPerElement: 10,
        snapshots: 200,
      },
    }),
  },
  // Importing a bundle of the seeded array (no runs, so nothing is re-executed): engineers and admins, into their own team.
  {
    route: '/api/v1/bundles',
    method: 'POST',
    expect: engineersAndAdmins(201, 201),
    prepare: async () => {
      const form = new FormData();
      form.append('file', new Blob([Buffer.from(bundleBytes)], { type: 'application/zip' }), 'matrix.zip');
      return { body: form };
    },
  },
  // The team's datasets.
  { route: '/api/v1/datasets', method: 'GET', expect: signedIn(200) },
  // Uploading a 4-element, 8-snapshot CSV: engineers and admins, into their own team.
  {
    route: '/api/v1/datasets',
    method: 'POST',
    expect: engineersAndAdmins(201, 201),
    prepare: async () => {
      const csv = snapshotsCsv({ elements: 4, spacingWavelengths: 0.5, bearingsDeg: [10], snapshots: 8, seed: 5 });
      const form = new FormData();
      form.append('file', new Blob([csv]), 'matrix.csv');
      return { body: form };
    },
  },
  // A seeded demo recording.
  {
    route: '/api/v1/datasets/[id]',
    method: 'GET',
    expect: teamRead(200),
    prepare: async () => ({ params: { id: String(ids.dataset) } }),
  },
  // Deleting a fresh demo dataset: engineers and admins.
  {
    route: '/api/v1/datasets/[id]',
    method: 'DELETE',
    expect: engineersAndAdmins(204, 404),
    prepare: async () => {
      const { dataset } = await createDataset({
        user: await userOf('engineer'),
        elements: 4,
        spacingWavelengths: 0.5,
        snapshots: 8,
      });
      return { params: { id: String(dataset.id) } };
    },
  },
  // The team's estimate runs.
  { route: '/api/v1/estimates', method: 'GET', expect: signedIn(200) },
  // A tiny inline estimate (4 elements × 8 snapshots, LS-ESPRIT, K = 1), waited for: engineers and admins.
  {
    route: '/api/v1/estimates',
    method: 'POST',
    expect: engineersAndAdmins(201, 201),
    prepare: async () => ({ body: tinyEstimate() }),
    check: ({ res, body }) => {
      if (res.status === 201) expect(body.bearingsDeg).toHaveLength(1);
    },
  },
  // On the tiny demo dataset: the dataset id is another team's record for the other admin, so 404.
  {
    route: '/api/v1/estimates',
    method: 'POST',
    variant: 'on a demo dataset',
    expect: engineersAndAdmins(201, 404),
    prepare: async () => ({
      body: {
        datasetId: ids.tinyDataset,
        array: { elements: 4, spacingWavelengths: 0.5 },
        method: 'esprit-ls',
        sourceCount: 1,
      },
    }),
  },
  // The run made in beforeAll.
  {
    route: '/api/v1/estimates/[id]',
    method: 'GET',
    expect: teamRead(200),
    prepare: async () => ({ params: { id: String(ids.run) } }),
  },
  // Re-running that run (tiny, waited for): engineers and admins.
  {
    route: '/api/v1/estimates/[id]/rerun',
    method: 'POST',
    expect: engineersAndAdmins(201, 404),
    prepare: async () => ({ params: { id: String(ids.run) } }),
    check: ({ res, body }) => {
      if (res.status === 201) expect(body.rerunOf).toBe(ids.run);
    },
  },
  // Stopping the seeded, finished run: engineers and admins pass the permission check and get 409 (already ended);
  // stopping a running job is covered in tests/api/jobs.test.ts.
  {
    route: '/api/v1/estimates/[id]/cancel',
    method: 'POST',
    expect: engineersAndAdmins(409, 404),
    prepare: async () => ({ params: { id: String(ids.run) }, body: {} }),
  },
  // The v1 API description, public.
  { route: '/api/v1/openapi.json', method: 'GET', expect: publicRoute(200) },
  // The review thread of revision 1 of the seeded array.
  {
    route: '/api/v1/reviews',
    method: 'GET',
    expect: teamRead(200),
    prepare: async () => ({ query: `?arrayId=${ids.array}&revision=1` }),
  },
  // A comment on revision 1: engineers, reviewers and admins; viewers 403.
  {
    route: '/api/v1/reviews',
    method: 'POST',
    expect: { anonymous: 401, viewer: 403, reviewer: 201, engineer: 201, admin: 201, otherAdmin: 404 },
    prepare: async (who) => ({
      body: { arrayId: ids.array, revision: 1, kind: 'comment', body: `Checked by ${who}.` },
    }),
  },
  // An approval: reviewers and admins only; engineers 403.
  {
    route: '/api/v1/reviews',
    method: 'POST',
    variant: 'approval',
    expect: { anonymous: 401, viewer: 403, reviewer: 201, engineer: 403, admin: 201, otherAdmin: 404 },
    prepare: async () => ({ body: { arrayId: ids.array, revision: 1, kind: 'approval' } }),
  },
  // A comment on the run made in beforeAll: the run is 404 to the other team's admin.
  {
    route: '/api/v1/reviews',
    method: 'POST',
    variant: 'on a run',
    expect: { anonymous: 401, viewer: 403, reviewer: 201, engineer: 201, admin: 201, otherAdmin: 404 },
    prepare: async (who) => ({ body: { runId: ids.run, kind: 'comment', body: `Run checked by ${who}.` } }),
  },
  // An empty object: the role is checked before the body, so viewers get 403 and everyone allowed to comment 422 (arrayId, kind).
  {
    route: '/api/v1/reviews',
    method: 'POST',
    variant: 'empty body',
    expect: { anonymous: 401, viewer: 403, reviewer: 422, engineer: 422, admin: 422, otherAdmin: 422 },
    prepare: async () => ({ body: {} }),
  },
  // The team's studies.
  { route: '/api/v1/studies', method: 'GET', expect: signedIn(200) },
  // A tiny study (2 trials, one point; queued, done in milliseconds): engineers and admins.
  {
    route: '/api/v1/studies',
    method: 'POST',
    expect: engineersAndAdmins(202, 202),
    prepare: async (who) => ({ body: tinyStudy(`Matrix study ${who}`) }),
  },
  // On the seeded demo array (its latest revision, 16 elements; still 2 trials): 404 for the other team's admin.
  {
    route: '/api/v1/studies',
    method: 'POST',
    variant: 'on a demo array',
    expect: engineersAndAdmins(202, 404),
    prepare: async (who) => {
      const { array: _inline, ...study } = tinyStudy(`Matrix study on the demo array ${who}`);
      return { body: { ...study, arrayId: ids.array } };
    },
  },
  // The seeded demo study.
  {
    route: '/api/v1/studies/[id]',
    method: 'GET',
    expect: teamRead(200),
    prepare: async () => ({ params: { id: String(ids.study) } }),
  },
  // Stopping the seeded, finished demo study: engineers and admins pass the permission check and get 409 (already
  // ended); stopping a running study is covered in tests/api/jobs.test.ts.
  {
    route: '/api/v1/studies/[id]/cancel',
    method: 'POST',
    expect: engineersAndAdmins(409, 404),
    prepare: async () => ({ params: { id: String(ids.study) }, body: {} }),
  },
  // Deleting a fresh tiny demo study: engineers and admins.
  {
    route: '/api/v1/studies/[id]',
    method: 'DELETE',
    expect: engineersAndAdmins(204, 404),
    prepare: async () => {
      const res = await callAs('engineer', '/api/v1/studies', 'POST', { body: tinyStudy('To delete') });
      expect(res.status).toBe(202);
      return { params: { id: String((await json(res)).id) } };
    },
  },
];

/** A fresh 4-element demo-team array and a one-source (10°) recording for it. */
async function calibrationFixture(): Promise<{ arrayId: number; datasetId: number }> {
  const engineer = await userOf('engineer');
  const { array } = await createArray({
    user: engineer,
    config: { name: 'Matrix calibration line', elements: 4, spacing: { value: 0.5, unit: 'wavelength' } },
  });
  const { dataset } = await createDataset({
    user: engineer,
    elements: 4,
    spacingWavelengths: 0.5,
    bearingsDeg: [10],
    snapshots: 64,
  });
  return { arrayId: array.id, datasetId: dataset.id };
}

/** A finished, not yet accepted calibration of a fresh array. */
async function proposedCalibration(): Promise<{ arrayId: number; calibrationId: number }> {
  const { arrayId, datasetId } = await calibrationFixture();
  const res = await callAs('engineer', '/api/v1/arrays/[id]/calibrations', 'POST', {
    params: { id: String(arrayId) },
    body: { datasetId, bearingsDeg: [10], accept: false },
  });
  expect(res.status).toBe(201);
  return { arrayId, calibrationId: (await json(res)).id };
}

// ---- setup -------------------------------------------------------------------

let discovered: Awaited<ReturnType<typeof discoverRoutes>>;

beforeAll(async () => {
  discovered = await discoverRoutes(APP_DIR);
  sink = await startSmtpSink({ port: 0, store: storeCapturedMail });
  process.env.SMTP_SINK_PORT = String(sink.port);
  // Every user's password is the demo password, so the password-change and sign-in rows can succeed.
  await User.update({ passwordHash: await hashPassword(DEMO_PASSWORD) }, { where: {} });

  const admin = await userOf('admin');
  const engineer = await userOf('engineer');
  ids.demoTeam = admin.teamId as number;
  const array = await ArrayDesign.findOne({ where: { teamId: ids.demoTeam }, order: [['id', 'ASC']] });
  const dataset = await Dataset.findOne({ where: { teamId: ids.demoTeam }, order: [['id', 'ASC']] });
  const study = await Study.findOne({ where: { teamId: ids.demoTeam }, order: [['id', 'ASC']] });
  ids.array = array!.id;
  ids.dataset = dataset!.id;
  ids.study = study!.id;
  ids.tinyDataset = (
    await createDataset({ user: engineer, elements: 4, spacingWavelengths: 0.5, snapshots: 8 })
  ).dataset.id;
  expect(await ArrayRevision.count({ where: { arrayId: ids.array, revision: 1 } })).toBe(1);

  const mail = await OutboxMessage.create({
    to: emails.engineer,
    from: 'Steerwise <no-reply@steerwise.test>',
    subject: 'Reset your Steerwise password',
    text: 'demo',
    html: null,
    receivedAt: new Date(),
  });
  ids.mail = mail.id;
  const proposed = await proposedCalibration();
  ids.calibrationArray = proposed.arrayId;
  ids.calibration = proposed.calibrationId;

  ids.wav = (await storeSimulatedWav({ user: engineer })).id;
  const btr = await callAs('engineer', '/api/v1/bearing-time-records', 'POST', { body: tinyBtrBody(ids.wav) });
  expect(btr.status).toBe(202);
  ids.btr = (await json(btr)).id;
  expect(await waitForRecord(ids.btr)).toBe('done');

  const run = await callAs('engineer', '/api/v1/estimates', 'POST', { body: tinyEstimate() });
  expect(run.status).toBe(201);
  ids.run = (await json(run)).id;

  const handoff = await Handoff.create({
    teamId: ids.demoTeam,
    arrayId: ids.array,
    arrayRevision: 1,
    options: { datasets: [], runs: [] },
    recipientEmail: 'harbour-pilot@steerwise.test',
    note: null,
    sentById: engineer.id,
    expiresAt: new Date(Date.now() + 3600_000),
  });
  handoffToken = createSignedToken({
    purpose: 'handoff',
    subject: String(handoff.id),
    ttlSeconds: 3600,
    secret: process.env.NEXTAUTH_SECRET!,
  });

  const bundle = await callAs('engineer', '/api/v1/arrays/[id]/bundle', 'GET', { params: { id: String(ids.array) } });
  expect(bundle.status).toBe(200);
  bundleBytes = new Uint8Array(await bundle.arrayBuffer());
});

afterAll(async () => {
  // Let the queued tiny studies finish before the database closes.
  for (let i = 0; i < 400; i++) {
    if (
      !(await Study.count({ where: { status: ['queued', 'running'] } })) &&
      !(await BearingTimeRecord.count({ where: { status: ['queued', 'running'] } }))
    )
      break;
    await new Promise((resolve) => setTimeout(resolve, 25));
  }
  await sink.close();
});

// ---- the tests ---------------------------------------------------------------

describe('the matrix covers every route file', () => {
  it('every exported (route, method) has exactly one row, and every row names an exported pair', () => {
    expect(
      discovered.empty.map((f) => f.file),
      'route files that export no HTTP method',
    ).toEqual([]);
    expect(compareWithTable(discovered.pairs, MATRIX, TABLE_FILE)).toEqual([]);
  });

  it('finds the routes from the files, including the catch-all and the parameter routes', () => {
    const keys = discovered.pairs.map((p) => `${p.method} ${p.route}`);
    for (const k of [
      'GET /api/auth/[...nextauth]',
      'POST /api/auth/[...nextauth]',
      'GET /api/handoff',
      'GET /api/handoff/[token]',
      'GET /api/v1/arrays/[id]/revisions/[rev]',
      'DELETE /api/v1/studies/[id]',
    ])
      expect(keys).toContain(k);
    // One pair per exported function; `dynamic` and other exports are not methods.
    expect(exportedMethods(discovered.modules.get('/api/v1/datasets/[id]')!)).toEqual(['GET', 'DELETE']);
  });

  it('a route without a row, a method without a row, or a row without a route fails with a message naming it', () => {
    const found: RouteMethod[] = [
      ...discovered.pairs,
      // Made-up pairs no real route will ever export: a new route, and a new method on an existing route.
      {
        route: '/api/v1/example-new-route',
        method: 'POST',
        file: path.join(APP_DIR, 'api/v1/example-new-route/route.ts'),
      },
      { route: '/api/health', method: 'PUT', file: path.join(APP_DIR, 'api/health/route.ts') },
    ];
    const rows = [...MATRIX, { route: '/api/v1/removed-route', method: 'GET' }, MATRIX[0]];
    expect(compareWithTable(found, rows, TABLE_FILE)).toEqual([
      'GET /api/account has 2 main rows in tests/api/authorization-matrix.test.ts; keep one and give the others a variant.',
      'POST /api/v1/example-new-route (app/api/v1/example-new-route/route.ts) has no row in the authorization matrix: add one to tests/api/authorization-matrix.test.ts with the expected status for every caller.',
      'PUT /api/health (app/api/health/route.ts) has no row in the authorization matrix: add one to tests/api/authorization-matrix.test.ts with the expected status for every caller.',
      'GET /api/v1/removed-route has a row in tests/api/authorization-matrix.test.ts but no route file exports it: remove or correct the row.',
    ]);
    // A module exporting only config has no method, and an extra method is found.
    expect(exportedMethods({ dynamic: 'force-dynamic' })).toEqual([]);
    expect(exportedMethods({ GET: () => null, PUT: () => null, revalidate: 0 })).toEqual(['GET', 'PUT']);
  });
});

describe('authorization matrix: every route × every caller', () => {
  for (const row of MATRIX) {
    const name = `${row.method} ${row.route}${row.variant ? ` (${row.variant})` : ''}`;
    for (const who of everyone) {
      it(`${name} as ${who} → ${row.expect[who]}`, async () => {
        const prepared = (await row.prepare?.(who)) ?? {};
        const res = await callAs(who, row.route, row.method, prepared);
        const body = await readBody(res);
        expect(res.status, JSON.stringify(body)).toBe(row.expect[who]);
        if (res.status >= 400) {
          expect(body.error.code).toBeTypeOf('string');
          expect(body.error.message.length).toBeGreaterThan(10);
        }
        if (res.status === 401) expect(body.error.code).toBe('unauthenticated');
        if (res.status === 403) {
          // A 403 is the role refusal unless the row names another code.
          expect(body.error.code).toBe(row.refusalCode ?? 'forbidden');
          if (!row.refusalCode) expect(body.error.message).toMatch(new RegExp(`^Your role \\(${who}\\) cannot `));
        }
        if (res.status < 400) await row.check?.({ who, res, body, prepared });
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
    const headers = { authorization: `Bearer ${secret}` };
    expect((await callAs('viewer', '/api/team/members', 'GET', { headers })).status).toBe(200);
    const refused = await callAs('viewer', '/api/audit', 'GET', { headers });
    expect(refused.status).toBe(403);
    expect((await json(refused)).error.message).toBe('Your role (viewer) cannot read the audit log.');
  });
});

describe("another team's admin sees only their own team", () => {
  it('members, audit and outbox lists contain nothing of the demo team', async () => {
    const m = await json(await callAs('otherAdmin', '/api/team/members', 'GET'));
    expect(m.items.map((u: { email: string }) => u.email)).toEqual([emails.otherAdmin]);
    const a = await json(await callAs('otherAdmin', '/api/audit', 'GET'));
    expect(a.items.length).toBeGreaterThan(0);
    for (const e of a.items) expect(e.target ?? '').not.toMatch(/^(admin|engineer|reviewer|viewer)@steerwise\.test$/);
    const o = await json(await callAs('otherAdmin', '/api/outbox', 'GET'));
    expect(o.items.find((x: { id: number }) => x.id === ids.mail)).toBeUndefined();
    expect(ids.demoTeam).not.toBe((await userOf('otherAdmin')).teamId);
  });

  it("mail to a person who has since joined another team is hidden from the first team's admin (reset links included)", async () => {
    const drifter = 'drifter@steerwise.test';
    // The demo admin invites the address, then revokes the invitation.
    const invited = await callAs('admin', '/api/team/invitations', 'POST', {
      body: { email: drifter, role: 'viewer' },
    });
    expect(invited.status).toBe(201);
    const revoked = await callAs('admin', '/api/team/invitations/[id]', 'DELETE', {
      params: { id: String((await json(invited)).id) },
    });
    expect(revoked.status).toBe(200);
    // The other team invites the same address, and the person joins it with the mailed link.
    expect(
      (await callAs('otherAdmin', '/api/team/invitations', 'POST', { body: { email: drifter, role: 'engineer' } }))
        .status,
    ).toBe(201);
    const invitation = (await OutboxMessage.findAll({ order: [['id', 'DESC']] })).find((m) => m.to.includes(drifter));
    const token = /\/invite\?token=([A-Za-z0-9_-]+)/.exec(invitation!.text ?? '')![1];
    const joined = await callAs('anonymous', '/api/links/complete', 'POST', {
      body: { token, password: 'a long enough new password', name: 'Dara Fenwick' },
    });
    expect(joined.status).toBe(200);
    expect((await User.findOne({ where: { email: drifter } }))!.teamId).toBe((await userOf('otherAdmin')).teamId);
    // A password reset for the new member: its link must reach the member's team's admin only.
    expect((await callAs('anonymous', '/api/password-reset', 'POST', { body: { email: drifter } })).status).toBe(202);
    const reset = (await OutboxMessage.findAll({ order: [['id', 'DESC']] })).find(
      (m) => m.to.includes(drifter) && /reset/i.test(m.subject),
    )!;
    const demoList = await json(await callAs('admin', '/api/outbox', 'GET'));
    expect(demoList.items.filter((m: { to: string }) => m.to.includes(drifter))).toEqual([]);
    const demoOne = await callAs('admin', '/api/outbox/[id]', 'GET', { params: { id: String(reset.id) } });
    expect(demoOne.status).toBe(404);
    const otherOne = await callAs('otherAdmin', '/api/outbox/[id]', 'GET', { params: { id: String(reset.id) } });
    expect(otherOne.status).toBe(200);
  });

  it('the plain req() helper and the Next request scope give the same answer', async () => {
    // Consistency check of the two ways of calling a handler used across the api tests.
    const mod = discovered.modules.get('/api/team/members')!;
    const plain = await (mod.GET as RouteHandler)(
      req('GET', '/api/team/members', { headers: await browserHeaders('viewer') }),
      params({}),
    );
    const scoped = await callAs('viewer', '/api/team/members', 'GET');
    expect(plain.status).toBe(200);
    expect(await json(plain)).toEqual(await json(scoped));
  });
});
