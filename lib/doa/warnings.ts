/**
 * Warnings the estimation library attaches to a result. Codes are stable API
 * (the web layer passes them through unchanged); messages are for people.
 */
export type DoaWarningCode =
  /** An electrical angle fell outside ±2π·d and was clipped to ±90° (docs/conventions.md §1). */
  | 'angle-clipped'
  /** The source count leaves two or fewer noise dimensions in the effective array. */
  | 'source-count-near-limit'
  /** cond(R) = λmax/λmin exceeds 1e13. */
  | 'ill-conditioned-covariance'
  /** A rank deficit that spatial smoothing removes: correlated or coherent sources. */
  | 'coherent-sources-suspected'
  /** Fewer snapshots than array elements. */
  | 'few-snapshots'
  /** ESPRIT on 12+ elements with maximal-overlap subarrays and no smoothing. */
  | 'esprit-efficiency'
  /** A spectral method found fewer peaks than the source count. */
  | 'fewer-peaks-than-sources'
  /** Root-MUSIC found fewer admissible roots than the source count. */
  | 'fewer-roots-than-sources'
  /** Disabled elements: the method used a subset of the line (lib/doa/elements.ts says which). */
  | 'element-subset';

export interface DoaWarning {
  readonly code: DoaWarningCode;
  readonly message: string;
}
