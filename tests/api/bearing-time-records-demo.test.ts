/**
 * The demo bearing–time record (lib/demo/bearing-time.ts), seeded for this file
 * only (STEERWISE_SEED_BTR=1; the other API test files skip it): the two
 * invented contacts come back as two tracks over the whole recording, at the
 * simulated trajectories, and the record is served like any other.
 */
process.env.STEERWISE_SEED_BTR = '1';

import { describe, expect, it } from 'vitest';
import { BearingTimeRecord } from '@/models';
import * as byId from '@/app/api/v1/bearing-time-records/[id]/route';
import { DEMO_BTR_NAME, DEMO_BTR_SOURCES } from '@/lib/demo/bearing-time';
import { bearingAt } from '@/lib/doa/wideband';
import { browserHeaders, json, params, req } from '../helpers/api';

describe('the seeded demo record', () => {
  it('holds two tracks spanning the recording at the simulated bearings and rates', async () => {
    const row = await BearingTimeRecord.findOne({ where: { name: DEMO_BTR_NAME } });
    expect(row).not.toBeNull();
    const res = await byId.GET(
      req('GET', `/api/v1/bearing-time-records/${row!.id}`, { headers: await browserHeaders('viewer') }),
      params({ id: String(row!.id) }),
    );
    expect(res.status).toBe(200);
    const body = await json(res);
    expect(body.status).toBe('done');
    // 120 s in 1 s blocks at 50 % overlap: 239 blocks, centres 0.5 … 119.5 s.
    expect(body.blocks).toHaveLength(239);
    expect(body.tracks).toHaveLength(2);
    const [crossing, slow] = [...body.tracks].sort(
      (a: { meanRateDegPerS: number }, b: { meanRateDegPerS: number }) =>
        Math.abs(b.meanRateDegPerS) - Math.abs(a.meanRateDegPerS),
    );
    for (const [track, source] of [
      [crossing, DEMO_BTR_SOURCES[0]],
      [slow, DEMO_BTR_SOURCES[1]],
    ] as const) {
      // Start and end within one block step (0.5 s) of the recording's first and last block centres.
      expect(track.startS).toBeLessThanOrEqual(1);
      expect(track.endS).toBeGreaterThanOrEqual(119);
      const truthRate =
        (source.trajectory[1].bearingDeg - source.trajectory[0].bearingDeg) /
        (source.trajectory[1].tS - source.trajectory[0].tS);
      expect(Math.abs(track.meanRateDegPerS - truthRate)).toBeLessThan(0.01);
      for (const p of track.points) expect(Math.abs(p.bearingDeg - bearingAt(source.trajectory, p.tS))).toBeLessThan(1);
    }
    expect(body.image.levelsDb).toHaveLength(239);
  });
});
