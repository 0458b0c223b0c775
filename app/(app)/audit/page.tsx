import { Card } from '@/components/ui/card';
import { PageHeader } from '@/components/ui/page-header';
import { Refusal } from '@/components/ui/refusal';
import { AuditTable } from '@/components/admin/audit-table';
import { requirePagePermission } from '@/lib/auth';
import { listAuditEvents } from '@/lib/data/audit';

export const metadata = { title: 'Audit log' };

export default async function AuditPage() {
  const { user, allowed, message } = await requirePagePermission('audit.read');
  if (!allowed) return <Refusal message={message} />;
  const events = await listAuditEvents({ caller: user });
  return (
    <>
      <PageHeader
        kicker="Admin"
        title="Audit log"
        description="Sign-ins, membership and role changes, tokens, invitations and resets, array revisions, bundle exports, imports and sends, reviews and sign-offs in your team, newest first (last 500)."
      />
      <Card>
        <AuditTable events={events} />
      </Card>
    </>
  );
}
