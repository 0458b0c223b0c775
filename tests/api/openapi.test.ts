/** GET /api/v1/openapi.json: public, OpenAPI 3.1, every §7 path, schemas generated from the route schemas. */
import { describe, expect, it } from 'vitest';
import { z } from 'zod';
import * as openapi from '@/app/api/v1/openapi.json/route';
import { estimateRequestSchema } from '@/lib/validations/estimate';
import { json, params, req } from '../helpers/api';

describe('openapi.json', () => {
  it('is served without credentials and lists every v1 path of CONVENTIONS §7', async () => {
    const res = await openapi.GET(req('GET', '/api/v1/openapi.json'), params({}));
    expect(res.status).toBe(200);
    const doc = await json(res);
    expect(doc.openapi).toBe('3.1.0');
    for (const p of ['/api/health', '/api/v1/arrays', '/api/v1/arrays/{id}', '/api/v1/arrays/{id}/bundle', '/api/v1/bundles', '/api/v1/datasets', '/api/v1/datasets/{id}', '/api/v1/estimates', '/api/v1/estimates/{id}', '/api/v1/bounds', '/api/v1/openapi.json']) {
      expect(doc.paths[p], p).toBeDefined();
    }
    expect(Object.keys(doc.paths['/api/v1/datasets/{id}'])).toEqual(expect.arrayContaining(['get', 'delete']));
    expect(doc.paths['/api/health'].get.security).toEqual([]);
  });

  it('the estimate request schema is the one the route parses (methods enum, required method, §7 fields)', async () => {
    const doc = await json(await openapi.GET(req('GET', '/api/v1/openapi.json'), params({})));
    const s = doc.components.schemas.EstimateRequest;
    expect(s).toEqual((({ $schema: _, ...rest }) => rest)(z.toJSONSchema(estimateRequestSchema, { target: 'draft-2020-12', io: 'input', unrepresentable: 'any' }) as Record<string, unknown>));
    expect(s.properties.method.enum).toEqual(['esprit-ls', 'esprit-tls', 'esprit-unitary', 'music', 'root-music', 'bartlett', 'mvdr']);
    for (const f of ['datasetId', 'snapshots', 'arrayId', 'array', 'sourceCount', 'sourceCountRule', 'forwardBackward', 'smoothingSubarray', 'singleSnapshot', 'singleSnapshotSubarray', 'includeSpectrum']) expect(s.properties[f], f).toBeDefined();
    expect(doc.components.schemas.ArrayInput.properties.spacing.properties.unit.enum).toEqual(['wavelength', 'm', 'mm']);
    expect(doc.components.schemas.DatasetUpload.properties.file.format).toBe('binary');
  });
});
