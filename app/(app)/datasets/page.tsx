import { AreaPlaceholder } from '@/components/shell/area-placeholder';

export const metadata = { title: 'Datasets' };

export default function DatasetsPage() {
  return (
    <AreaPlaceholder
      read="datasets.read"
      write="datasets.upload"
      kicker="Trial data"
      title="Datasets"
      description="Multichannel snapshot matrices from trials and test ranges, stored with their SHA-256 so every estimate can name the exact data it used."
      emptyTitle="No datasets yet"
      emptyText="Uploaded recordings will be listed here: complex CSV or text, NPY, HDF5 and multichannel WAV, checked as they arrive, with errors that name the row and column."
      points={[
        'Shape, format, checksum and uploader for each file',
        'Per-channel power and covariance maps that reveal dead or miswired channels',
        'Eigenvalue plot with the MDL and AIC source-count choices',
        'A preview table of the first snapshots',
      ]}
    />
  );
}
