import Link from 'next/link';
import { NewArray } from '@/components/arrays/new-array';
import { PageHeader } from '@/components/ui/page-header';
import { Refusal } from '@/components/ui/refusal';
import { requirePagePermission } from '@/lib/auth';

export const metadata = { title: 'New array' };

export default async function NewArrayPage() {
  const { allowed, message } = await requirePagePermission('arrays.edit');
  if (!allowed) return <Refusal message={message} hint="You can still open the team's arrays read-only." />;
  return (
    <>
      <PageHeader
        kicker="Design"
        title="New array"
        description={
          <>
            Draw it on the canvas or type the numbers; the figures follow live. Saving creates revision 1.{' '}
            <Link href="/arrays" className="text-glass-700 underline underline-offset-2">
              Back to the arrays
            </Link>
          </>
        }
      />
      <NewArray />
    </>
  );
}
