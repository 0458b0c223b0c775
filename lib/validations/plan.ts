/**
 * POST /api/v1/plans body, shared by the route handler, the planner form and the OpenAPI
 * document. Quantities accept a plain number in the documented unit (Hz, m/s, m, s) or text with
 * units through `quantitySchema` (`3 kHz`, `25 mm`, `1500 m/s`). Messages name their field; the
 * route answers 422 with the dotted path of each issue (`targets.accuracyDeg`).
 *
 * `toPlanInput` resolves the medium, the band and the snapshot budget into the pure planner's
 * input (lib/planner).
 */
import { z } from 'zod';
import { quantitySchema } from '@/lib/units/quantity';
import { propagationSpeed } from '@/lib/doa/design/medium';
import { mediumSchema, toEngineMedium } from '@/lib/validations/array';
import { PLANNER_METHODS, type PlanInput } from '@/lib/planner';

/** Largest snapshot budget the planner searches (also the default when none is given). */
export const PLAN_MAX_SNAPSHOTS = 1_000_000;
export const PLAN_MAX_ELEMENTS = 512;

const num = (field: string) =>
  z
    .number({ error: (iss) => (iss.input === undefined ? `${field} is required` : `${field} must be a number`) })
    .refine(Number.isFinite, { error: `${field} must be a finite number` });

const int = (field: string, min: number, max: number) =>
  z
    .number({ error: (iss) => (iss.input === undefined ? `${field} is required` : `${field} must be a whole number`) })
    .int({ error: `${field} must be a whole number` })
    .min(min, { error: `${field} must be at least ${min}` })
    .max(max, { error: `${field} must be at most ${max}` });

const frequency = () => quantitySchema('frequency', { positive: true, max: 1e12 });
const length = () => quantitySchema('length', { positive: true, max: 1e5 });

export const planRequestSchema = z
  .object({
    frequencyHz: frequency().optional().meta({ description: 'Analysis frequency, Hz (or text such as "3 kHz")' }),
    band: z
      .object({ lowHz: frequency(), highHz: frequency() }, { error: 'band must be an object {lowHz, highHz}' })
      .optional()
      .meta({ description: 'A band instead of one frequency: grating lobes at highHz, accuracy at lowHz' }),
    medium: mediumSchema.optional(),
    propagationSpeedMps: quantitySchema('speed', { positive: true, max: 1e9 }).optional(),
    scanSectorDeg: num('scanSectorDeg')
      .refine((v) => v >= 0 && v < 90, {
        error: 'scanSectorDeg (half-width of the scan sector) must lie in 0 … 89.99°',
      })
      .meta({ description: 'Half-width of the scan sector: bearings −θs … +θs, degrees from broadside' }),
    targets: z.object(
      {
        accuracyDeg: num('targets.accuracyDeg').refine((v) => v > 0 && v <= 45, {
          error: 'targets.accuracyDeg must lie in (0, 45] degrees',
        }),
        atBearingDeg: num('targets.atBearingDeg')
          .refine((v) => v > -90 && v < 90, { error: 'targets.atBearingDeg must lie strictly inside −90 … 90°' })
          .default(0),
        resolveDeg: num('targets.resolveDeg')
          .refine((v) => v > 0 && v < 90, { error: 'targets.resolveDeg must lie in (0, 90) degrees' })
          .optional(),
        resolutionProbability: num('targets.resolutionProbability')
          .refine((v) => v > 0 && v < 1, { error: 'targets.resolutionProbability must lie in (0, 1)' })
          .optional()
          .meta({ description: 'Carried to the Monte Carlo verification; the planner itself uses Smith (2005)' }),
      },
      { error: 'targets must be an object {accuracyDeg, atBearingDeg, resolveDeg?, resolutionProbability?}' },
    ),
    snrDbPerElement: num('snrDbPerElement').refine((v) => v >= -40 && v <= 60, {
      error: 'snrDbPerElement must lie between −40 and 60 dB',
    }),
    snapshots: int('snapshots', 1, PLAN_MAX_SNAPSHOTS)
      .optional()
      .meta({ description: 'Snapshot budget (the most a candidate may use)' }),
    integrationSeconds: quantitySchema('time', { positive: true, max: 1e6 }).optional(),
    bandwidthHz: quantitySchema('frequency', { positive: true, max: 1e12 }).optional(),
    method: z
      .enum(PLANNER_METHODS, { error: `method must be one of ${PLANNER_METHODS.join(', ')}` })
      .default('esprit-tls'),
    smoothing: z
      .enum(['none', 'auto'], { error: "smoothing must be 'none' or 'auto' (⌈2M/3⌉)" })
      .optional()
      .meta({ description: "Spatial smoothing for ESPRIT methods: 'auto' (⌈2M/3⌉, default) or 'none'" }),
    forwardBackward: z.boolean({ error: 'forwardBackward must be true or false' }).default(false),
    constraints: z
      .object(
        {
          maxElements: int('constraints.maxElements', 2, PLAN_MAX_ELEMENTS).optional(),
          maxApertureM: length().optional(),
          spacingM: length().optional(),
          minSpacingM: length().optional(),
        },
        { error: 'constraints must be an object {maxElements?, maxApertureM?, spacingM?, minSpacingM?}' },
      )
      .default({}),
  })
  .superRefine((v, ctx) => {
    if ((v.frequencyHz === undefined) === (v.band === undefined))
      ctx.addIssue({ code: 'custom', path: ['frequencyHz'], message: 'give exactly one of frequencyHz and band' });
    if (v.band && v.band.lowHz > v.band.highHz)
      ctx.addIssue({ code: 'custom', path: ['band', 'lowHz'], message: 'band.lowHz must not exceed band.highHz' });
    if ((v.medium === undefined) === (v.propagationSpeedMps === undefined))
      ctx.addIssue({
        code: 'custom',
        path: ['propagationSpeedMps'],
        message: 'give exactly one of medium and propagationSpeedMps',
      });
    const timed = v.integrationSeconds !== undefined || v.bandwidthHz !== undefined;
    if (v.snapshots !== undefined && timed)
      ctx.addIssue({
        code: 'custom',
        path: ['snapshots'],
        message: 'give snapshots or integrationSeconds with bandwidthHz, not both',
      });
    if (timed && (v.integrationSeconds === undefined || v.bandwidthHz === undefined))
      ctx.addIssue({
        code: 'custom',
        path: [v.integrationSeconds === undefined ? 'integrationSeconds' : 'bandwidthHz'],
        message: 'integrationSeconds and bandwidthHz go together (N = floor(T·B))',
      });
    if (timed && v.integrationSeconds !== undefined && v.bandwidthHz !== undefined) {
      const n = Math.floor(v.integrationSeconds * v.bandwidthHz);
      if (n < 1)
        ctx.addIssue({
          code: 'custom',
          path: ['integrationSeconds'],
          message: `integrationSeconds × bandwidthHz = ${v.integrationSeconds * v.bandwidthHz} gives no whole snapshot`,
        });
      else if (n > PLAN_MAX_SNAPSHOTS)
        ctx.addIssue({
          code: 'custom',
          path: ['integrationSeconds'],
          message: `integrationSeconds × bandwidthHz gives ${n} snapshots; at most ${PLAN_MAX_SNAPSHOTS} are planned`,
        });
    }
    if (v.method === 'root-music' && v.smoothing === 'auto')
      ctx.addIssue({
        code: 'custom',
        path: ['smoothing'],
        message: 'root-MUSIC is planned on the full covariance only: use smoothing none',
      });
    if (v.method === 'root-music' && v.forwardBackward)
      ctx.addIssue({
        code: 'custom',
        path: ['forwardBackward'],
        message: 'root-MUSIC is planned without forward–backward averaging',
      });
  });

export type PlanRequest = z.infer<typeof planRequestSchema>;
export type PlanRequestInput = z.input<typeof planRequestSchema>;

/** The planner's input from a valid request: speed from the medium, band, snapshot budget. */
export function toPlanInput(v: PlanRequest): PlanInput & { speedFormula: string; speedWarnings: string[] } {
  const speed =
    v.propagationSpeedMps !== undefined
      ? { speedMps: v.propagationSpeedMps, formula: 'given', warnings: [] as { message: string }[] }
      : propagationSpeed(toEngineMedium(v.medium!));
  const band = v.band ?? { lowHz: v.frequencyHz!, highHz: v.frequencyHz! };
  const timed = v.integrationSeconds !== undefined && v.bandwidthHz !== undefined;
  return {
    band,
    propagationSpeedMps: speed.speedMps,
    speedFormula: speed.formula,
    speedWarnings: speed.warnings.map((w) => w.message),
    scanSectorDeg: v.scanSectorDeg,
    targets: v.targets,
    snrDbPerElement: v.snrDbPerElement,
    snapshotBudget: timed ? Math.floor(v.integrationSeconds! * v.bandwidthHz!) : (v.snapshots ?? PLAN_MAX_SNAPSHOTS),
    snapshotField: timed ? 'integrationSeconds' : 'snapshots',
    method: v.method,
    smoothing: v.method === 'root-music' ? 'none' : (v.smoothing ?? 'auto'),
    forwardBackward: v.forwardBackward,
    constraints: v.constraints,
  };
}

const candidateSchema = z.object({
  elements: z.int(),
  spacingWavelengths: z.number().meta({ description: 'd/λ at the highest frequency' }),
  spacingWavelengthsAtEvaluation: z.number().meta({ description: 'd/λ at the evaluation (lowest) frequency' }),
  spacingM: z.number(),
  snapshots: z.int(),
  snapshotsSetBy: z.enum(['accuracy', 'resolution', 'rank']),
  apertureM: z.number(),
  smoothingSubarray: z.int().nullable(),
  crbStdDeg: z.number(),
  efficiencyFactor: z.number().meta({ description: 'RMSE/√CRB of the method (first order)' }),
  predictedStdDeg: z.number(),
  statisticalResolutionDeg: z.number().nullable().meta({ description: 'Smith (2005) limit of the equal pair' }),
  rayleighGapDeg: z.number().nullable(),
  gratingLobeFreeScanDeg: z.number(),
  margins: z.object({ accuracyDeg: z.number(), resolutionDeg: z.number().nullable(), scanDeg: z.number() }),
});

/** The answer of POST /api/v1/plans (documentation; the route returns lib/data/plans.ts `PlanAnswer`). */
export const planAnswerSchema = z.object({
  candidates: z.array(candidateSchema),
  recommendedIndex: z.int(),
  evaluation: z.object({ frequencyHz: z.number(), wavelengthM: z.number(), spacingWavelengths: z.number() }),
  gratingLobeDesign: z.object({ frequencyHz: z.number(), wavelengthM: z.number(), maxSpacingWavelengths: z.number() }),
  snapshotBudget: z.int(),
  snapshotBudgetFrom: z.enum(['snapshots', 'integrationSeconds']),
  elementLimit: z.int(),
  plane: z.object({
    elements: z.array(z.int()),
    sigmaAtOneSnapshotDeg: z.array(z.number()),
    resolutionSnapshots: z.array(z.int()).nullable(),
  }),
  propagationSpeedMps: z.number(),
  scanSectorDeg: z.number(),
  speedFormula: z.string(),
  warnings: z.array(z.string()),
  assumptions: z.array(z.string()),
});
