import { handle } from '@/lib/http';
import { requireApiPermission } from '@/lib/auth';
import { createDataset, createdBody, datasetErrorToApi, listDatasets, receiveDatasetUpload } from '@/lib/data/datasets';
import { DatasetError } from '@/lib/datasets';
import { removeQuietly } from '@/lib/storage/files';

export const dynamic = 'force-dynamic';

/** The caller's team's datasets, newest first. */
export const GET = handle(async (req) => {
  const caller = await requireApiPermission(req, 'datasets.read');
  return Response.json({ items: await listDatasets({ caller }) });
});

/**
 * POST /api/v1/datasets (docs/conventions.md §7): multipart `file` plus optional
 * fields. The body is streamed to a temp file while hashed, parsed, then
 * moved into place with its row in one transaction; any failure leaves
 * neither a row nor a file.
 */
export const POST = handle(async (req) => {
  const caller = await requireApiPermission(req, 'datasets.upload');
  let tempPath: string | null = null;
  try {
    const upload = await receiveDatasetUpload(req);
    tempPath = upload.tempPath;
    const dataset = await createDataset({ caller, upload });
    return Response.json(createdBody(dataset), {
      status: 201,
      headers: { location: `/api/v1/datasets/${dataset.id}` },
    });
  } catch (err) {
    if (err instanceof DatasetError) {
      const api = datasetErrorToApi(err);
      if (api) throw api;
    }
    throw err;
  } finally {
    await removeQuietly(tempPath);
  }
});
