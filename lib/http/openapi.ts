/**
 * The OpenAPI 3.1 document of the v1 API (docs/conventions.md §7), generated from the
 * same zod schemas the route handlers parse with (zod 4 `z.toJSONSchema`,
 * JSON Schema 2020-12, which OpenAPI 3.1 uses as its schema dialect).
 */
import { z } from 'zod';
import packageJson from '@/package.json';
import { arrayInputSchema } from '../validations/array';
import { datasetCreatedSchema, datasetSchema, datasetUploadFormSchema } from '../validations/dataset';
import { studyRequestSchema } from '../validations/study';
import {
  bearingTimeBlockDetailSchema,
  bearingTimeRecordRequestSchema,
  bearingTimeRecordSchema,
} from '../validations/bearing-time-record';
import { calibrationRequestSchema } from '../validations/calibration';
import { planAnswerSchema, planRequestSchema } from '../validations/plan';
import { bundleQuerySchema, handoffSendSchema } from '../validations/handoff';
import { reviewCreateSchema, reviewQuerySchema } from '../validations/review';
import {
  boundsAnswerSchema,
  boundsRequestSchema,
  estimateAnswerSchema,
  estimateRequestSchema,
  estimateRunSchema,
} from '../validations/estimate';

const errorSchema = z.object({
  error: z.object({
    code: z.string(),
    message: z.string(),
    fields: z.record(z.string(), z.array(z.string())).optional(),
  }),
});

const arraySchema = z.object({
  id: z.int(),
  name: z.string(),
  revision: z.int(),
  elements: z.int(),
  spacingWavelengths: z.number(),
  frequencyHz: z.number().optional(),
  propagationSpeedMps: z.number().optional(),
  metrics: z.object({
    apertureWavelengths: z.number(),
    halfPowerBeamwidthDeg: z.number(),
    rayleighGapDeg: z.number(),
    peakSidelobeDb: z.number().nullable(),
    gratingLobeFreeScanDeg: z.number(),
  }),
});

const healthSchema = z.object({ status: z.literal('ok'), db: z.literal('ok') });

function schema(s: z.ZodType, io: 'input' | 'output' = 'output'): Record<string, unknown> {
  const out = z.toJSONSchema(s, { target: 'draft-2020-12', io, unrepresentable: 'any' }) as Record<string, unknown>;
  delete out.$schema;
  return out;
}

const ref = (name: string) => ({ $ref: `#/components/schemas/${name}` });
const json = (name: string) => ({ 'application/json': { schema: ref(name) } });
const errors = (...codes: number[]) =>
  Object.fromEntries(codes.map((c) => [String(c), { description: ERROR_TEXT[c], content: json('Error') }]));
const ERROR_TEXT: Record<number, string> = {
  400: 'Malformed JSON',
  401: 'No or bad credentials',
  403: 'The role may not do this',
  404: 'Not found, or not in your team',
  409: 'Conflict',
  413: 'Too large',
  415: 'Unsupported format',
  422: 'Validation failed; the message names the field, row or column',
  429: 'Rate limited',
};
const idParam = { name: 'id', in: 'path', required: true, schema: { type: 'integer', minimum: 1 } };
const calibrationIdParam = {
  name: 'calibrationId',
  in: 'path',
  required: true,
  schema: { type: 'integer', minimum: 1 },
};
const zip = { 'application/zip': { schema: { type: 'string', format: 'binary' } } };

/** Query parameters from the zod object schema a route parses its query with (all optional). */
function queryParams(s: z.ZodType) {
  const props = (schema(s, 'input').properties ?? {}) as Record<string, Record<string, unknown>>;
  return Object.entries(props).map(([name, p]) => ({ name, in: 'query', required: false, schema: p }));
}

const calibrationAnswer = {
  type: 'object',
  description:
    'A calibration: revision (the array at the new revision, or null until accepted), report {method, methodLabel, assumptions, elements:[{element, gainDb, gainStdDb, phaseDeg, phaseStdDeg}], residual, residualUncalibrated, references:[{index, bearingsDeg, snapshots, residual, residualUncalibrated, consistency?, closestAgreement?}], jackknifeBlocks, verdict:{status, supported, disagreeing, flaggedReference, messages}}, elementStates [{gainDb, phaseDeg}] relative to element 1, status, progress, error, inputs.',
  properties: {
    id: { type: 'integer' },
    revision: { type: ['object', 'null'] },
    status: { type: 'string', enum: ['queued', 'running', 'done', 'failed', 'cancelled'] },
    progress: { type: 'number' },
    error: { type: ['string', 'null'] },
    method: { type: 'string', enum: ['known-bearings', 'self-calibration'] },
    baseRevision: { type: 'integer' },
    acceptedRevision: { type: ['integer', 'null'] },
    elementStates: {
      type: ['array', 'null'],
      items: { type: 'object', properties: { gainDb: { type: 'number' }, phaseDeg: { type: 'number' } } },
    },
    report: { type: ['object', 'null'] },
  },
};

const reviewThread = {
  type: 'object',
  description:
    'The thread of one target: every comment and decision, the sign-offs (approvals) with name and time, and the latest decision.',
  properties: {
    target: {
      type: 'object',
      description: "{type:'array-revision', arrayId, arrayName, revision} or {type:'run', runId}",
    },
    items: {
      type: 'array',
      items: {
        type: 'object',
        properties: {
          id: { type: 'integer' },
          kind: { type: 'string', enum: ['comment', 'approval', 'changes-requested'] },
          body: { type: 'string' },
          author: { type: ['object', 'null'] },
          createdAt: { type: 'string', format: 'date-time' },
        },
      },
    },
    signOffs: {
      type: 'array',
      items: {
        type: 'object',
        properties: {
          by: { type: 'string' },
          role: { type: 'string' },
          at: { type: 'string', format: 'date-time' },
          note: { type: 'string' },
        },
      },
    },
    status: { type: 'string', enum: ['approved', 'changes-requested', 'open'] },
  },
};

export function openApiDocument() {
  return {
    openapi: '3.1.0',
    info: {
      title: 'Steerwise API',
      version: `v1 (software ${packageJson.version})`,
      description:
        'Arrays, snapshot datasets, bearing estimates and bounds for uniform linear arrays. Angles are degrees from broadside; spacing is in wavelengths; one snapshot per row (docs/conventions.md §1–2, §6). Authenticate with `Authorization: Bearer <token>` (account page, or `npm run --silent token -- --email <email>` on the server).',
    },
    servers: [{ url: '/' }],
    security: [{ bearer: [] }],
    paths: {
      '/api/health': {
        get: {
          summary: 'Liveness and database check',
          security: [],
          responses: { '200': { description: 'OK', content: json('Health') } },
        },
      },
      '/api/v1/openapi.json': {
        get: { summary: 'This document', security: [], responses: { '200': { description: 'OpenAPI 3.1' } } },
      },
      '/api/v1/arrays': {
        get: {
          summary: "The team's arrays",
          responses: {
            '200': {
              description: 'OK',
              content: {
                'application/json': {
                  schema: { type: 'object', properties: { items: { type: 'array', items: ref('Array') } } },
                },
              },
            },
            ...errors(401),
          },
        },
        post: {
          summary: 'Create an array (revision 1)',
          requestBody: { required: true, content: json('ArrayInput') },
          responses: { '201': { description: 'Created', content: json('Array') }, ...errors(400, 401, 403, 422) },
        },
      },
      '/api/v1/arrays/{id}': {
        parameters: [idParam],
        get: {
          summary: 'An array at its latest revision, with metrics',
          responses: { '200': { description: 'OK', content: json('Array') }, ...errors(401, 404) },
        },
        patch: {
          summary: 'Change an array (revision + 1)',
          requestBody: { required: true, content: json('ArrayInput') },
          responses: { '200': { description: 'OK', content: json('Array') }, ...errors(400, 401, 403, 404, 422) },
        },
      },
      '/api/v1/arrays/{id}/revisions/{rev}': {
        parameters: [idParam, { name: 'rev', in: 'path', required: true, schema: { type: 'integer', minimum: 1 } }],
        get: {
          summary: 'An array as saved at one revision, with metrics (same shape as GET /api/v1/arrays/{id})',
          responses: { '200': { description: 'OK', content: json('Array') }, ...errors(401, 404) },
        },
      },
      '/api/v1/arrays/{id}/bundle': {
        parameters: [idParam, ...queryParams(bundleQuerySchema)],
        get: {
          summary: 'The hand-off bundle of an array revision (zip)',
          description:
            'revision defaults to the latest; datasets and runs are comma-separated ids to include. The SHA-256 of the zip is in the x-bundle-sha256 header.',
          responses: { '200': { description: 'The bundle', content: zip }, ...errors(401, 403, 404, 422) },
        },
      },
      '/api/v1/arrays/{id}/calibrations': {
        parameters: [idParam],
        get: {
          summary: "The array's calibrations, newest first",
          responses: {
            '200': {
              description: '{items: [calibration, …]}',
              content: { 'application/json': { schema: { type: 'object' } } },
            },
            ...errors(401, 404),
          },
        },
        post: {
          summary: 'Calibrate element gains and phases from reference recordings at known bearings',
          description:
            'One reference {datasetId, bearingsDeg} or several fitted jointly {references:[{datasetId, bearingsDeg}]}; frequencyHz re-analyses WAV references at that frequency; method known-bearings (default) or self-calibration. Runs on the job queue and waits: 201 {revision, report, elementStates, …} with the new array revision already created (revision null with accept:false; accept later). With Prefer: respond-async: 202 with the queued calibration (a proposal). 422 names the field: bearings outside ±90°, a dataset whose channel count differs from the array, fewer snapshots than elements, no signal at a bearing given; nothing is stored.',
          requestBody: { required: true, content: json('CalibrationRequest') },
          responses: {
            '201': { description: 'Calibrated; the new revision and the report', content: json('Calibration') },
            '202': { description: 'Queued (Prefer: respond-async)', content: json('Calibration') },
            ...errors(400, 401, 403, 404, 422),
          },
        },
      },
      '/api/v1/arrays/{id}/calibrations/{calibrationId}': {
        parameters: [idParam, calibrationIdParam],
        get: {
          summary: 'One calibration: status, progress, report, proposed element states, accepted revision',
          responses: { '200': { description: 'OK', content: json('Calibration') }, ...errors(401, 404) },
        },
      },
      '/api/v1/arrays/{id}/calibrations/{calibrationId}/accept': {
        parameters: [idParam, calibrationIdParam],
        post: {
          summary: 'Accept a finished calibration: creates the array revision with its element states',
          responses: {
            '201': { description: 'The new revision (revision) and the calibration', content: json('Calibration') },
            ...errors(401, 403, 404, 409, 422),
          },
        },
      },
      '/api/v1/bundles': {
        post: {
          summary: "Import a hand-off bundle into the caller's team",
          requestBody: {
            required: true,
            content: {
              'multipart/form-data': {
                schema: {
                  type: 'object',
                  required: ['file'],
                  properties: { file: { type: 'string', format: 'binary' } },
                },
              },
            },
          },
          responses: {
            '201': {
              description: 'Imported',
              content: {
                'application/json': {
                  schema: { type: 'object', properties: { arrayId: { type: 'integer' } }, additionalProperties: true },
                },
              },
            },
            ...errors(401, 403, 413, 415, 422),
          },
        },
      },
      '/api/v1/reviews': {
        get: {
          summary: 'The review thread of one array revision (?arrayId=&revision=) or one run (?runId=)',
          parameters: queryParams(reviewQuerySchema),
          responses: {
            '200': { description: 'OK', content: { 'application/json': { schema: reviewThread } } },
            ...errors(401, 404, 422),
          },
        },
        post: {
          summary: 'Comment on, approve (sign off) or ask for changes to an array revision or a finished run',
          description:
            'Comments need an engineer, reviewer or admin; approvals and requests for changes a reviewer or admin. The author is told by e-mail. A run that has not finished is 409.',
          requestBody: { required: true, content: json('ReviewRequest') },
          responses: {
            '201': {
              description: 'The thread after the new entry',
              content: { 'application/json': { schema: reviewThread } },
            },
            ...errors(400, 401, 403, 404, 409, 422),
          },
        },
      },
      '/api/handoff': {
        get: { summary: "The team's sent hand-offs", responses: { '200': { description: 'OK' }, ...errors(401) } },
        post: {
          summary: 'E-mail a hand-off bundle to a colleague',
          description:
            'Sends a signed, expiring download link (GET /api/handoff/{token}) with the note; a recipient who is not yet a member also gets an invitation. Engineers and admins.',
          requestBody: { required: true, content: json('HandoffSend') },
          responses: {
            '201': { description: 'Sent (the link goes only to the recipient)' },
            ...errors(400, 401, 403, 404, 422),
          },
        },
      },
      '/api/handoff/{token}': {
        parameters: [
          {
            name: 'token',
            in: 'path',
            required: true,
            description: 'The signed token from the e-mailed link',
            schema: { type: 'string' },
          },
        ],
        get: {
          summary: 'Download the bundle of an e-mailed hand-off (no sign-in; the signed link is the credential)',
          security: [],
          responses: {
            '200': { description: 'The bundle', content: zip },
            '404': { description: 'Altered or unknown link', content: json('Error') },
            '422': { description: 'Expired link (code link_expired)', content: json('Error') },
          },
        },
      },
      '/api/v1/datasets': {
        get: { summary: "The team's datasets", responses: { '200': { description: 'OK' }, ...errors(401) } },
        post: {
          summary: 'Upload a snapshot file',
          description:
            'Streamed to disk while hashed (SHA-256 of the bytes as received), parsed, then stored atomically with its record. Size limit STEERWISE_MAX_UPLOAD_BYTES (default 200 MiB). Reader errors carry `fields.reason` (a stable code) and `fields.location` ("row R, column C", 1-based).',
          requestBody: { required: true, content: { 'multipart/form-data': { schema: ref('DatasetUpload') } } },
          responses: {
            '201': { description: 'Stored', content: json('DatasetCreated') },
            ...errors(401, 403, 404, 413, 415, 422),
          },
        },
      },
      '/api/v1/datasets/{id}': {
        parameters: [idParam],
        get: {
          summary: 'A dataset with its summary figures',
          responses: { '200': { description: 'OK', content: json('Dataset') }, ...errors(401, 404) },
        },
        delete: {
          summary: 'Delete a dataset and its stored file',
          responses: { '204': { description: 'Deleted' }, ...errors(401, 403, 404) },
        },
      },
      '/api/v1/estimates': {
        get: { summary: "The team's estimate runs", responses: { '200': { description: 'OK' }, ...errors(401) } },
        post: {
          summary: 'Estimate bearings',
          description:
            'Waits for the run and answers 201. With `Prefer: respond-async` it answers 202 with the queued run; poll GET /api/v1/estimates/{id}. The array revision’s element calibration is applied unless `applyCalibration` is false, and the run stores what it applied (`inputs.calibration`). On a revision with disabled elements MUSIC, Bartlett and MVDR use the enabled elements at their true positions, ESPRIT and root-MUSIC the longest contiguous run, with an `element-subset` warning. K ≥ the elements a method uses (or ≥ the smoothed L) and mismatched element counts are 422.',
          parameters: [
            { name: 'Prefer', in: 'header', required: false, schema: { type: 'string', enum: ['respond-async'] } },
          ],
          requestBody: { required: true, content: json('EstimateRequest') },
          responses: {
            '201': { description: 'Done', content: json('Estimate') },
            '202': { description: 'Queued', content: json('EstimateRun') },
            ...errors(400, 401, 403, 404, 413, 415, 422),
          },
        },
      },
      '/api/v1/estimates/{id}': {
        parameters: [idParam],
        get: {
          summary: 'A run with its inputs, status, progress and per-method results',
          responses: { '200': { description: 'OK', content: json('EstimateRun') }, ...errors(401, 404) },
        },
      },
      '/api/v1/estimates/{id}/rerun': {
        parameters: [idParam],
        post: {
          summary: 'Repeat a run with its exact inputs and compare the bearings',
          responses: {
            '201': { description: 'Done, with `comparison`' },
            '202': { description: 'Queued' },
            ...errors(401, 403, 404, 409, 422),
          },
        },
      },
      '/api/v1/estimates/{id}/cancel': {
        parameters: [idParam],
        post: {
          summary: 'Stop a queued or running run (engineers, admins)',
          description: 'The body is empty or `{}`. The run becomes `cancelled` with the reason in `error`.',
          responses: {
            '200': { description: 'Stopped', content: json('EstimateRun') },
            ...errors(401, 403, 404, 409, 422),
          },
        },
      },
      '/api/v1/studies/{id}/cancel': {
        parameters: [idParam],
        post: {
          summary: 'Stop a queued or running study (engineers, admins)',
          description: 'The body is empty or `{}`. The study becomes `cancelled` with the reason in `error`.',
          responses: { '200': { description: 'Stopped' }, ...errors(401, 403, 404, 409, 422) },
        },
      },
      '/api/v1/studies': {
        get: {
          summary: "The team's Monte Carlo studies (without results)",
          responses: { '200': { description: 'OK' }, ...errors(401) },
        },
        post: {
          summary: 'Start a Monte Carlo accuracy study (RMSE against the stochastic CRB over a sweep of SNR, N or M)',
          description:
            'Answers 202 {id, status} and runs on the job queue; poll GET /api/v1/studies/{id}. A study over the compute budget is 422 with a message saying how to shrink it.',
          requestBody: { required: true, content: json('StudyRequest') },
          responses: { '202': { description: 'Queued: {id, status}' }, ...errors(400, 401, 403, 404, 413, 415, 422) },
        },
      },
      '/api/v1/studies/{id}': {
        parameters: [idParam],
        get: {
          summary: 'A study: status, progress, inputs and per-point results',
          responses: { '200': { description: 'OK' }, ...errors(401, 404) },
        },
        delete: {
          summary: 'Delete a study (a running one is stopped)',
          responses: { '204': { description: 'Deleted' }, ...errors(401, 403, 404) },
        },
      },
      '/api/v1/bearing-time-records': {
        get: {
          summary: "The team's bearing–time records (without blocks, tracks or image)",
          responses: { '200': { description: 'OK' }, ...errors(401) },
        },
        post: {
          summary: 'Start a bearing–time record of a stored recording (WAV, or NPY with sampleRate)',
          description:
            'Answers 202 {id, status} and runs on the worker pool; poll GET /api/v1/bearing-time-records/{id}. The recording is checked against the array and the options before anything is stored: a mono file, a channel count other than the element count, a band above Nyquist, a block shorter than one FFT frame or longer than the recording, and a truncated file are 422 naming the field.',
          requestBody: { required: true, content: json('BearingTimeRecordRequest') },
          responses: { '202': { description: 'Queued: {id, status}' }, ...errors(400, 401, 403, 404, 413, 415, 422) },
        },
      },
      '/api/v1/bearing-time-records/{id}': {
        parameters: [idParam],
        get: {
          summary: 'A record: status, progress, and when done its blocks, tracks and display image',
          responses: { '200': { description: 'OK', content: json('BearingTimeRecord') }, ...errors(401, 404) },
        },
        delete: {
          summary: 'Delete a record and its result files (a running one is stopped)',
          responses: { '204': { description: 'Deleted' }, ...errors(401, 403, 404) },
        },
      },
      '/api/v1/bearing-time-records/{id}/cancel': {
        parameters: [idParam],
        post: {
          summary: 'Stop a queued or running record (engineers, admins)',
          description: 'The body is empty or `{}`. The record becomes `cancelled` with the reason in `error`.',
          responses: {
            '200': { description: 'Stopped', content: json('BearingTimeRecord') },
            ...errors(401, 403, 404, 409, 422),
          },
        },
      },
      '/api/v1/bearing-time-records/{id}/blocks/{index}': {
        parameters: [idParam, { name: 'index', in: 'path', required: true, schema: { type: 'integer', minimum: 0 } }],
        get: {
          summary: "One block's wideband spectrum (dB on the bearing grid), bearings and ±σ",
          responses: {
            '200': { description: 'OK', content: json('BearingTimeBlock') },
            ...errors(401, 404, 409, 422),
          },
        },
      },
      '/api/v1/bearing-time-records/{id}/export': {
        parameters: [
          idParam,
          { name: 'format', in: 'query', required: true, schema: { type: 'string', enum: ['csv', 'json', 'png'] } },
        ],
        get: {
          summary:
            'A finished record as CSV (a row per block bearing with its track), JSON or PNG (image, tracks, colour bar)',
          responses: {
            '200': {
              description: 'The file',
              content: {
                'text/csv': { schema: { type: 'string' } },
                'application/json': { schema: ref('BearingTimeRecord') },
                'image/png': { schema: { type: 'string', format: 'binary' } },
              },
            },
            ...errors(401, 404, 409, 422),
          },
        },
      },
      '/api/v1/plans': {
        post: {
          summary: 'Plan an array: element count, spacing and snapshots meeting an accuracy (and resolution) target',
          description:
            'Stores nothing; any team member may call it. Answers the Pareto front of elements against snapshots, the first candidate being the recommended one. Quantities take a plain number in the documented unit or text with units ("3 kHz", "25 mm"). An infeasible target is 422 whose `fields` name the binding constraint (e.g. `constraints.maxElements`, `snapshots`, `constraints.spacingM`) and by how much.',
          requestBody: { required: true, content: json('PlanRequest') },
          responses: { '200': { description: 'OK', content: json('Plan') }, ...errors(400, 401, 403, 413, 415, 422) },
        },
      },
      '/api/v1/bounds': {
        post: {
          summary: 'Stochastic CRB per source and the resolvable-gap test per pair',
          requestBody: { required: true, content: json('BoundsRequest') },
          responses: { '200': { description: 'OK', content: json('Bounds') }, ...errors(400, 401, 422) },
        },
      },
    },
    components: {
      securitySchemes: { bearer: { type: 'http', scheme: 'bearer', description: 'A personal API token' } },
      schemas: {
        Error: schema(errorSchema),
        Health: schema(healthSchema),
        ArrayInput: schema(arrayInputSchema, 'input'),
        Array: schema(arraySchema),
        DatasetUpload: schema(datasetUploadFormSchema, 'input'),
        BearingTimeRecordRequest: schema(bearingTimeRecordRequestSchema, 'input'),
        BearingTimeRecord: schema(bearingTimeRecordSchema),
        BearingTimeBlock: schema(bearingTimeBlockDetailSchema),
        DatasetCreated: schema(datasetCreatedSchema),
        Dataset: schema(datasetSchema),
        EstimateRequest: schema(estimateRequestSchema, 'input'),
        CalibrationRequest: schema(calibrationRequestSchema, 'input'),
        Calibration: calibrationAnswer,
        Estimate: schema(estimateAnswerSchema),
        EstimateRun: schema(estimateRunSchema),
        BoundsRequest: schema(boundsRequestSchema, 'input'),
        Bounds: schema(boundsAnswerSchema),
        StudyRequest: schema(studyRequestSchema, 'input'),
        PlanRequest: schema(planRequestSchema, 'input'),
        Plan: schema(planAnswerSchema),
        ReviewRequest: schema(reviewCreateSchema, 'input'),
        HandoffSend: schema(handoffSendSchema, 'input'),
      },
    },
  };
}
