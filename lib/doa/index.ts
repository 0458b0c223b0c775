// Public entry point of the bearing-estimation library (lib/doa).
// Media, tapers and beam patterns, array figures and bounds:
export * from './medium';
export * from './beam-pattern';
export * from './array-figures';
export * from './bounds';
