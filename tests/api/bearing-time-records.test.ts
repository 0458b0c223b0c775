/**
 * Bearing–time records through the v1 API against the real temporary SQLite
 * (seeded): create (202), the job on the worker pool, the answer's shape, one
 * block's spectrum, the CSV/JSON/PNG exports, Stop, DELETE (files removed), the
 * roles (as for estimates), and hostile or odd recordings (a clear 4xx naming
 * the field, nothing stored).
 */
import fs from 'node:fs';
import path from 'node:path';
import { PNG } from 'pngjs';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { BearingTimeRecord, Job } from '@/models';
import { dataDir } from '@/lib/env';
import * as collection from '@/app/api/v1/bearing-time-records/route';
import * as byId from '@/app/api/v1/bearing-time-records/[id]/route';
import * as cancelRoute from '@/app/api/v1/bearing-time-records/[id]/cancel/route';
import * as blockRoute from '@/app/api/v1/bearing-time-records/[id]/blocks/[index]/route';
import * as exportRoute from '@/app/api/v1/bearing-time-records/[id]/export/route';
import { openApiDocument } from '@/lib/http/openapi';
import { bearingTimeBlockDetailSchema, bearingTimeRecordSchema } from '@/lib/validations/bearing-time-record';
import { browserHeaders, json, params, req, userOf, type Who } from '../helpers/api';
import { storeRawDataset, storeSimulatedWav, tinyBtrBody, waitForRecord } from './btr.helpers';

const FIXTURES = path.join(__dirname, '../../fixtures');
const BASE = '/api/v1/bearing-time-records';

async function post(who: Who, body: unknown) {
  const res = await collection.POST(req('POST', BASE, { body, headers: await browserHeaders(who) }), params({}));
  return { status: res.status, body: await json(res) };
}
async function get(who: Who, id: number) {
  const res = await byId.GET(
    req('GET', `${BASE}/${id}`, { headers: await browserHeaders(who) }),
    params({ id: String(id) }),
  );
  return { status: res.status, body: await json(res) };
}
async function exportAs(who: Who, id: number, format: string) {
  return exportRoute.GET(
    req('GET', `${BASE}/${id}/export?format=${format}`, { headers: await browserHeaders(who) }),
    params({ id: String(id) }),
  );
}
const folderOf = (teamId: number, id: number) =>
  path.join(dataDir(), 'bearing-time-records', String(teamId), String(id));

let datasetId = 0;
let teamId = 0;
let doneId = 0;

beforeAll(async () => {
  const engineer = await userOf('engineer');
  teamId = engineer.teamId as number;
  // One contact at 20° for 3 s, on the tiny line (4 elements, 0.25 m, 4 kHz).
  datasetId = (await storeSimulatedWav({ user: engineer })).id;
  const created = await post('engineer', tinyBtrBody(datasetId, { name: 'API check: one contact at 20°' }));
  expect(created.status).toBe(202);
  doneId = created.body.id;
  expect(await waitForRecord(doneId)).toBe('done');
}, 60_000);

describe('a finished record', () => {
  it('answers {status, progress, blocks, tracks, image} with the contact at 20°', async () => {
    const { status, body } = await get('viewer', doneId);
    expect(status).toBe(200);
    expect(body).toMatchObject({ status: 'done', progress: 1, datasetId });
    // 3 s, 0.5 s blocks at 50 % overlap: floor((3 − 0.5)/0.25) + 1 = 11 blocks (docs/conventions.md §9).
    expect(body.blocks).toHaveLength(11);
    expect(body.blocks[0]).toMatchObject({ index: 0, startS: 0, endS: 0.5 });
    expect(body.blocks[10]).toMatchObject({ index: 10, startS: 2.5, endS: 3 });
    for (const b of body.blocks) {
      expect(b.bearingsDeg).toHaveLength(1);
      expect(Math.abs(b.bearingsDeg[0] - 20)).toBeLessThan(1);
      expect(b.stdDeg[0]).toBeGreaterThan(0);
    }
    expect(body.tracks).toHaveLength(1);
    const track = body.tracks[0];
    expect(track).toMatchObject({ id: 1, startS: 0.25, endS: 2.75 });
    expect(track.start).toMatchObject({ tS: 0.25 });
    expect(track.end).toMatchObject({ tS: 2.75 });
    expect(Math.abs(track.meanRateDegPerS)).toBeLessThan(0.5);
    expect(track.points[0]).toHaveProperty('tS');
    expect(track.points[0]).toHaveProperty('bearingDeg');
    const { image } = body;
    expect(image.timesS).toHaveLength(11);
    expect(image.levelsDb).toHaveLength(11);
    expect(image.bearingsDeg).toHaveLength(361);
    expect(image.levelsDb[0]).toHaveLength(361);
    const row = image.levelsDb[5] as number[];
    const peak = image.bearingsDeg[row.indexOf(Math.max(...row))];
    expect(Math.abs(peak - 20)).toBeLessThanOrEqual(1);
    expect(body.summary).toMatchObject({ blockCount: 11, grid: { startDeg: -90, stepDeg: 0.5, count: 361 } });
    // The answer is the one the OpenAPI document describes.
    expect(() => bearingTimeRecordSchema.parse(body)).not.toThrow();
  });

  it('is in the OpenAPI document with the request schema the route parses', () => {
    const doc = openApiDocument() as unknown as {
      paths: Record<string, Record<string, unknown>>;
      components: { schemas: Record<string, { properties?: Record<string, unknown> }> };
    };
    for (const p of ['', '/{id}', '/{id}/cancel', '/{id}/blocks/{index}', '/{id}/export'])
      expect(Object.keys(doc.paths)).toContain(`${BASE}${p}`);
    expect(Object.keys(doc.paths[BASE]).sort()).toEqual(['get', 'post']);
    const request = doc.components.schemas.BearingTimeRecordRequest.properties!;
    for (const field of [
      'datasetId',
      'arrayId',
      'array',
      'propagationSpeedMps',
      'band',
      'blockSeconds',
      'blockOverlap',
      'fftLength',
      'hop',
      'window',
      'method',
      'sourceCount',
      'sourceCountRule',
      'gratingLobes',
    ])
      expect(Object.keys(request)).toContain(field);
  });

  it('is listed for every member of the team, not for another team', async () => {
    const res = await collection.GET(req('GET', BASE, { headers: await browserHeaders('reviewer') }), params({}));
    const items = (await json(res)).items as { id: number; trackCount: number }[];
    expect(items.find((i) => i.id === doneId)).toMatchObject({ trackCount: 1, blockCount: 11, method: 'music' });
    const other = await collection.GET(req('GET', BASE, { headers: await browserHeaders('otherAdmin') }), params({}));
    expect(((await json(other)).items as { id: number }[]).some((i) => i.id === doneId)).toBe(false);
    expect((await get('otherAdmin', doneId)).status).toBe(404);
  });

  it('gives one block’s spectrum (dB on the grid) and bearings; an index past the end is 404', async () => {
    const res = await blockRoute.GET(
      req('GET', `${BASE}/${doneId}/blocks/4`, { headers: await browserHeaders('viewer') }),
      params({ id: String(doneId), index: '4' }),
    );
    expect(res.status).toBe(200);
    const block = await json(res);
    expect(block).toMatchObject({ index: 4, startS: 1, endS: 1.5 });
    expect(() => bearingTimeBlockDetailSchema.parse(block)).not.toThrow();
    expect(block.spectrum.bearingsDeg).toHaveLength(361);
    const levels = block.spectrum.levelsDb as number[];
    // The average of peak-normalised narrowband spectra (lib/doa/wideband/analyze.ts): its peak is at most 0 dB.
    expect(Math.max(...levels)).toBeLessThanOrEqual(0);
    expect(Math.max(...levels)).toBeGreaterThan(-3);
    expect(Math.abs(block.spectrum.bearingsDeg[levels.indexOf(Math.max(...levels))] - 20)).toBeLessThanOrEqual(1);
    const past = await blockRoute.GET(
      req('GET', `${BASE}/${doneId}/blocks/11`, { headers: await browserHeaders('viewer') }),
      params({ id: String(doneId), index: '11' }),
    );
    expect(past.status).toBe(404);
    expect((await json(past)).error.message).toMatch(/has 11 blocks/);
  });

  it('exports CSV (a row per block bearing with its track), JSON (the GET answer) and PNG (image with colour bar)', async () => {
    const csv = await exportAs('viewer', doneId, 'csv');
    expect(csv.status).toBe(200);
    expect(csv.headers.get('content-type')).toMatch(/text\/csv/);
    const lines = (await csv.text()).trim().split('\n');
    expect(lines[0]).toBe('block,startS,endS,sourceCount,bearingDeg,stdDeg,trackId');
    expect(lines).toHaveLength(12);
    expect(lines[1].split(',')[6]).toBe('1');

    const asJson = await exportAs('viewer', doneId, 'json');
    expect(asJson.headers.get('content-disposition')).toMatch(/bearing-time-record-\d+\.json/);
    expect(await json(asJson)).toEqual((await get('viewer', doneId)).body);

    const png = await exportAs('viewer', doneId, 'png');
    expect(png.headers.get('content-type')).toBe('image/png');
    const decoded = PNG.sync.read(Buffer.from(await png.arrayBuffer()));
    expect(decoded.width).toBe(64 + 720 + 84);
    expect(decoded.height).toBeGreaterThan(40);

    const bad = await exportAs('viewer', doneId, 'tiff');
    expect(bad.status).toBe(422);
    expect(JSON.stringify(await json(bad))).toMatch(/format/);
  });
});

describe('roles are those of estimates', () => {
  it('viewers and reviewers may read but not create, stop or delete', async () => {
    for (const who of ['viewer', 'reviewer'] as const) {
      expect((await post(who, tinyBtrBody(datasetId))).status).toBe(403);
      const del = await byId.DELETE(
        req('DELETE', `${BASE}/${doneId}`, { headers: await browserHeaders(who) }),
        params({ id: String(doneId) }),
      );
      expect(del.status).toBe(403);
    }
    expect((await post('anonymous', tinyBtrBody(datasetId))).status).toBe(401);
    // Another team's admin cannot see the demo team's recording.
    expect((await post('otherAdmin', tinyBtrBody(datasetId))).status).toBe(404);
  });
});

describe('Stop and DELETE', () => {
  it('Stop ends a running record (cancelled, no files); a second Stop is 409', async () => {
    const engineer = await userOf('engineer');
    const long = await storeSimulatedWav({ user: engineer, durationS: 40, seed: 9 });
    const created = await post('engineer', tinyBtrBody(long.id, { blockOverlap: 0.9, fftLength: 64 }));
    expect(created.status).toBe(202);
    const id = created.body.id as number;
    const res = await cancelRoute.POST(
      req('POST', `${BASE}/${id}/cancel`, { body: {}, headers: await browserHeaders('engineer') }),
      params({ id: String(id) }),
    );
    expect(res.status).toBe(200);
    expect((await json(res)).status).toBe('cancelled');
    expect(await waitForRecord(id)).toBe('cancelled');
    const again = await cancelRoute.POST(
      req('POST', `${BASE}/${id}/cancel`, { body: {}, headers: await browserHeaders('engineer') }),
      params({ id: String(id) }),
    );
    expect(again.status).toBe(409);
    await new Promise((r) => setTimeout(r, 300));
    expect(fs.existsSync(folderOf(teamId, id))).toBe(false);
  }, 60_000);

  it('DELETE removes the row and its result files', async () => {
    const created = await post('engineer', tinyBtrBody(datasetId));
    const id = created.body.id as number;
    expect(await waitForRecord(id)).toBe('done');
    const folder = folderOf(teamId, id);
    expect(fs.readdirSync(folder).sort()).toEqual(['blocks.json', 'image.json', 'levels.f32']);
    const res = await byId.DELETE(
      req('DELETE', `${BASE}/${id}`, { headers: await browserHeaders('engineer') }),
      params({ id: String(id) }),
    );
    expect(res.status).toBe(204);
    expect(fs.existsSync(folder)).toBe(false);
    expect((await get('engineer', id)).status).toBe(404);
  }, 60_000);

  it('DELETE at any moment of a run, four at once (queued, mid-blocks, while files are written): 204 each, nothing left', async () => {
    // Four records deleted together while their jobs claim, report and finish: every delete's
    // transaction meets other writers (on SQLite a deferred transaction failed here with SQLITE_BUSY).
    const ids: number[] = [];
    const failures: string[] = [];
    for (let round = 0; round < 10; round++) {
      const batch: number[] = [];
      for (let k = 0; k < 4; k++) {
        const created = await post('engineer', tinyBtrBody(datasetId));
        expect(created.status).toBe(202);
        batch.push(created.body.id as number);
      }
      ids.push(...batch);
      await new Promise((r) => setTimeout(r, round * 10)); // 0 … 90 ms after the creates
      const statuses = await Promise.all(
        batch.map(async (id) => {
          const res = await byId.DELETE(
            req('DELETE', `${BASE}/${id}`, { headers: await browserHeaders('engineer') }),
            params({ id: String(id) }),
          );
          return res.status === 204
            ? null
            : `record ${id}, ${round * 10} ms: ${res.status} ${JSON.stringify(await json(res))}`;
        }),
      );
      failures.push(...statuses.filter((s): s is string => s !== null));
    }
    expect(failures).toEqual([]);
    // A job may still be finishing a share; once each has ended nothing of any record is left.
    for (const id of ids) await waitForJobEnd(id);
    for (const id of ids) {
      // A job that wrote its files after the delete removes them just after it ends (its `discard`).
      for (let t = 0; t < 50 && fs.existsSync(folderOf(teamId, id)); t++) await new Promise((r) => setTimeout(r, 100));
      expect(fs.existsSync(folderOf(teamId, id)), `folder of record ${id}`).toBe(false);
      expect(await BearingTimeRecord.count({ where: { id } })).toBe(0);
    }
  }, 120_000);
});

async function waitForJobEnd(recordId: number): Promise<void> {
  for (let t = 0; t < 200; t++) {
    const open = await Job.count({
      where: { kind: 'bearing-time-record', inputRef: String(recordId), status: ['queued', 'running'] },
    });
    if (open === 0) return;
    await new Promise((r) => setTimeout(r, 100));
  }
  throw new Error(`the job of record ${recordId} did not end`);
}

describe('hostile and odd recordings: a clear 4xx naming the field, nothing stored', () => {
  let before: { rows: number; jobs: number; files: string[] };
  const files = () => {
    const root = path.join(dataDir(), 'bearing-time-records');
    return fs.existsSync(root) ? (fs.readdirSync(root, { recursive: true }) as string[]).sort() : [];
  };
  beforeAll(async () => {
    before = { rows: await BearingTimeRecord.count(), jobs: await Job.count(), files: files() };
  });
  afterAll(async () => {
    expect(await BearingTimeRecord.count()).toBe(before.rows);
    expect(await Job.count()).toBe(before.jobs);
    expect(files()).toEqual(before.files);
  });

  async function refused(body: unknown, status: number, field: string, message: RegExp) {
    const rowsBefore = await BearingTimeRecord.count();
    const r = await post('engineer', body);
    expect(r.status, JSON.stringify(r.body)).toBe(status);
    expect(Object.keys(r.body.error.fields ?? {})).toContain(field);
    expect(r.body.error.message).toMatch(message);
    expect(await BearingTimeRecord.count()).toBe(rowsBefore);
  }

  it('a mono WAV', async () => {
    const engineer = await userOf('engineer');
    const d = await storeRawDataset({
      user: engineer,
      bytes: fs.readFileSync(path.join(FIXTURES, 'datasets/hostile/one-channel.wav')),
      ext: '.wav',
      format: 'wav',
      elements: 1,
    });
    await refused(tinyBtrBody(d.id), 422, 'datasetId', /1 channel/);
  });

  it('a channel count that is not the array’s element count', async () => {
    await refused(
      tinyBtrBody(datasetId, { array: { elements: 6, spacingM: 0.25 } }),
      422,
      'array.elements',
      /6 elements but the recording has 4 channels/,
    );
  });

  it('a band above the Nyquist frequency', async () => {
    await refused(
      tinyBtrBody(datasetId, { band: { lowHz: 1000, highHz: 2500 } }),
      422,
      'band.highHz',
      /above the Nyquist frequency 2000 Hz/,
    );
  });

  it('a zero-length block, and a block shorter than one FFT frame', async () => {
    await refused(tinyBtrBody(datasetId, { blockSeconds: 0 }), 422, 'blockSeconds', /greater than 0/);
    await refused(tinyBtrBody(datasetId, { blockSeconds: 0.01 }), 422, 'blockSeconds', /shorter than one FFT frame/);
    await refused(tinyBtrBody(datasetId, { blockSeconds: 5 }), 422, 'blockSeconds', /shorter than one block/);
  });

  it('a truncated WAV', async () => {
    const engineer = await userOf('engineer');
    const good = fs.readFileSync(path.join(FIXTURES, 'wideband/two-sources-m6.wav'));
    const d = await storeRawDataset({
      user: engineer,
      bytes: good.subarray(0, good.length - 1000),
      ext: '.wav',
      format: 'wav',
      elements: 6,
    });
    await refused(tinyBtrBody(d.id, { array: { elements: 6, spacingM: 0.25 } }), 422, 'datasetId', /cut short/);
  });

  it('a snapshot CSV, an NPY without a sample rate, and a missing dataset', async () => {
    const engineer = await userOf('engineer');
    const csv = await storeRawDataset({ user: engineer, bytes: Buffer.from('1,2\n3,4\n'), ext: '.csv', format: 'csv' });
    await refused(tinyBtrBody(csv.id), 422, 'datasetId', /time series/);
    const npy = await storeRawDataset({ user: engineer, bytes: Buffer.from('x'), ext: '.npy', format: 'npy' });
    await refused(tinyBtrBody(npy.id), 422, 'sampleRate', /sample rate/);
    const missing = await post('engineer', tinyBtrBody(999999));
    expect(missing.status).toBe(404);
  });

  it('bad request fields', async () => {
    await refused({ ...tinyBtrBody(datasetId), fftLength: 100 }, 422, 'fftLength', /power of two/);
    await refused({ ...tinyBtrBody(datasetId), blockOverlap: 1 }, 422, 'blockOverlap', /below 1/);
    await refused({ ...tinyBtrBody(datasetId), method: 'capon' }, 422, 'method', /music, mvdr, bartlett/);
    const { array: _a, ...noArray } = tinyBtrBody(datasetId);
    void _a;
    await refused(noArray, 422, 'array', /exactly one of arrayId and array/);
    await refused(
      { ...tinyBtrBody(datasetId), array: { elements: 4, spacingM: 0.25 }, propagationSpeedMps: undefined },
      422,
      'propagationSpeedMps',
      /needed with array.spacingM/,
    );
  });
});
