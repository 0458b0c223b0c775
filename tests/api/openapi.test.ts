/** GET /api/v1/openapi.json: public, OpenAPI 3.1, every §7 path, schemas generated from the route schemas. */
import { describe, expect, it } from 'vitest';
import { z } from 'zod';
import * as openapi from '@/app/api/v1/openapi.json/route';
import { estimateRequestSchema } from '@/lib/validations/estimate';
import { planRequestSchema } from '@/lib/validations/plan';
import { handoffSendSchema } from '@/lib/validations/handoff';
import { reviewCreateSchema } from '@/lib/validations/review';
import { json, params, req } from '../helpers/api';

describe('openapi.json', () => {
  it('is served without credentials and lists every v1 path of docs/conventions.md §7', async () => {
    const res = await openapi.GET(req('GET', '/api/v1/openapi.json'), params({}));
    expect(res.status).toBe(200);
    const doc = await json(res);
    expect(doc.openapi).toBe('3.1.0');
    for (const p of [
      '/api/health',
      '/api/v1/arrays',
      '/api/v1/arrays/{id}',
      '/api/v1/arrays/{id}/bundle',
      '/api/v1/bundles',
      '/api/v1/datasets',
      '/api/v1/datasets/{id}',
      '/api/v1/estimates',
      '/api/v1/estimates/{id}',
      '/api/v1/bounds',
      '/api/v1/plans',
      '/api/v1/openapi.json',
    ]) {
      expect(doc.paths[p], p).toBeDefined();
    }
    expect(Object.keys(doc.paths['/api/v1/datasets/{id}'])).toEqual(expect.arrayContaining(['get', 'delete']));
    expect(doc.paths['/api/health'].get.security).toEqual([]);
  });

  it('lists the revision, review and hand-off routes, with request schemas from the route schemas', async () => {
    const doc = await json(await openapi.GET(req('GET', '/api/v1/openapi.json'), params({})));
    const plain = (s: z.ZodType) =>
      (({ $schema: _, ...rest }) => rest)(
        z.toJSONSchema(s, { target: 'draft-2020-12', io: 'input', unrepresentable: 'any' }) as Record<string, unknown>,
      );
    expect(doc.paths['/api/v1/arrays/{id}/revisions/{rev}'].get).toBeDefined();
    expect(doc.paths['/api/v1/arrays/{id}/revisions/{rev}'].parameters.map((p: { name: string }) => p.name)).toEqual([
      'id',
      'rev',
    ]);
    expect(Object.keys(doc.paths['/api/v1/reviews'])).toEqual(expect.arrayContaining(['get', 'post']));
    expect(doc.paths['/api/v1/reviews'].get.parameters.map((p: { name: string }) => p.name)).toEqual([
      'arrayId',
      'revision',
      'runId',
    ]);
    expect(doc.paths['/api/v1/reviews'].post.requestBody.content['application/json'].schema.$ref).toBe(
      '#/components/schemas/ReviewRequest',
    );
    expect(doc.components.schemas.ReviewRequest).toEqual(plain(reviewCreateSchema));
    expect(doc.components.schemas.ReviewRequest.properties.kind.enum).toEqual([
      'comment',
      'approval',
      'changes-requested',
    ]);
    expect(Object.keys(doc.paths['/api/handoff'])).toEqual(expect.arrayContaining(['get', 'post']));
    expect(doc.components.schemas.HandoffSend).toEqual(plain(handoffSendSchema));
    expect(doc.components.schemas.HandoffSend.required).toEqual(expect.arrayContaining(['arrayId', 'recipientEmail']));
    // the signed download link needs no sign-in
    expect(doc.paths['/api/handoff/{token}'].get.security).toEqual([]);
    expect(doc.paths['/api/handoff/{token}'].get.responses['200'].content['application/zip']).toBeDefined();
    expect(doc.paths['/api/v1/arrays/{id}/bundle'].parameters.map((p: { name: string }) => p.name)).toEqual([
      'id',
      'revision',
      'datasets',
      'runs',
    ]);
    expect(doc.paths['/api/v1/bundles'].post.requestBody.content['multipart/form-data'].schema.required).toEqual([
      'file',
    ]);
  });

  it('the estimate request schema is the one the route parses (methods enum, required method, §7 fields)', async () => {
    const doc = await json(await openapi.GET(req('GET', '/api/v1/openapi.json'), params({})));
    const s = doc.components.schemas.EstimateRequest;
    expect(s).toEqual(
      (({ $schema: _, ...rest }) => rest)(
        z.toJSONSchema(estimateRequestSchema, {
          target: 'draft-2020-12',
          io: 'input',
          unrepresentable: 'any',
        }) as Record<string, unknown>,
      ),
    );
    expect(s.properties.method.enum).toEqual([
      'esprit-ls',
      'esprit-tls',
      'esprit-unitary',
      'music',
      'root-music',
      'bartlett',
      'mvdr',
    ]);
    for (const f of [
      'datasetId',
      'snapshots',
      'arrayId',
      'array',
      'sourceCount',
      'sourceCountRule',
      'forwardBackward',
      'smoothingSubarray',
      'singleSnapshot',
      'singleSnapshotSubarray',
      'includeSpectrum',
    ])
      expect(s.properties[f], f).toBeDefined();
    expect(doc.components.schemas.ArrayInput.properties.spacing.properties.unit.enum).toEqual([
      'wavelength',
      'm',
      'mm',
    ]);
    expect(doc.components.schemas.DatasetUpload.properties.file.format).toBe('binary');
  });

  it('describes POST /api/v1/plans with the schema the route parses (quantities as number or text)', async () => {
    const doc = await json(await openapi.GET(req('GET', '/api/v1/openapi.json'), params({})));
    const post = doc.paths['/api/v1/plans'].post;
    expect(post.requestBody.content['application/json'].schema.$ref).toBe('#/components/schemas/PlanRequest');
    expect(post.responses['422']).toBeDefined();
    const s = doc.components.schemas.PlanRequest;
    expect(s).toEqual(
      (({ $schema: _, ...rest }) => rest)(
        z.toJSONSchema(planRequestSchema, { target: 'draft-2020-12', io: 'input', unrepresentable: 'any' }) as Record<
          string,
          unknown
        >,
      ),
    );
    for (const f of ['frequencyHz', 'band', 'medium', 'propagationSpeedMps', 'scanSectorDeg', 'targets', 'constraints'])
      expect(s.properties[f], f).toBeDefined();
    expect(s.properties.frequencyHz.type).toEqual(['number', 'string']);
    expect(doc.components.schemas.Plan.properties.candidates.type).toBe('array');
  });
});
