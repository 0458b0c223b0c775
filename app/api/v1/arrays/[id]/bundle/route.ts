import { handle, parseId } from '@/lib/http';
import { requireApiPermission } from '@/lib/auth';
import { buildArrayBundle } from '@/lib/handoff/export';
import { bundleQueryFrom } from '@/lib/validations/handoff';

type Ctx = { params: Promise<{ id: string }> };

/** GET /api/v1/arrays/{id}/bundle?revision=&datasets=1,2&runs=3 → application/zip (README "Hand-off bundle format"). */
export const GET = handle<Ctx>(async (req, ctx) => {
  const { id } = await ctx.params;
  const caller = await requireApiPermission(req, 'arrays.read');
  const query = bundleQueryFrom(req.url);
  const bundle = await buildArrayBundle({
    caller,
    arrayId: parseId(id, 'array'),
    selection: { revision: query.revision, datasetIds: query.datasets, runIds: query.runs },
  });
  return new Response(Buffer.from(bundle.zip), {
    status: 200,
    headers: {
      'content-type': 'application/zip',
      'content-disposition': `attachment; filename="${bundle.fileName}"`,
      'content-length': String(bundle.zip.byteLength),
      'x-bundle-sha256': bundle.sha256,
      'cache-control': 'no-store',
    },
  });
});
