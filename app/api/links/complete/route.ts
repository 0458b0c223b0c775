import { handle, readJson } from '@/lib/http';
import { completeLink } from '@/lib/data/links';
import { linkCompleteSchema } from '@/lib/validations/account';

/** Anonymous: the one-time token in the body is the credential. */
export const POST = handle(async (req) => {
  const input = linkCompleteSchema.parse(await readJson(req, 10_000));
  return Response.json(await completeLink({ input }));
});
