import { AreaPlaceholder } from '@/components/shell/area-placeholder';

export const metadata = { title: 'Estimates' };

export default function EstimatesPage() {
  return (
    <AreaPlaceholder
      read="arrays.read"
      write="estimates.run"
      kicker="Bearings"
      title="Estimates"
      description="Angle-of-arrival runs that pair an array revision with a dataset, stored with their exact inputs so anyone can re-run them."
      emptyTitle="No estimate runs yet"
      emptyText="Bearing estimates will appear here, one column per method, each with ±1σ from the Cramér–Rao bound, a 95% interval, and warnings with advice."
      points={[
        'ESPRIT- and MUSIC-family methods compared side by side',
        'Pseudo-spectra overlaid, eigenvalues with the source count',
        'Flags for pairs closer than the array can resolve',
        'CSV and JSON export of every run',
      ]}
    />
  );
}
