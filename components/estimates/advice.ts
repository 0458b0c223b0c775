/** What to do about each estimator warning code (the codes come from lib/doa/warnings.ts). */
export const WARNING_ADVICE: Record<string, string> = {
  'angle-clipped':
    'A phase fell outside the visible region and was clipped to ±90°: check the spacing (d in wavelengths) and the analysis frequency.',
  'source-count-near-limit':
    'Few noise dimensions remain: use a larger array or subarray, or a smaller source count if you know it.',
  'ill-conditioned-covariance':
    'The covariance is nearly singular (too few snapshots or noise-free data): add snapshots or use smoothing.',
  'coherent-sources-suspected':
    'Correlated or coherent arrivals (multipath) hide sources from subspace methods: turn on spatial smoothing and forward–backward averaging.',
  'few-snapshots':
    'Fewer snapshots than elements: the sample covariance is rank-deficient. Use more snapshots, smoothing or the single-snapshot arrangement.',
  'esprit-efficiency':
    'On long arrays, maximal-overlap ESPRIT loses accuracy: set the smoothing subarray to about two thirds of the elements.',
  'fewer-peaks-than-sources':
    'The spectrum shows fewer peaks than the source count: the sources may be below the resolvable gap for this method.',
  'fewer-roots-than-sources':
    'Root-MUSIC found fewer admissible roots than sources: check the source count or try an ESPRIT method.',
};
