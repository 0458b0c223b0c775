import { handle } from '@/lib/http';
import { requireApiPermission } from '@/lib/auth';
import { listAuditEvents } from '@/lib/data/audit';

export const GET = handle(async (req) => {
  const caller = await requireApiPermission(req, 'audit.read');
  const limit = Number(new URL(req.url).searchParams.get('limit') ?? 500);
  return Response.json({ items: await listAuditEvents({ caller, limit: Number.isFinite(limit) ? limit : 500 }) });
});
