import { handle } from '@/lib/http';
import { requireApiPermission } from '@/lib/auth';
import { listOutbox } from '@/lib/data/outbox';

export const GET = handle(async (req) => {
  const caller = await requireApiPermission(req, 'outbox.read');
  return Response.json({ items: await listOutbox({ caller }) });
});
