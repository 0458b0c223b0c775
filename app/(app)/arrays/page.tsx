import { AreaPlaceholder } from '@/components/shell/area-placeholder';

export const metadata = { title: 'Arrays' };

export default function ArraysPage() {
  return (
    <AreaPlaceholder
      read="arrays.read"
      write="arrays.edit"
      kicker="Design"
      title="Arrays"
      description="Uniform linear arrays: element count, spacing for a band, taper and per-element calibration. Every save is a revision that estimates can point to."
      emptyTitle="No arrays yet"
      emptyText="The array designer will live here: draw a line array to scale, stretch its spacing, switch elements off, and read the beam it will give you."
      points={[
        'Beam pattern, half-power beamwidth and peak sidelobe, live',
        'Grating-lobe-free scan for the band, with a warning when the sector exceeds it',
        'Separation versus aperture: which source pairs this array can resolve',
        'Immutable revisions with author and date',
      ]}
    />
  );
}
