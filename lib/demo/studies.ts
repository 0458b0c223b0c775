import type { Transaction } from 'sequelize';
import { Study } from '@/models';
import { SOFTWARE_VERSION } from '../version';
import { runStudy, type StudySpec } from '../studies/monte-carlo';

/**
 * One finished demo study, computed at seed time (a few seconds): the
 * invented Port Alder harbour line (16 hydrophones at half-wavelength
 * spacing) with two vessels 7° apart, root-MUSIC against TLS-ESPRIT as the
 * SNR rises. Idempotent: skipped when a study of that name exists.
 */
export const DEMO_STUDY_NAME = 'Port Alder line: root-MUSIC and ESPRIT vs SNR';

export const DEMO_STUDY_SPEC: StudySpec = {
  elements: 16,
  spacingWavelengths: 0.5,
  bearingsDeg: [-3, 4],
  powersDb: [0, -3],
  snapshots: 200,
  sweep: { variable: 'snr', values: [-15, -10, -5, 0, 5, 10, 20] },
  methods: ['root-music', 'esprit-tls'],
  trials: 80,
  seed: 1717,
};

export async function seedDemoStudy({
  teamId,
  createdById,
  transaction,
}: {
  teamId: number;
  createdById: number | null;
  transaction?: Transaction;
}): Promise<boolean> {
  const existing = await Study.findOne({ where: { teamId, name: DEMO_STUDY_NAME }, transaction });
  if (existing) return false;
  const result = await runStudy(DEMO_STUDY_SPEC);
  const request = {
    name: DEMO_STUDY_NAME,
    array: { elements: DEMO_STUDY_SPEC.elements, spacingWavelengths: DEMO_STUDY_SPEC.spacingWavelengths },
    sources: { bearingsDeg: DEMO_STUDY_SPEC.bearingsDeg, powersDb: DEMO_STUDY_SPEC.powersDb },
    snapshots: DEMO_STUDY_SPEC.snapshots,
    sweep: DEMO_STUDY_SPEC.sweep,
    methods: DEMO_STUDY_SPEC.methods,
    trials: DEMO_STUDY_SPEC.trials,
    seed: DEMO_STUDY_SPEC.seed,
  };
  await Study.create(
    {
      teamId,
      name: DEMO_STUDY_NAME,
      status: 'done',
      progress: 1,
      arrayRevisionId: null,
      inputs: {
        request,
        spec: DEMO_STUDY_SPEC,
        array: { elements: DEMO_STUDY_SPEC.elements, spacingWavelengths: DEMO_STUDY_SPEC.spacingWavelengths },
      } as unknown as Record<string, unknown>,
      result: result as unknown as Record<string, unknown>,
      error: null,
      softwareVersion: SOFTWARE_VERSION,
      createdById,
    },
    { transaction },
  );
  return true;
}
