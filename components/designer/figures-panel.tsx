'use client';

/**
 * Array figures exactly as lib/doa computes them (designFigures calls the
 * engine; nothing is recomputed here). Each value is shown with fixed decimals
 * and its raw number is kept in data-value for tests.
 */
import type { DesignFigures } from '@/lib/designer/analysis';
import { cn } from '@/lib/client/cn';

export interface FiguresPanelProps {
  figures: DesignFigures;
  taperLabel: string;
  enabledCount: number;
}

function Figure({
  id,
  label,
  value,
  digits,
  unit,
  note,
  tone,
}: {
  id: string;
  label: string;
  value: number | null;
  digits: number;
  unit: string;
  note?: string;
  tone?: 'warn';
}) {
  return (
    <div
      className={cn(
        'rounded-md border px-3 py-2',
        tone === 'warn' ? 'border-amber-300 bg-amber-50' : 'border-ink-100 bg-paper',
      )}
    >
      <dt className="text-xs text-ink-500">{label}</dt>
      <dd
        className="mt-0.5 font-mono text-lg text-ink-900 tabular"
        data-testid={`figure-${id}`}
        data-value={value === null ? '' : String(value)}
      >
        {value === null ? '—' : `${value.toFixed(digits)}`}
        <span className="ml-1 font-sans text-xs text-ink-500">{value === null ? '' : unit}</span>
      </dd>
      {note ? <p className="mt-0.5 text-2xs text-ink-500">{note}</p> : null}
    </div>
  );
}

export function FiguresPanel({ figures: f, taperLabel, enabledCount }: FiguresPanelProps) {
  const steerNote = `steered to ${f.steerDeg.toFixed(1)}°, ${taperLabel}, ${enabledCount} of ${f.elements} elements`;
  return (
    <div className="space-y-3" data-testid="figures-panel">
      <dl className="grid grid-cols-2 gap-2 sm:grid-cols-3">
        <Figure
          id="hpbw"
          label="Half-power beamwidth"
          value={f.halfPowerBeamwidthDeg}
          digits={3}
          unit="°"
          note={f.halfPowerClipped ? 'an edge reaches endfire (clipped at ±90°)' : steerNote}
        />
        <Figure
          id="fnbw"
          label="First-null width"
          value={f.firstNullBeamwidthDeg}
          digits={3}
          unit="°"
          note={f.firstNullClipped ? 'a null lies beyond endfire (clipped at ±90°)' : undefined}
        />
        <Figure
          id="psl"
          label="Peak sidelobe"
          value={f.peakSidelobeDb}
          digits={2}
          unit="dB"
          note={
            f.peakSidelobeDb === null && !f.beamError
              ? 'no sidelobe in view'
              : f.peakSidelobeAtDeg !== null
                ? `at ${f.peakSidelobeAtDeg.toFixed(1)}°`
                : undefined
          }
        />
        <Figure
          id="aperture"
          label="Aperture (M − 1)·d"
          value={f.apertureWavelengths}
          digits={3}
          unit="λ"
          note={
            f.apertureM !== undefined
              ? `${f.apertureM < 1 ? (f.apertureM * 1000).toFixed(1) + ' mm' : f.apertureM.toFixed(3) + ' m'}`
              : undefined
          }
        />
        <Figure
          id="grating-free-scan"
          label="Grating-lobe-free scan"
          value={f.gratingLobeFreeScanDeg}
          digits={2}
          unit="°"
          note={`each side of broadside; the sector needs ±${f.scanSectorDeg.toFixed(1)}°`}
          tone={f.scanExceedsGratingFree ? 'warn' : undefined}
        />
        <Figure
          id="rayleigh-gap"
          label="Rayleigh gap 1/(M·d)"
          value={f.rayleighGapU}
          digits={4}
          unit="in u"
          note={`${f.rayleighGapDegAtBroadside.toFixed(3)}° at broadside`}
        />
      </dl>
      {f.beamError ? (
        <p role="alert" className="rounded-md border border-coral-500/40 bg-coral-50 px-3 py-2 text-sm text-coral-700">
          The beam figures could not be computed: {f.beamError}
        </p>
      ) : null}
      {f.scanExceedsGratingFree ? (
        <p
          role="alert"
          data-testid="scan-warning"
          className="rounded-md border border-amber-300 bg-amber-50 px-3 py-2 text-sm text-amber-700"
        >
          <strong className="font-semibold">Grating lobes inside the scan sector.</strong> You need ±
          {f.scanSectorDeg.toFixed(1)}°, but at d = {f.spacingWavelengths.toFixed(4)} λ the array scans only ±
          {f.gratingLobeFreeScanDeg.toFixed(2)}° before a second full-height lobe enters view. Reduce the spacing to{' '}
          {f.maxSpacingForScanWavelengths.toFixed(4)} λ or less, or narrow the sector.
        </p>
      ) : null}
      {!f.scanExceedsGratingFree && f.steerExceedsGratingFree ? (
        <p role="alert" className="rounded-md border border-amber-300 bg-amber-50 px-3 py-2 text-sm text-amber-700">
          Steered to {f.steerDeg.toFixed(1)}°, beyond the grating-lobe-free scan of ±
          {f.gratingLobeFreeScanDeg.toFixed(2)}°: a grating lobe is in view.
        </p>
      ) : null}
      <p className="text-xs text-ink-500" data-testid="api-metrics">
        Saved metrics (uniform weights, broadside, every element, as the API reports them): HPBW{' '}
        {f.metrics.halfPowerBeamwidthDeg.toFixed(3)}°, Rayleigh gap {f.metrics.rayleighGapDeg.toFixed(3)}°, peak
        sidelobe {f.metrics.peakSidelobeDb === null ? '—' : `${f.metrics.peakSidelobeDb.toFixed(2)} dB`}.
      </p>
    </div>
  );
}
