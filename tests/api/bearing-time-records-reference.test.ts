/**
 * The bearing–time record served by the API equals its references:
 *  - the wideband spectrum of every block of the committed fixture recording equals the numpy/scipy
 *    reference of fixtures/wideband/generate.py (scipy.signal.stft with the same window and hop) for
 *    MUSIC, MVDR and Bartlett, after the job, the float32 result file and the block route
 *    (within 1e-3 dB: the route rounds to 0.001 dB);
 *  - a record split across the pool's threads (blockRange shares) equals the same record computed
 *    in one pass in-process (consistency check), blocks, image rows and tracks.
 */
import fs from 'node:fs';
import path from 'node:path';
import { beforeAll, describe, expect, it } from 'vitest';
import * as collection from '@/app/api/v1/bearing-time-records/route';
import * as byId from '@/app/api/v1/bearing-time-records/[id]/route';
import * as blockRoute from '@/app/api/v1/bearing-time-records/[id]/blocks/[index]/route';
import { splitBlocks } from '@/lib/data/bearing-time-records';
import { openTimeSeries } from '@/lib/datasets/time-series';
import { bearingTimeRecord } from '@/lib/doa/wideband';
import { dataDir } from '@/lib/env';
import { Dataset } from '@/models';
import { browserHeaders, json, params, req, userOf } from '../helpers/api';
import { storeRawDataset, storeSimulatedWav, tinyBtrBody, TINY, waitForRecord } from './btr.helpers';

const FIXTURES = path.join(__dirname, '../../fixtures/wideband');
const BASE = '/api/v1/bearing-time-records';
const reference = JSON.parse(fs.readFileSync(path.join(FIXTURES, 'reference.json'), 'utf8')) as {
  elements: number;
  spacingM: number;
  propagationSpeedMps: number;
  settings: {
    blockSeconds: number;
    blockOverlap: number;
    fftLength: number;
    hop: number;
    band: { lowHz: number; highHz: number };
    sourceCount: number;
  };
  blocks: { startS: number; endS: number }[];
  levelsDb: Record<'music' | 'mvdr' | 'bartlett', number[][]>;
};

async function record(body: unknown) {
  const res = await collection.POST(req('POST', BASE, { body, headers: await browserHeaders('engineer') }), params({}));
  expect(res.status).toBe(202);
  const id = (await json(res)).id as number;
  expect(await waitForRecord(id)).toBe('done');
  const got = await byId.GET(
    req('GET', `${BASE}/${id}`, { headers: await browserHeaders('engineer') }),
    params({ id: String(id) }),
  );
  return { id, body: await json(got) };
}
async function blockLevels(id: number, index: number): Promise<number[]> {
  const res = await blockRoute.GET(
    req('GET', `${BASE}/${id}/blocks/${index}`, { headers: await browserHeaders('engineer') }),
    params({ id: String(id), index: String(index) }),
  );
  expect(res.status).toBe(200);
  return (await json(res)).spectrum.levelsDb;
}

let fixtureId = 0;
beforeAll(async () => {
  const engineer = await userOf('engineer');
  fixtureId = (
    await storeRawDataset({
      user: engineer,
      bytes: fs.readFileSync(path.join(FIXTURES, 'two-sources-m6.wav')),
      ext: '.wav',
      format: 'wav',
      elements: reference.elements,
    })
  ).id;
});

describe('the served spectrum equals scipy.signal.stft + numpy (fixtures/wideband/generate.py)', () => {
  for (const method of ['music', 'mvdr', 'bartlett'] as const) {
    it(`${method}: every block within 1e-3 dB`, async () => {
      const s = reference.settings;
      const { id, body } = await record({
        datasetId: fixtureId,
        array: { elements: reference.elements, spacingM: reference.spacingM },
        propagationSpeedMps: reference.propagationSpeedMps,
        band: s.band,
        blockSeconds: s.blockSeconds,
        blockOverlap: s.blockOverlap,
        fftLength: s.fftLength,
        hop: s.hop,
        window: 'hann',
        method,
        sourceCount: s.sourceCount,
      });
      expect(body.blocks.map((b: { startS: number; endS: number }) => [b.startS, b.endS])).toEqual(
        reference.blocks.map((b) => [b.startS, b.endS]),
      );
      for (let j = 0; j < reference.blocks.length; j++) {
        const got = await blockLevels(id, j);
        const want = reference.levelsDb[method][j];
        let worst = 0;
        for (let i = 0; i < want.length; i++) worst = Math.max(worst, Math.abs(got[i] - want[i]));
        expect(worst).toBeLessThan(1e-3);
      }
    });
  }
});

describe('a record split across the pool equals one pass (consistency check)', () => {
  it('splits 39 blocks into consecutive shares that cover them once', () => {
    expect(splitBlocks(39, 2)).toEqual([
      { first: 0, count: 20 },
      { first: 20, count: 19 },
    ]);
    expect(splitBlocks(10, 4)).toEqual([{ first: 0, count: 10 }]);
    const shares = splitBlocks(1000, 3);
    expect(shares.reduce((n, s) => n + s.count, 0)).toBe(1000);
    shares.forEach((s, i) => i > 0 && expect(s.first).toBe(shares[i - 1].first + shares[i - 1].count));
  });

  it('blocks, bearings, image rows and tracks of a 10 s recording (two shares on two threads)', async () => {
    const engineer = await userOf('engineer');
    const d = await storeSimulatedWav({
      user: engineer,
      durationS: 10,
      seed: 21,
      sources: [
        {
          trajectory: [
            { tS: 0, bearingDeg: -30 },
            { tS: 10, bearingDeg: -20 },
          ],
          rms: 0.05,
          bandHz: [400, 1600],
        },
        { trajectory: [{ tS: 0, bearingDeg: 35 }], rms: 0.04, bandHz: [400, 1600] },
      ],
    });
    const body = tinyBtrBody(d.id, { sourceCount: 2 });
    const { id, body: served } = await record(body);
    expect(served.blocks).toHaveLength(39);
    const stored = await Dataset.findByPk(d.id);
    const source = await openTimeSeries({ path: path.join(dataDir(), stored!.storagePath), format: 'wav' });
    const whole = await bearingTimeRecord(source, {
      elements: TINY.elements,
      spacingM: TINY.spacingM,
      propagationSpeedMps: TINY.propagationSpeedMps,
      band: body.band,
      blockSeconds: body.blockSeconds,
      blockOverlap: body.blockOverlap,
      fftLength: body.fftLength,
      window: 'hann',
      method: 'music',
      sourceCount: 2,
      gratingLobes: 'exclude',
    });
    whole.blocks.forEach((b, j) => {
      const s = served.blocks[j];
      expect(s.startS).toBe(b.startS);
      b.bearingsDeg.forEach((deg, k) => expect(s.bearingsDeg[k]).toBeCloseTo(deg, 4));
    });
    for (const j of [0, 19, 20, 38]) {
      const got = await blockLevels(id, j);
      const want = Array.from(whole.image.levelsDb.subarray(j * 361, (j + 1) * 361));
      got.forEach((v, i) => expect(Math.abs(v - want[i])).toBeLessThan(1e-3));
    }
    expect(served.tracks.map((t: { points: unknown[] }) => t.points.length)).toEqual(
      whole.tracks.map((t) => t.points.length),
    );
    expect(served.tracks).toHaveLength(2);
  });
});
