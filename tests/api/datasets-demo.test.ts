/**
 * The seeded demo recordings: real files under the data folder whose SHA-256
 * matches the record, re-seeding adds nothing, and each scenario shows what it
 * is meant to show through the estimates API (true bearings are the simulation
 * inputs in lib/demo/recordings.ts).
 */
import fs from 'node:fs';
import { describe, expect, it } from 'vitest';
import { Dataset } from '@/models';
import { getDb } from '@/lib/db';
import { seedDemo } from '@/lib/demo/seed';
import { DEMO_RECORDINGS } from '@/lib/demo/recordings';
import { sha256File } from '@/lib/datasets';
import { resolveStoragePath } from '@/lib/storage/files';
import { estimate } from './datasets.helpers';

async function byName(name: string) {
  const d = await Dataset.findOne({ where: { name } });
  if (!d) throw new Error(`demo recording ${name} missing`);
  return d;
}

describe('demo recordings', () => {
  it('are stored as files with matching checksums, and a second seed adds nothing', async () => {
    for (const r of DEMO_RECORDINGS) {
      const d = await byName(r.name);
      const file = resolveStoragePath(d.storagePath);
      expect(fs.existsSync(file)).toBe(true);
      expect(await sha256File(file)).toBe(d.sha256);
      expect(d.elements).toBe(r.elements);
      expect(d.snapshots).toBe(r.snapshots);
    }
    const before = await Dataset.count();
    await seedDemo(await getDb());
    expect(await Dataset.count()).toBe(before);
  });

  it('Marsh Wren and Coldharbour: ESPRIT finds both within 1° of the simulated bearings', async () => {
    const r = DEMO_RECORDINGS[0];
    const res = await estimate('engineer', {
      datasetId: (await byName(r.name)).id,
      array: { elements: r.elements, spacingWavelengths: r.spacingWavelengths },
      method: 'esprit-tls',
      smoothingSubarray: 11,
    });
    expect(res.status).toBe(201);
    expect(res.body.sourceCount).toBe(2);
    r.bearingsDeg.forEach((b, i) => expect(Math.abs(res.body.bearingsDeg[i] - b)).toBeLessThan(1));
  });

  it('the passing pair is below the resolvable gap', async () => {
    const r = DEMO_RECORDINGS[1];
    const res = await estimate('engineer', {
      datasetId: (await byName(r.name)).id,
      array: { elements: r.elements, spacingWavelengths: r.spacingWavelengths },
      methods: ['esprit-ls'],
    });
    expect(res.status).toBe(201);
    const { getEstimateRun } = await import('@/lib/data/estimates');
    const { userOf } = await import('../helpers/api');
    const engineer = await userOf('engineer');
    const run = await getEstimateRun({
      caller: {
        id: engineer.id,
        email: engineer.email,
        name: engineer.name,
        role: engineer.role,
        teamId: engineer.teamId as number,
        via: 'session',
      },
      id: res.body.id,
    });
    expect(run.results[0].bearingsDeg).toHaveLength(2);
    expect(run.results[0].pairs[0].belowResolvableGap).toBe(true); // |sin 7° − sin 4°| = 0.052 < 1/(16·0.5) = 0.125
  });

  it('the quay-wall multipath warns about coherence without smoothing and resolves both arrivals with it', async () => {
    const r = DEMO_RECORDINGS[3];
    const id = (await byName(r.name)).id;
    const array = { elements: r.elements, spacingWavelengths: r.spacingWavelengths };
    const plain = await estimate('engineer', { datasetId: id, array, method: 'esprit-ls' });
    expect(plain.status).toBe(201);
    expect(plain.body.warnings.map((w: { code: string }) => w.code)).toContain('coherent-sources-suspected');
    const smoothed = await estimate('engineer', {
      datasetId: id,
      array,
      method: 'esprit-ls',
      smoothingSubarray: 8,
      forwardBackward: true,
    });
    expect(smoothed.body.sourceCount).toBe(2);
    r.bearingsDeg.forEach((b, i) => expect(Math.abs(smoothed.body.bearingsDeg[i] - b)).toBeLessThan(1));
  });
});
