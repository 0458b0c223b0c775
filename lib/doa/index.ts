// Public entry point of the bearing-estimation library (lib/doa).
// Media, tapers and beam patterns, array figures and bounds:
export * from './design/medium';
export * from './design/beam-pattern';
export * from './design/array-figures';
export * from './bounds'; // bounds/index.ts
// Complex kernel, errors, linear algebra:
export * from './linalg/complex';
export * from './errors';
export * from './checks';
export * from './linalg/hermitian-eigen';
export * from './linalg/symmetric-eigen';
export * from './linalg/svd';
export * from './linalg/pseudo-inverse';
export * from './linalg/general-eigen';
export * from './linalg/polynomial-roots';
// Covariance, source count, methods and the orchestrator:
export * from './angles';
export * from './covariance';
export * from './methods/source-count';
export * from './methods/spectrum';
export * from './warnings';
export * from './methods/types';
export * from './methods/registry';
export * from './methods/esprit';
export * from './methods/unitary-esprit';
export * from './methods/music';
export * from './methods/root-music';
export * from './methods/beamformers';
export * from './estimate';
export * from './elements';
// Simulation and metrics:
export * from './sim/simulate';
export * from './design/metrics';
