/**
 * What the designer shows, computed from a draft by the engine in lib/doa.
 * No React: the components call these and render the numbers as they come.
 *
 * Angles in degrees from broadside (docs/conventions.md §1), spacing in wavelengths,
 * u = sin θ, levels in dB relative to the main-lobe peak.
 */
import { beamPattern, thetaGridDeg, type ElementOptions, type TaperSpec } from '@/lib/doa/design/beam-pattern';
import {
  apertureWavelengths,
  arrayMetrics,
  firstNullBeamwidth,
  gratingLobeFreeScanDeg,
  halfPowerBeamwidth,
  maxSpacingForScan,
  peakSidelobe,
  rayleighGap,
  type ArrayMetrics,
} from '@/lib/doa/design/array-figures';
import {
  pairResolvability,
  separationVersusAperture,
  statisticalResolutionLimit,
  type PairResolvability,
  type SeparationChart,
} from '@/lib/doa/bounds';
import { MAX_ELEMENTS, resolveArrayGeometry, type ResolvedGeometry } from '@/lib/validations/array';
import type { DesignerDraft } from './state';

const DEG = Math.PI / 180;

/** Taper, enabled flags and calibration of a draft, as the engine takes them. */
export function elementOptions(draft: DesignerDraft): ElementOptions {
  const taper: TaperSpec =
    draft.taper.kind === 'chebyshev'
      ? { kind: 'chebyshev', sidelobeDb: draft.taper.sidelobeDb }
      : { kind: draft.taper.kind };
  return {
    taper,
    enabled: draft.elementStates.map((e) => e.enabled),
    gainDb: draft.elementStates.map((e) => e.gainDb),
    phaseDeg: draft.elementStates.map((e) => e.phaseDeg),
  };
}

export interface DesignFigures {
  geometry: ResolvedGeometry;
  elements: number;
  spacingWavelengths: number;
  steerDeg: number;
  apertureWavelengths: number;
  /** Aperture in metres when λ is known. */
  apertureM?: number;
  /** Beam figures of the current design (taper, steering, enabled elements, calibration). */
  halfPowerBeamwidthDeg: number | null;
  halfPowerClipped: boolean;
  firstNullBeamwidthDeg: number | null;
  firstNullClipped: boolean;
  peakSidelobeDb: number | null;
  peakSidelobeAtDeg: number | null;
  gratingLobeFreeScanDeg: number;
  /** Largest spacing (λ) free of grating lobes over the scan sector. */
  maxSpacingForScanWavelengths: number;
  scanSectorDeg: number;
  /** The required scan sector is wider than the grating-lobe-free scan. */
  scanExceedsGratingFree: boolean;
  /** The steering angle itself lies beyond the grating-lobe-free scan. */
  steerExceedsGratingFree: boolean;
  rayleighGapU: number;
  /** asin(min(1, 1/(M·d))), the broadside value of docs/conventions.md §5. */
  rayleighGapDegAtBroadside: number;
  /** The v1 API metrics (uniform, broadside, all enabled), docs/conventions.md §5. */
  metrics: ArrayMetrics;
  /** Why the beam figures are missing, when the engine refused them. */
  beamError?: string;
}

/** All figures of a draft, straight from lib/doa. */
export function designFigures(draft: DesignerDraft): DesignFigures {
  const geometry = resolveArrayGeometry(draft);
  const d = geometry.spacingWavelengths;
  const m = draft.elements;
  const options = { elements: m, spacingWavelengths: d, steerDeg: draft.steerDeg, ...elementOptions(draft) };
  const glf = gratingLobeFreeScanDeg(d);
  const gap = rayleighGap(m, d);
  const aperture = apertureWavelengths(m, d);
  const base = {
    geometry,
    elements: m,
    spacingWavelengths: d,
    steerDeg: draft.steerDeg,
    apertureWavelengths: aperture,
    apertureM: geometry.wavelengthM !== undefined ? aperture * geometry.wavelengthM : undefined,
    gratingLobeFreeScanDeg: glf,
    maxSpacingForScanWavelengths: maxSpacingForScan(draft.scanSectorDeg),
    scanSectorDeg: draft.scanSectorDeg,
    scanExceedsGratingFree: draft.scanSectorDeg > glf,
    steerExceedsGratingFree: Math.abs(draft.steerDeg) > glf,
    rayleighGapU: gap.u,
    rayleighGapDegAtBroadside: gap.degAtBroadside,
    metrics: arrayMetrics(m, d),
  };
  try {
    const hp = halfPowerBeamwidth(options);
    const fn = firstNullBeamwidth(options);
    const sl = peakSidelobe(options);
    return {
      ...base,
      halfPowerBeamwidthDeg: hp.widthDeg,
      halfPowerClipped: hp.clipped,
      firstNullBeamwidthDeg: fn.widthDeg,
      firstNullClipped: fn.clipped,
      peakSidelobeDb: sl.peakSidelobeDb,
      peakSidelobeAtDeg: sl.atDeg,
    };
  } catch (e) {
    return {
      ...base,
      halfPowerBeamwidthDeg: null,
      halfPowerClipped: false,
      firstNullBeamwidthDeg: null,
      firstNullClipped: false,
      peakSidelobeDb: null,
      peakSidelobeAtDeg: null,
      beamError: e instanceof Error ? e.message : String(e),
    };
  }
}

export interface PatternData {
  thetaDeg: Float64Array;
  valuesDb: Float64Array;
  /** Grating-lobe directions (degrees) for the current steering: u0 + k/d in [−1, 1], k ≠ 0. */
  gratingLobesDeg: number[];
}

/** The beam pattern of a draft on a θ grid (default −90…90 in 0.1° steps), normalised to its peak. */
export function designPattern(draft: DesignerDraft, stepDeg = 0.1): PatternData {
  const d = resolveArrayGeometry(draft).spacingWavelengths;
  const thetaDeg = thetaGridDeg(-90, 90, stepDeg);
  const pattern = beamPattern({
    elements: draft.elements,
    spacingWavelengths: d,
    steerDeg: draft.steerDeg,
    thetaDeg,
    normalize: 'peak',
    floorDb: -150,
    ...elementOptions(draft),
  });
  return { thetaDeg, valuesDb: pattern.valuesDb, gratingLobesDeg: gratingLobesDeg(d, draft.steerDeg) };
}

/** Grating-lobe directions: the main lobe repeated at u0 + k/d, k ≠ 0, that fall in the visible region. */
export function gratingLobesDeg(spacingWavelengths: number, steerDeg: number): number[] {
  const u0 = Math.sin(steerDeg * DEG);
  const out: number[] = [];
  const kMax = Math.ceil(2 * spacingWavelengths) + 1;
  for (let k = -kMax; k <= kMax; k++) {
    if (k === 0) continue;
    const u = u0 + k / spacingWavelengths;
    if (u >= -1 && u <= 1) out.push(Math.asin(u) / DEG);
  }
  return out.sort((a, b) => a - b);
}

// ---------------------------------------------------------------------------
// Separation versus aperture

/** Separation (degrees) of a pair centred on the look direction whose |Δu| is given; NaN when it does not fit in view. */
export function deltaUToDegAtLook(deltaU: number, lookDeg: number): number {
  const cos0 = Math.cos(lookDeg * DEG);
  const arg = deltaU / (2 * cos0);
  if (!(arg <= 1)) return NaN;
  const delta = 2 * Math.asin(arg);
  return Math.abs(lookDeg * DEG) + delta / 2 < Math.PI / 2 ? delta / DEG : NaN;
}

/** Element counts for the chart: 2 … max(64, 2·M), at most 160 points, capped at 512. */
export function chartElementCounts(elements: number): number[] {
  const top = Math.min(MAX_ELEMENTS, Math.max(64, 2 * elements));
  const step = Math.max(1, Math.ceil((top - 1) / 160));
  const counts: number[] = [];
  for (let m = 2; m <= top; m += step) counts.push(m);
  if (counts[counts.length - 1] !== top) counts.push(top);
  if (!counts.includes(elements)) counts.push(elements);
  return counts.sort((a, b) => a - b);
}

/** The look direction used by the chart: the steering angle, kept strictly inside ±89.9°. */
export function chartLookDeg(draft: DesignerDraft): number {
  return Math.max(-89.9, Math.min(89.9, draft.steerDeg));
}

export function separationCurves(draft: DesignerDraft): SeparationChart {
  const d = resolveArrayGeometry(draft).spacingWavelengths;
  return separationVersusAperture({
    elementCounts: chartElementCounts(draft.elements),
    spacingWavelengths: d,
    lookDeg: chartLookDeg(draft),
    snrDb: draft.snrDb,
    snapshots: draft.snapshots,
  });
}

export interface PairAdvice {
  i: number;
  j: number;
  bearingsDeg: [number, number];
  separationDeg: number;
  separationU: number;
  /** The pair's Δu shown on the chart as a separation centred on the look direction. */
  chartSeparationDeg: number;
  belowResolvableGap: boolean;
  belowStatisticalLimit: boolean;
  verdict: PairResolvability['verdict'] | 'coincident';
  statisticalLimitDeg: number | null;
  /** Plain-language: what will likely happen. */
  outcome: string;
  /** Plain-language: what would fix it (empty when nothing needs fixing). */
  fixes: string[];
}

const fmt = (v: number, digits = 2) => v.toFixed(digits);

/** Smallest snapshot count (doubling search, up to 1e7) at which the pair clears Smith's limit; null if none. */
function snapshotsNeeded(
  draft: DesignerDraft,
  d: number,
  centerDeg: number,
  powers: [number, number],
  separationDeg: number,
): number | null {
  let n = Math.max(1, draft.snapshots);
  for (let step = 0; step < 30 && n <= 1e7; step++) {
    n *= 2;
    const lim = statisticalResolutionLimit({
      elements: draft.elements,
      spacingWavelengths: d,
      centerDeg,
      sourcePowers: powers,
      noisePower: 1,
      snapshots: Math.round(n),
    });
    if (lim.deltaDeg !== null && lim.deltaDeg <= separationDeg) return Math.round(n);
  }
  return null;
}

/** SNR increase (dB, in 1 dB steps up to +40) at which the pair clears Smith's limit; null if none. */
function snrIncreaseNeeded(
  draft: DesignerDraft,
  d: number,
  centerDeg: number,
  powers: [number, number],
  separationDeg: number,
): number | null {
  for (let extra = 1; extra <= 40; extra++) {
    const f = Math.pow(10, extra / 10);
    const lim = statisticalResolutionLimit({
      elements: draft.elements,
      spacingWavelengths: d,
      centerDeg,
      sourcePowers: [powers[0] * f, powers[1] * f],
      noisePower: 1,
      snapshots: draft.snapshots,
    });
    if (lim.deltaDeg !== null && lim.deltaDeg <= separationDeg) return extra;
  }
  return null;
}

/**
 * Every planned source pair with the engine's verdict (lib/doa/bounds/pairs.ts,
 * pairResolvability: the Rayleigh gap test of docs/conventions.md §5 and Smith's
 * statistical limit), evaluated for the pair alone with its own SNRs
 * (a source without an SNR uses the draft's), plus plain-language advice.
 * Uses the full uniform array: disabled elements and taper are not modelled here.
 */
export function pairAdvice(draft: DesignerDraft): PairAdvice[] {
  const d = resolveArrayGeometry(draft).spacingWavelengths;
  const m = draft.elements;
  const look = chartLookDeg(draft);
  const src = draft.plannedSources;
  const out: PairAdvice[] = [];
  const maxD = maxSpacingForScan(draft.scanSectorDeg);
  for (let i = 0; i < src.length; i++) {
    for (let j = i + 1; j < src.length; j++) {
      const a = src[i].bearingDeg;
      const b = src[j].bearingDeg;
      const snrA = src[i].snrDb ?? draft.snrDb;
      const snrB = src[j].snrDb ?? draft.snrDb;
      const powers: [number, number] = [Math.pow(10, snrA / 10), Math.pow(10, snrB / 10)];
      const sepU = Math.abs(Math.sin(a * DEG) - Math.sin(b * DEG));
      const base = {
        i,
        j,
        bearingsDeg: [a, b] as [number, number],
        separationDeg: Math.abs(b - a),
        separationU: sepU,
        chartSeparationDeg: deltaUToDegAtLook(sepU, look),
      };
      let verdict: PairResolvability | null = null;
      try {
        // Clamp endfire bearings just inside the open interval the bound needs.
        const clampIn = (x: number) => Math.max(-89.999, Math.min(89.999, x));
        verdict = pairResolvability({
          elements: m,
          spacingWavelengths: d,
          bearingsDeg: [clampIn(a), clampIn(b)],
          sourcePowers: powers,
          noisePower: 1,
          snapshots: draft.snapshots,
        })[0];
      } catch {
        verdict = null;
      }
      if (!verdict) {
        out.push({
          ...base,
          belowResolvableGap: true,
          belowStatisticalLimit: true,
          verdict: 'coincident',
          statisticalLimitDeg: null,
          outcome: `Sources ${i + 1} and ${j + 1} arrive from the same electrical angle${d > 0.5 ? ' (or alias each other through a grating lobe)' : ''}: every method will report them as one source.`,
          fixes: ['Move one of the arrows, or reduce the spacing so the two directions no longer alias.'],
        });
        continue;
      }
      const fixes: string[] = [];
      let outcome: string;
      const label = `Sources ${i + 1} and ${j + 1} (${fmt(a, 1)}° and ${fmt(b, 1)}°)`;
      if (verdict.verdict === 'resolvable') {
        outcome = `${label} are ${fmt(sepU, 4)} apart in u, above the Rayleigh gap ${fmt(verdict.rayleighGapU, 4)}: a plain beamformer should show two peaks.`;
      } else {
        const needM = Math.ceil(1 / (sepU * d) - 1e-12);
        if (verdict.verdict === 'needs-high-resolution') {
          outcome = `${label} are ${fmt(sepU, 4)} apart in u, below the Rayleigh gap ${fmt(verdict.rayleighGapU, 4)}: the beam pattern (Bartlett) will likely show one merged peak between them. MUSIC or ESPRIT can still separate them at ${fmt(snrA, 0)}/${fmt(snrB, 0)} dB SNR and ${draft.snapshots} snapshots (statistical limit ${verdict.statisticalLimitDeg === null ? '—' : fmt(verdict.statisticalLimitDeg, 3) + '°'}).`;
        } else {
          outcome = `${label} are ${fmt(sepU, 4)} apart in u, below the Rayleigh gap ${fmt(verdict.rayleighGapU, 4)} and below the statistical limit (${verdict.statisticalLimitDeg === null ? 'none in view' : fmt(verdict.statisticalLimitDeg, 3) + '°'}) for this SNR and snapshot count: every method will likely report one source, or two with large errors.`;
        }
        if (needM <= MAX_ELEMENTS)
          fixes.push(`More elements: ${needM} at this spacing puts the pair above the Rayleigh gap (now ${m}).`);
        else fixes.push(`More elements alone cannot do it within the ${MAX_ELEMENTS}-element limit at this spacing.`);
        const needD = 1 / (m * sepU);
        if (needD <= maxD)
          fixes.push(
            `Wider spacing: ${fmt(needD, 3)} λ with ${m} elements clears the gap and stays free of grating lobes over ±${fmt(draft.scanSectorDeg, 0)}° (limit ${fmt(maxD, 3)} λ).`,
          );
        else
          fixes.push(
            `Wider spacing would need ${fmt(needD, 3)} λ, beyond the grating-lobe limit of ${fmt(maxD, 3)} λ for a ±${fmt(draft.scanSectorDeg, 0)}° scan sector.`,
          );
        if (verdict.verdict === 'unresolvable') {
          const center = (Math.max(-89.999, Math.min(89.999, a)) + Math.max(-89.999, Math.min(89.999, b))) / 2;
          const sep = verdict.separationDeg;
          const n = snapshotsNeeded(draft, d, center, powers, sep);
          fixes.push(
            n !== null
              ? `More snapshots: about ${n} (now ${draft.snapshots}) brings the statistical limit below this separation.`
              : 'More snapshots alone will not do it (tried up to 10 million).',
          );
          const extra = snrIncreaseNeeded(draft, d, center, powers, sep);
          fixes.push(
            extra !== null
              ? `Higher SNR: about +${extra} dB on both sources brings the statistical limit below this separation.`
              : 'Higher SNR alone will not do it (tried up to +40 dB).',
          );
        }
      }
      out.push({
        ...base,
        belowResolvableGap: verdict.belowResolvableGap,
        belowStatisticalLimit: verdict.belowStatisticalLimit,
        verdict: verdict.verdict,
        statisticalLimitDeg: verdict.statisticalLimitDeg,
        outcome,
        fixes,
      });
    }
  }
  return out;
}
