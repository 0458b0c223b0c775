import { handle } from '@/lib/http';
import { requireApiPermission } from '@/lib/auth';
import { importBundle, receiveBundle } from '@/lib/handoff/import';

/**
 * POST /api/v1/bundles, multipart `file`: imports a hand-off bundle into the
 * caller's team as a new array (revision 1) with its datasets and runs; each
 * run is re-executed and compared. 201 {arrayId, …}; 413 too large, 415 not a
 * zip, 422 any other refusal. Nothing is written on a refusal.
 */
export const POST = handle(async (req) => {
  const caller = await requireApiPermission(req, 'arrays.edit');
  const { bytes } = await receiveBundle(req);
  const result = await importBundle({ caller, bytes });
  return Response.json(result, { status: 201 });
});
