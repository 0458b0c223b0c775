import { handle, readJson } from '@/lib/http';
import { requireApiPermission } from '@/lib/auth';
import { listHandoffs, sendHandoff } from '@/lib/data/handoffs';
import { handoffSendSchema } from '@/lib/validations/handoff';

/** GET: the team's sent hand-offs. */
export const GET = handle(async (req) => {
  const caller = await requireApiPermission(req, 'arrays.read');
  return Response.json({ items: await listHandoffs({ caller }) });
});

/** POST {arrayId, revision?, recipientEmail, note?, datasets?, runs?}: e-mails a signed, expiring download link. */
export const POST = handle(async (req) => {
  const caller = await requireApiPermission(req, 'arrays.edit');
  const input = handoffSendSchema.parse(await readJson(req));
  const { link: _link, ...dto } = await sendHandoff({ caller, input, origin: new URL(req.url).origin });
  void _link; // the link goes only to the recipient's mailbox
  return Response.json(dto, { status: 201 });
});
