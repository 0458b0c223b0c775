import { handle, parseBody, parseId } from '@/lib/http';
import { requireApiPermission } from '@/lib/auth';
import { exportBearingTimeRecord } from '@/lib/data/bearing-time-record-export';
import { bearingTimeRecordExportSchema } from '@/lib/validations/bearing-time-record';

export const dynamic = 'force-dynamic';

type Ctx = { params: Promise<{ id: string }> };

/**
 * A finished record as a file: `?format=csv` (one row per block bearing with its
 * ±σ and track), `json` (the record as GET answers it) or `png` (the image with
 * tracks, axes and colour bar). 409 while the record is not done.
 */
export const GET = handle<Ctx>(async (req, ctx) => {
  const { id } = await ctx.params;
  const caller = await requireApiPermission(req, 'datasets.read');
  const { format } = parseBody(bearingTimeRecordExportSchema, {
    format: new URL(req.url).searchParams.get('format') ?? undefined,
  });
  const file = await exportBearingTimeRecord({ caller, id: parseId(id, 'bearing–time record'), format });
  return new Response(new Uint8Array(file.body), {
    headers: {
      'content-type': file.contentType,
      'content-disposition': `attachment; filename="${file.fileName}"`,
    },
  });
});
