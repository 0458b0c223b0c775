import { Card } from '@/components/ui/card';
import { EmptyState } from '@/components/ui/empty-state';
import { PageHeader } from '@/components/ui/page-header';
import { Refusal } from '@/components/ui/refusal';
import { OutboxList } from '@/components/admin/outbox-list';
import { requirePagePermission } from '@/lib/auth';
import { listOutbox } from '@/lib/data/outbox';

export const metadata = { title: 'Outbox' };

export default async function OutboxPage() {
  const { user, allowed, message } = await requirePagePermission('outbox.read');
  if (!allowed)
    return (
      <Refusal message={message} hint="The outbox shows e-mail captured by the local mail sink; only admins read it." />
    );
  const messages = await listOutbox({ caller: user });
  const relay = Boolean(process.env.SMTP_HOST);
  return (
    <>
      <PageHeader
        kicker="Admin"
        title="Outbox"
        description={
          relay
            ? 'A real mail relay is configured (SMTP_HOST), so new mail leaves the server; messages captured earlier by the local sink are still listed.'
            : 'No mail relay is configured, so Steerwise captures its own e-mail here: invitations, password resets and hand-offs addressed to your team.'
        }
      />
      {messages.length === 0 ? (
        <EmptyState title="No captured mail">
          <p>
            Invitations and password-reset e-mails to members of your team will appear here as soon as they are sent.
          </p>
        </EmptyState>
      ) : (
        <Card>
          <OutboxList messages={messages} />
        </Card>
      )}
    </>
  );
}
