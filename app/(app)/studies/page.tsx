import { AreaPlaceholder } from '@/components/shell/area-placeholder';

export const metadata = { title: 'Studies' };

export default function StudiesPage() {
  return (
    <AreaPlaceholder
      read="arrays.read"
      write="review.comment"
      kicker="Hand-off"
      title="Studies"
      description="Configurations and results packaged for a colleague or a reviewer, who can check and reproduce them."
      emptyTitle="No studies yet"
      emptyText="Hand-off bundles, their reviews and sign-offs will be gathered here. A bundle carries the array revision, calibration, chosen datasets and runs, figures and a plain-text summary, each with a checksum."
      points={[
        'Export and import of checked bundles',
        'E-mailed hand-off with an expiring link',
        'Comments, approval or a request for changes',
        'Sign-off with name and time that sticks to its revision',
      ]}
    />
  );
}
