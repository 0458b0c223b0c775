// Bounds on bearing estimation, by concern:
//   crb.ts          stochastic and deterministic Cramér–Rao bounds (the numerics)
//   resolution.ts   Smith's statistical resolution limit
//   pairs.ts        per-pair resolvability verdicts
//   chart.ts        the designer's separation-versus-aperture curves (chart data)
//   uncertainty.ts  a run's ±σ: source-covariance fit and the choice uncorrelated / full-P bound
//   api-answer.ts   the POST /api/v1/bounds answer (request shaping)
export {
  stochasticCrb,
  stochasticCrbFullCovariance,
  type FullCovarianceBoundsInput,
  deterministicCrb,
  cramerRaoBound,
  type BoundKind,
  type BoundsInput,
  type CrbResult,
} from './crb';
export { statisticalResolutionLimit, type ResolutionLimit, type ResolutionLimitInput } from './resolution';
export { pairResolvability, type PairResolvability, type PairVerdict } from './pairs';
export { separationVersusAperture, type SeparationChart, type SeparationChartInput } from './chart';
export { bounds, type BoundsAnswer, type BoundsRequest } from './api-answer';
export {
  uncertaintyFromCovariance,
  fitSourceCovariance,
  CORRELATED_SOURCES_THRESHOLD,
  type RunUncertainty,
  type UncertaintyInput,
  type SourceCovarianceFit,
  type ReportedBound,
} from './uncertainty';
