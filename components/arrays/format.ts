import type { ArrayInput } from '@/lib/validations/array';

/** "2025-03-14 09:30 UTC": the same text on the server and in the browser (no locale, no hydration mismatch). */
export function formatWhen(iso: string): string {
  return `${iso.slice(0, 10)} ${iso.slice(11, 16)} UTC`;
}

/** The spacing as the user gave it, e.g. "0.25 m", "15 mm", "0.5 λ". */
export function formatSpacingInput(spacing: ArrayInput['spacing']): string {
  return spacing.unit === 'wavelength' ? `${spacing.value} λ` : `${spacing.value} ${spacing.unit}`;
}

/** A frequency with a readable prefix: "3 kHz", "10 GHz". */
export function formatFrequency(hz: number | undefined): string {
  if (hz === undefined) return '—';
  const units: [number, string][] = [
    [1e9, 'GHz'],
    [1e6, 'MHz'],
    [1e3, 'kHz'],
  ];
  for (const [scale, unit] of units) if (hz >= scale) return `${Number((hz / scale).toPrecision(6))} ${unit}`;
  return `${Number(hz.toPrecision(6))} Hz`;
}
