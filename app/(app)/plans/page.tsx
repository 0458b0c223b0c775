import { PageHeader } from '@/components/ui/page-header';
import { Refusal } from '@/components/ui/refusal';
import { Planner } from '@/components/planner/planner';
import { requirePagePermission } from '@/lib/auth';
import { can } from '@/lib/auth/permissions';

export const metadata = { title: 'Aperture planner' };
export const dynamic = 'force-dynamic';

export default async function PlansPage() {
  const { user, allowed, message } = await requirePagePermission('arrays.read');
  if (!allowed) return <Refusal message={message} />;
  return (
    <>
      <PageHeader
        kicker="Before hardware"
        title="Aperture planner"
        description="From a bearing accuracy, a resolution and a scan sector to the element count, spacing and snapshot budget that meet them: the fewest snapshots for each element count, from the Cramér–Rao bound and the method's efficiency."
      />
      <div className="mb-4 grid gap-2 rounded-md border border-amber-300 bg-amber-50 px-4 py-3 text-sm text-amber-800">
        <p>
          <strong>Estimates are advisory.</strong> The bound and the first-order efficiency hold above the threshold SNR
          and snapshot count; calibration and position errors, coupling and coherent multipath are not included. Verify
          a candidate by Monte Carlo before you rely on it.
        </p>
        <p>
          <strong>Export controls.</strong> Array design for radar and sonar can be dual-use controlled (Wassenaar
          Category 6, EAR ECCN 6A001, EU 2021/821 Annex I). This is an awareness notice, not legal advice.
        </p>
      </div>
      <Planner canDesign={can(user.role, 'arrays.edit')} canStudy={can(user.role, 'studies.run')} />
    </>
  );
}
