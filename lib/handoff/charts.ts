/**
 * Server-side SVG figures for hand-off bundles: the beam pattern and the
 * separation-versus-aperture chart, from the same chart definitions the
 * designer page draws (lib/charts), rendered by ECharts on the server
 * (lib/charts/ssr.ts) with a title and a caption line added.
 *
 * Angles in degrees from broadside (docs/conventions.md §1); pattern levels in dB
 * relative to the main-lobe peak; separations in degrees centred on the look
 * direction (the designer's default view).
 */
import { designPattern, pairAdvice, separationCurves, chartLookDeg, type PairAdvice } from '@/lib/designer/analysis';
import { draftSpacingWavelengths, type DesignerDraft } from '@/lib/designer/state';
import { beamPatternOption, designSeparationInput, separationOption, type ChartSize } from '@/lib/charts';
import { renderChartSvg } from '@/lib/charts/ssr';

/** Size of the bundle's figures, in pixels. */
export const BUNDLE_CHART_SIZE: ChartSize = { width: 720, height: 420 };

const num = (v: number) => (Math.round(v * 100) / 100).toString();

/** The beam pattern's option as the bundle draws it: the designer's Cartesian view at a −60 dB floor. */
export function beamPatternBundleOption(draft: DesignerDraft, floorDb = -60) {
  const pattern = designPattern(draft, 0.1);
  const taper = draft.taper.kind === 'chebyshev' ? `Chebyshev ${draft.taper.sidelobeDb} dB` : draft.taper.kind;
  const disabled = draft.elementStates.filter((e) => !e.enabled).length;
  return beamPatternOption(
    {
      thetaDeg: pattern.thetaDeg,
      valuesDb: pattern.valuesDb,
      gratingLobesDeg: pattern.gratingLobesDeg,
      steerDeg: draft.steerDeg,
      floorDb,
      view: 'cartesian',
      elements: draft.elements,
    },
    {
      title: `Beam pattern: ${draft.name}`,
      subtitle: `${draft.elements} elements, steered to ${num(draft.steerDeg)}°, ${taper} taper${disabled ? `, ${disabled} disabled` : ''}; dotted red: grating lobes`,
    },
  );
}

/** The separation chart's option as the bundle draws it: elements against degrees, as the designer opens. */
export function separationBundleOption(draft: DesignerDraft, pairs: PairAdvice[] = pairAdvice(draft)) {
  const d = draftSpacingWavelengths(draft);
  const input = designSeparationInput({
    curves: separationCurves(draft),
    pairs,
    elements: draft.elements,
    spacingWavelengths: d,
    lookDeg: chartLookDeg(draft),
    snrDb: draft.snrDb,
    snapshots: draft.snapshots,
    xKind: 'elements',
    yKind: 'deg',
  });
  return separationOption(input, {
    title: `Separation versus aperture: ${draft.name}`,
    subtitle: `d = ${d.toPrecision(4)} λ, look ${num(chartLookDeg(draft))}°, ${draft.snrDb} dB SNR, ${draft.snapshots} snapshots; points: planned pairs (hollow red below the gap)`,
  });
}

/** Beam pattern, Cartesian: −90…90° against 0…floor dB, steering and grating lobes marked. */
export function beamPatternSvg(draft: DesignerDraft, floorDb = -60): string {
  return renderChartSvg(beamPatternBundleOption(draft, floorDb), BUNDLE_CHART_SIZE);
}

/** Separation versus aperture: Rayleigh gap and statistical limit against element count, log separation axis. */
export function separationChartSvg(draft: DesignerDraft, pairs: PairAdvice[] = pairAdvice(draft)): string {
  return renderChartSvg(separationBundleOption(draft, pairs), BUNDLE_CHART_SIZE);
}
