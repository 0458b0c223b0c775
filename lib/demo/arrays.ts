import type { Transaction } from 'sequelize';
import { ArrayDesign, ArrayRevision, AuditEvent } from '@/models';
import type { ArrayInput } from '@/lib/validations/array';
import { revisionColumns, validateArrayInput } from '@/lib/validations/array-save';

/**
 * Demo arrays (invented). The Kestrel Sound Laboratory's hydrophone line
 * off the fictional Port Alder breakwater, with a second revision after a
 * hydrophone floods and a third after it is replaced; an X-band receive row
 * the lab is sizing for the fictional Gannet Point radar range; and the two
 * lines the demo recordings were taken on (12 and 10 elements). Saved through the same validation
 * the API uses, so their stored geometry is what the API would store.
 */
const day = 24 * 60 * 60 * 1000;

const portAlderR1: ArrayInput = {
  name: 'Port Alder hydrophone line',
  elements: 16,
  spacing: { value: 0.25, unit: 'm' },
  frequencyHz: 3000,
  medium: { kind: 'sea-water', temperatureC: 9, salinityPpt: 34, depthM: 40, equation: 'mackenzie-1981' },
  steerDeg: 0,
  scanSectorDeg: 60,
  taper: { kind: 'uniform' },
  plannedSources: [{ bearingDeg: -30 }, { bearingDeg: 10 }, { bearingDeg: 14 }],
  snapshots: 200,
  snrDb: 5,
};

/** Revision 2: hydrophone 7 flooded in the March storm and is switched off; a Hann taper for the quieter sidelobes. */
const portAlderR2: ArrayInput = {
  ...portAlderR1,
  taper: { kind: 'hann' },
  elementStates: Array.from({ length: 16 }, (_, m) => ({ enabled: m !== 6, gainDb: 0, phaseDeg: 0 })),
};

/** Revision 3: the flooded hydrophone is replaced; back to all 16 elements, keeping the Hann taper. */
const portAlderR3: ArrayInput = {
  ...portAlderR2,
  elementStates: Array.from({ length: 16 }, () => ({ enabled: true, gainDb: 0, phaseDeg: 0 })),
};

/** A short line along the fictional Port Alder quay wall, where the ferry's direct path and its reflection arrive together. */
const quayWallLine: ArrayInput = {
  name: 'Port Alder quay wall line',
  elements: 12,
  spacing: { value: 0.5, unit: 'wavelength' },
  frequencyHz: 1500,
  medium: { kind: 'sea-water', temperatureC: 9, salinityPpt: 34, depthM: 12, equation: 'mackenzie-1981' },
  steerDeg: 0,
  scanSectorDeg: 60,
  taper: { kind: 'uniform' },
  plannedSources: [{ bearingDeg: -12 }, { bearingDeg: 20 }],
  snapshots: 250,
  snrDb: 13,
};

/** The fictional Gannet Point range's ten-element trials row, half-wavelength spaced. */
const gannetTrialsRow: ArrayInput = {
  name: 'Gannet Point trials row',
  elements: 10,
  spacing: { value: 0.5, unit: 'wavelength' },
  frequencyHz: 9.4e9,
  medium: { kind: 'radio' },
  steerDeg: 0,
  scanSectorDeg: 60,
  taper: { kind: 'uniform' },
  plannedSources: [{ bearingDeg: 10 }, { bearingDeg: 15 }],
  snapshots: 200,
  snrDb: 13,
};

const gannetRow: ArrayInput = {
  name: 'Gannet Point X-band receive row',
  elements: 8,
  spacing: { value: 15, unit: 'mm' },
  frequencyHz: 10e9,
  medium: { kind: 'radio' },
  steerDeg: 0,
  scanSectorDeg: 45,
  taper: { kind: 'chebyshev', sidelobeDb: 30 },
  plannedSources: [{ bearingDeg: 5 }, { bearingDeg: 25 }],
  snapshots: 64,
  snrDb: 15,
};

type Plan = { config: ArrayInput; author: string; daysAgo: number }[];

export const demoArrayPlans: Plan[] = [
  [
    { config: portAlderR1, author: 'engineer@steerwise.test', daysAgo: 5 },
    { config: portAlderR2, author: 'engineer@steerwise.test', daysAgo: 2 },
    { config: portAlderR3, author: 'engineer@steerwise.test', daysAgo: 1 },
  ],
  [{ config: gannetRow, author: 'admin@steerwise.test', daysAgo: 3 }],
  [{ config: quayWallLine, author: 'engineer@steerwise.test', daysAgo: 4 }],
  [{ config: gannetTrialsRow, author: 'engineer@steerwise.test', daysAgo: 4 }],
];

/** Adds the demo arrays to the team unless an array of that name is already there (idempotent). */
export async function seedDemoArrays({
  teamId,
  users,
  transaction,
  now = Date.now(),
}: {
  teamId: number;
  users: Record<string, number>;
  transaction?: Transaction;
  now?: number;
}): Promise<number> {
  let added = 0;
  for (const plan of demoArrayPlans) {
    const name = plan[0].config.name;
    if (await ArrayDesign.findOne({ where: { teamId, name }, transaction })) continue;
    const first = plan[0];
    const array = await ArrayDesign.create(
      {
        teamId,
        name,
        latestRevision: plan.length,
        createdById: users[first.author] ?? null,
        createdAt: new Date(now - first.daysAgo * day),
      },
      { transaction },
    );
    for (const [i, step] of plan.entries()) {
      const { input, geometry } = validateArrayInput(step.config);
      const at = new Date(now - step.daysAgo * day);
      const authorId = users[step.author] ?? null;
      await ArrayRevision.create(
        { arrayId: array.id, revision: i + 1, authorId, createdAt: at, ...revisionColumns(input, geometry) },
        { transaction },
      );
      await AuditEvent.create(
        {
          teamId,
          userId: authorId,
          action: i === 0 ? 'array.created' : 'array.revised',
          target: name,
          detail: {
            arrayId: array.id,
            revision: i + 1,
            ...(i === 0
              ? { elements: input.elements, spacingWavelengths: geometry.spacingWavelengths }
              : i === 1
                ? { changed: ['taper', 'elementStates'], note: 'hydrophone 7 flooded' }
                : { changed: ['elementStates'], note: 'hydrophone 7 replaced' }),
          },
          createdAt: at,
        },
        { transaction },
      );
    }
    added++;
  }
  return added;
}
