import Link from 'next/link';
import { Card, CardHeader } from '@/components/ui/card';
import { PageHeader } from '@/components/ui/page-header';
import { Refusal } from '@/components/ui/refusal';
import { ImportForm } from '@/components/handoff/import-form';
import { ArrayHandoffSection } from '@/components/handoff/array-handoff-section';
import { requirePagePermission } from '@/lib/auth';
import { listHandoffs } from '@/lib/data/handoffs';
import { can, refusalMessage } from '@/lib/auth/permissions';

export const metadata = { title: 'Hand-off' };

type Props = { searchParams: Promise<Record<string, string | string[] | undefined>> };

export default async function HandoffPage({ searchParams }: Props) {
  const query = await searchParams;
  const { user, allowed, message } = await requirePagePermission('arrays.read');
  if (!allowed) return <Refusal message={message} />;
  const link =
    typeof query.link === 'string' && /^[A-Za-z0-9_-]+\.[A-Za-z0-9_-]+$/.test(query.link) ? query.link : undefined;
  const sent = await listHandoffs({ caller: user });
  const positive = (raw: unknown) =>
    typeof raw === 'string' && /^[1-9][0-9]{0,8}$/.test(raw) ? Number(raw) : undefined;
  const arrayId = positive(query.array);
  const revision = positive(query.rev);
  return (
    <>
      <PageHeader
        kicker="Hand-off"
        title="Bundles in and out"
        description="Import a bundle a colleague sent you, and see what your team has sent. To send one, open an array and use its hand-off panel."
      />
      <div className="space-y-6">
        {arrayId !== undefined && revision !== undefined ? (
          <section aria-label="Review and hand-off of one revision">
            <ArrayHandoffSection caller={user} arrayId={arrayId} revision={revision} />
          </section>
        ) : null}
        {can(user.role, 'arrays.edit') ? (
          <ImportForm linkToken={link} />
        ) : (
          <Refusal
            message={`${refusalMessage(user.role, 'arrays.edit')} Importing a bundle creates an array, so ask an engineer or admin to import it.`}
          />
        )}
        <Card aria-labelledby="sent-title">
          <CardHeader
            id="sent-title"
            title="Sent by your team"
            description="Each e-mailed link is signed and expires; the bundle is built afresh from the stored revision when it is downloaded."
          />
          {sent.length === 0 ? (
            <p className="px-5 py-4 text-sm text-ink-500">Nothing sent yet.</p>
          ) : (
            <table className="w-full text-left text-sm">
              <thead className="text-xs text-ink-500">
                <tr>
                  <th className="px-5 py-2 font-medium">array</th>
                  <th className="px-2 py-2 font-medium">to</th>
                  <th className="px-2 py-2 font-medium">by</th>
                  <th className="px-2 py-2 font-medium">sent</th>
                  <th className="px-2 py-2 font-medium">expires</th>
                  <th className="px-5 py-2 font-medium">downloads</th>
                </tr>
              </thead>
              <tbody>
                {sent.map((h) => (
                  <tr key={h.id} className="border-t border-ink-100">
                    <td className="px-5 py-2">
                      <Link
                        href={`/handoff?array=${h.arrayId}&rev=${h.revision}`}
                        className="text-glass-700 underline underline-offset-2"
                      >
                        {h.arrayName}
                      </Link>{' '}
                      r{h.revision}
                      {h.runs.length ? ` + ${h.runs.length} run(s)` : ''}
                    </td>
                    <td className="px-2 py-2">
                      {h.recipientEmail}
                      {h.invited ? ' (invited)' : ''}
                    </td>
                    <td className="px-2 py-2">{h.sentBy?.name ?? '—'}</td>
                    <td className="px-2 py-2">{new Date(h.createdAt).toUTCString()}</td>
                    <td className="px-2 py-2">{new Date(h.expiresAt).toUTCString()}</td>
                    <td className="px-5 py-2">{h.downloadCount}</td>
                  </tr>
                ))}
              </tbody>
            </table>
          )}
        </Card>
      </div>
    </>
  );
}
