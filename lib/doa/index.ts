// Public entry point of the bearing-estimation library (lib/doa).
// Media, tapers and beam patterns, array figures and bounds:
export * from './medium';
export * from './beam-pattern';
export * from './array-figures';
export * from './bounds';
// Complex kernel, errors, linear algebra:
export * from './complex';
export * from './errors';
export * from './hermitian-eigen';
export * from './symmetric-eigen';
export * from './svd';
export * from './pseudo-inverse';
export * from './general-eigen';
export * from './polynomial-roots';
// Covariance, source count, methods and the orchestrator:
export * from './angles';
export * from './covariance';
export * from './source-count';
export * from './spectrum';
export * from './warnings';
export * from './method-types';
export * from './methods';
export * from './esprit';
export * from './unitary-esprit';
export * from './music';
export * from './root-music';
export * from './beamformers';
export * from './estimate';
// Simulation and metrics:
export * from './simulate';
export * from './metrics';
