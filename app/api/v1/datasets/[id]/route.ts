import { handle, parseId } from '@/lib/http';
import { requireApiPermission } from '@/lib/auth';
import { deleteDataset, getDataset } from '@/lib/data/datasets';

export const dynamic = 'force-dynamic';

type Ctx = { params: Promise<{ id: string }> };

export const GET = handle<Ctx>(async (req, ctx) => {
  const { id } = await ctx.params;
  const caller = await requireApiPermission(req, 'datasets.read');
  return Response.json(await getDataset({ caller, id: parseId(id, 'dataset') }));
});

export const DELETE = handle<Ctx>(async (req, ctx) => {
  const { id } = await ctx.params;
  const caller = await requireApiPermission(req, 'datasets.upload');
  await deleteDataset({ caller, id: parseId(id, 'dataset') });
  return new Response(null, { status: 204 });
});
