import { handle, readJson } from '@/lib/http';
import { getCaller } from '@/lib/auth';
import { getProfile, updateProfile } from '@/lib/data/account';
import { profileSchema } from '@/lib/validations/account';

export const GET = handle(async (req) => {
  const caller = await getCaller(req);
  return Response.json(await getProfile({ caller }));
});

export const PATCH = handle(async (req) => {
  const caller = await getCaller(req);
  const input = profileSchema.parse(await readJson(req));
  return Response.json(await updateProfile({ caller, input }));
});
