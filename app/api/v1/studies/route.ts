import { handle, parseBody, readJson } from '@/lib/http';
import { requireApiPermission } from '@/lib/auth';
import { createStudy, listStudies } from '@/lib/data/studies';
import { studyRequestSchema } from '@/lib/validations/study';

export const dynamic = 'force-dynamic';

/** The caller's team's studies, newest first (without their results). */
export const GET = handle(async (req) => {
  const caller = await requireApiPermission(req, 'arrays.read');
  return Response.json({ items: await listStudies({ caller }) });
});

/** Starts a study on the job queue: 202 {id, status}; poll GET /api/v1/studies/{id}. */
export const POST = handle(async (req) => {
  const caller = await requireApiPermission(req, 'studies.run');
  const input = parseBody(studyRequestSchema, await readJson(req));
  const { study } = await createStudy({ caller, input });
  return Response.json(
    { id: study.id, status: study.status },
    { status: 202, headers: { location: `/api/v1/studies/${study.id}` } },
  );
});
